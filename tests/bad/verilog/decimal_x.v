// expect: 3:14: holds a digit that is not decimal
module m (input a, output [3:0] y);
  assign y = 4'd1x;
endmodule
