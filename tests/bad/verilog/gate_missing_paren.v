// expect: 3:17: expected ')', found 'b'
module m (input a, output y);
  nand g1 (y, a b);
endmodule
