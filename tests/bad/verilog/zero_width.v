// expect: 3:11: has a width below 1
module m (input a, output y);
  and (y, 0'b1, a);
endmodule
