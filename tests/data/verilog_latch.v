// verilog_latch.v - the hold latch of a panel push-button (test design for the Verilog reader).
// Both button contacts are pulled up and read 0 while pressed: set_n sets the latch, clr_n
// clears it, and it holds while both read 1. tests/data/verilog_latch.settle is the same
// design in the .settle language.
`timescale 1ns / 1ps

(* cell *)
module hold_latch (s_n, r_n, q, q_n);
  input s_n, r_n;
  output q, q_n;
  nand #(0.035:0.045:0.055) ga (q, s_n, q_n);
  nand #(0.035:0.045:0.055) gb (q_n, r_n, q);
endmodule

module panel_button (input set_n, input clr_n, output held, output lamp);
  wire held_n;
  hold_latch hl (.s_n(set_n), .r_n(clr_n), .q(held), .q_n(held_n));
  buf #(0.040:0.050:0.060) drv (lamp, held);
endmodule
