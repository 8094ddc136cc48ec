// expect: 4:8: 'w' is already declared at 3:8
module m (input a, output y);
  wire w;
  wire w;
  not (y, a);
endmodule
