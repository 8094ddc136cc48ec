// expect: 2:12: expected a time such as 1ns
`timescale 3ns/1ps
module m (input a, output y);
  not (y, a);
endmodule
