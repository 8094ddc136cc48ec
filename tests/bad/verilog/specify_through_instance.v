// expect: 8:5: no gate of module 'two' drives 'y'
`timescale 1ps/1ps
module two(input a, output y);
  wire w;
  not g0 (w, a);
  buf_cell c (.a(w), .y(y));
  specify
    (a => y) = 10;
  endspecify
endmodule
module buf_cell(input a, output y);
  buf g (y, a);
endmodule
