// expect: 2:1: the directive '`include' is not supported
`include "cells.v"
module m (input a, output y);
  not (y, a);
endmodule
