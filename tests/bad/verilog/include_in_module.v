// expect: 4:12: `include inside module
`timescale 1ps / 1ps
module m (input a, output y);
  `include "../import/lamp_wires.vh"
  buf #1 (y, a);
endmodule
