// expect: 2:11: is not a C-element
primitive toggle (q, a, b);
  output reg q;
  input a, b;
  table
    0 0 : ? : 1;
    1 1 : ? : 1;
    0 1 : ? : -;
    1 0 : ? : -;
  endtable
endprimitive
module m (input a, b, output y);
  toggle t (y, a, b);
endmodule
