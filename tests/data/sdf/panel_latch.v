// A panel-switch debouncer's NAND latch built from two NAND cells, so that SDF
// back-annotation (panel_latch.sdf) times each input of each gate apart. The
// delays written here (10ps) are what a gate keeps when no SDF names it; the
// same latch with its arcs written in .settle is panel_latch.settle.
`timescale 1ns/1ps
module pl_nand(input a, input b, output y);
  nand #(0.010) g (y, a, b);
endmodule

module panel_latch(input set_n, input reset_n, output q, output q_n);
  pl_nand u_q (.a(set_n), .b(q_n), .y(q));
  pl_nand u_qn (.a(reset_n), .b(q), .y(q_n));
endmodule
