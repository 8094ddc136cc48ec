// expect: 2:1: expected 'module': this statement is outside any module
wire stray;
module m (input a, output y);
  not (y, a);
endmodule
