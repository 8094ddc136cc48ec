// panel_switch_flat.v - panel_switch.v with its `include written out: the debounce latch of
// panel_latch.v and the lamp driver it feeds.
`timescale 1ps / 1ps

module debounce_latch (input set_n, input reset_n, output q, output q_n);
  nand #(35:45:55) ga (q, set_n, q_n);
  nand #(35:45:55) gb (q_n, reset_n, q);
endmodule


module panel_switch (input touch_set_n, input touch_reset_n, output lamp);
  wire held, held_n;
  debounce_latch lt (.set_n(touch_set_n), .reset_n(touch_reset_n), .q(held), .q_n(held_n));
  buf #(40:50:60) drv (lamp, held);
endmodule
