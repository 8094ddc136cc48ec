// panel_switch.v - a panel switch: the debounce latch of panel_latch.v (included) and the
// lamp driver it feeds. panel_switch_flat.v is the same text with the include written out.
`include "panel_latch.v"

module panel_switch (input touch_set_n, input touch_reset_n, output lamp);
  wire held, held_n;
  debounce_latch lt (.set_n(touch_set_n), .reset_n(touch_reset_n), .q(held), .q_n(held_n));
  buf #(40:50:60) drv (lamp, held);
endmodule
