// expect: 6:18: an instance connects its ports either all by name or all by position
module cell (input a, output y);
  not (y, a);
endmodule
module m (input a, output y);
  cell c (.a(a), y);
endmodule
