// expect: 3:10: an assignment cannot drive a constant
module m (input a, output y);
  assign 1'bz = a;
endmodule
