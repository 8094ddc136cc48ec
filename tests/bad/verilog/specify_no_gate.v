// expect: 9:5: 'b' reaches the gate driving 'y' through no gate of module 'pair'
`timescale 1ps/1ps
module pair(input a, input b, output y, output z);
  wire w;
  not g0 (y, a);
  not g1 (z, b);
  specify
    (a => y) = 10;
    (b => y) = 20;
  endspecify
endmodule
