// expect: 3:17: expected an operand
module m (input a, output y);
  assign y = a &;
endmodule
