// expect: 6:5: this row gives 3 input symbols; primitive 'p' has 2 inputs
primitive p (y, a, b);
  output y;
  input a, b;
  table
    0 0 1 : 0;
  endtable
endprimitive
