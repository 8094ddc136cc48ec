// expect: 2:10: cannot read the included file
`include "no_such_cells.v"
module m (input a, output y);
  buf #1 (y, a);
endmodule
