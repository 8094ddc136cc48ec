// expect: 4:9: MIN <= TYP <= MAX
`timescale 1ns/1ps
module m (input a, output y);
  not #(3:2:4) (y, a);
endmodule
