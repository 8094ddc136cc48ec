// expect: 4:11: 'b[4]' is out of the range [3:0]
module m (input a, output y);
  wire [3:0] b;
  not (y, b[4]);
endmodule
