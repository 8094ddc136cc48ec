// expect: 4:8: net 'y' has two drivers
module m (input a, b, output y);
  not (y, a);
  not (y, b);
endmodule
