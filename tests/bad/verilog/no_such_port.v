// expect: 6:19: module 'cell' has no port 'z'
module cell (input a, output y);
  not (y, a);
endmodule
module m (input a, output y);
  cell c (.a(a), .z(y));
endmodule
