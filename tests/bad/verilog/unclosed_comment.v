// expect: 3:3: this comment is never closed
module m (input a, output y);
  /* the inverter
  not (y, a);
endmodule
