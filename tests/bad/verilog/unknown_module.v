// expect: 3:3: unknown module 'latch2'
module m (input a, output y);
  latch2 u (.d(a), .q(y));
endmodule
