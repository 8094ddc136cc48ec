// expect: 3:11: holds x or z
module m (input a, output y);
  and (y, 1'bx, a);
endmodule
