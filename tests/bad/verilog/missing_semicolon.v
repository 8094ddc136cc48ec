// expect: 3:3: expected ';' before 'not'
module m (input a, output y)
  not (y, a);
endmodule
