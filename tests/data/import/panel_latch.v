// panel_latch.v - the set/reset latch of a panel switch debouncer, as a Verilog cell that
// tests/data/import/panel_import.settle imports. Both switch contacts read 0 while touched:
// set_n sets the latch, reset_n resets it, and it holds while both read 1.
`timescale 1ps / 1ps

module debounce_latch (input set_n, input reset_n, output q, output q_n);
  nand #(35:45:55) ga (q, set_n, q_n);
  nand #(35:45:55) gb (q_n, reset_n, q);
endmodule
