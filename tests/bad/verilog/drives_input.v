// expect: 3:8: net 'a' is an input; a gate cannot drive it
module m (input a, output y);
  not (a, y);
endmodule
