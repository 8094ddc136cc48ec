// expect: 3:8: a delay needs a `timescale directive
module m (input a, output y);
  not #5 (y, a);
endmodule
