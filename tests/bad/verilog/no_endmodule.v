// expect: 2:8: module 'm' has no 'endmodule'
module m (input a, output y);
  not (y, a);

