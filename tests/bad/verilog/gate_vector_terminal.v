// expect: 3:11: a gate terminal is one bit; this one is 2 bits wide
module m (input [1:0] a, output y);
  not (y, a);
endmodule
