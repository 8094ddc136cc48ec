// expect: 6:14: port 'd' of module 'cell' is 2 bits wide; this connection is 3
module cell (input [1:0] d, output y);
  and (y, d[1], d[0]);
endmodule
module m (input [2:0] a, output y);
  cell c (.d(a), .y(y));
endmodule
