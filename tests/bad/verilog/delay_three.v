// expect: 4:7: a third delay (the change to z) is not supported
`timescale 1ns/1ps
module m (input a, output y);
  not #(1, 2, 3) (y, a);
endmodule
