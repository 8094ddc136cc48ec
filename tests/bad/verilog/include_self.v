// expect: 3:10: `include cycle
`timescale 1ps / 1ps
`include "include_self.v"
module m (input a, output y);
  buf #1 (y, a);
endmodule
