// expect: 2:14: port 'y' of module 'm' has no input or output declaration
module m (a, y);
  input a;
  not (y, a);
endmodule
