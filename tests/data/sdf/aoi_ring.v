// A delay-monitor ring whose first stage is an and-or-invert cell of two
// primitives (y = ~((a & b) | c)), the way cell libraries describe complex
// cells, and whose other stages are one-gate inverters. The primitives carry
// no delay of their own: the cell's timing comes from aoi_ring.sdf.
`timescale 1ns/1ps
module mon_aoi21(input a, input b, input c, output y);
  wire ab;
  and g_and (ab, a, b);
  nor g_nor (y, ab, c);
endmodule

module mon_inv(input a, output y);
  not #(0.040) g (y, a);
endmodule

module aoi_ring(input en, input hold, output tap);
  wire n0, n1;
  mon_aoi21 st0 (.a(tap), .b(en), .c(hold), .y(n0));
  mon_inv st1 (.a(n0), .y(n1));
  mon_inv st2 (.a(n1), .y(tap));
endmodule
