// expect: 4:3: 'inout' is not supported by settle's structural reader
module m (a, y);
  input a;
  inout y;
endmodule
