// expect: 3:11: unknown net 'q'
module m (input a, output y);
  not (y, q);
endmodule
