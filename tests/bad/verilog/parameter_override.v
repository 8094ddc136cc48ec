// expect: 6:8: parameter overrides
module cell (input a, output y);
  not (y, a);
endmodule
module m (input a, output y);
  cell #(2) c (.a(a), .y(y));
endmodule
