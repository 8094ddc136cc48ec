// A delay-monitor ring: an enable NAND, two inverter cells and an output stage.
`timescale 1ns/1ps
`celldefine
module ring_cell(input a, output y);
  not #(0.010:0.020:0.030) u (y, a);
endmodule
`endcelldefine

module monitor (en, tap);
  input en;
  output tap;
  wire n0, n1, n2;
  (* keep *) nand #(0.015:0.025:0.035) g0 (n0, en, tap);
  ring_cell c1 (.a(n0), .y(n1));
  ring_cell c2 (n1, n2);
  /* last stage */
  assign #(0.005, 0.007) tap = n2;
endmodule
