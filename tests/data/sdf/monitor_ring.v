// A delay-monitor ring built from cells: an enable NAND cell and four inverter
// cells, each cell a module with one gate, so that SDF back-annotation can
// time each stage (monitor_ring*.sdf). The delays written here are what a
// gate keeps when no SDF names it.
`timescale 1ns/1ps
module mon_nand2(input a, input b, output y);
  nand #(0.050) g (y, a, b);
endmodule

module mon_inv(input a, output y);
  not #(0.040) g (y, a);
endmodule

module mon_ring(input en, output tap);
  wire n0, n1, n2, n3;
  mon_nand2 st0 (.a(en), .b(tap), .y(n0));
  mon_inv st1 (.a(n0), .y(n1));
  mon_inv st2 (.a(n1), .y(n2));
  mon_inv st3 (.a(n2), .y(n3));
  mon_inv st4 (.a(n3), .y(tap));
endmodule
