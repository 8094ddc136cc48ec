// expect: 3:3: recursive instantiation
module m (input a, output y);
  m inner (.a(a), .y(y));
endmodule
module t (input a, output y);
  m u (.a(a), .y(y));
endmodule
