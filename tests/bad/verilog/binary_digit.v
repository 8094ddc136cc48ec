// expect: 3:11: holds the digit '2', which base 'b' does not have
module m (input a, output y);
  and (y, 4'b0021, a);
endmodule
