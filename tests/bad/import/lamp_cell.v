// lamp_cell.v - a lamp driver cell the import cases of tests/bad use (a good file).
`timescale 1ps / 1ps
module lamp_drive (input on, output lamp);
  buf #(40:50:60) drv (lamp, on);
endmodule
