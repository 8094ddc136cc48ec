// expect: 7:5: this row contradicts the row at 6:5
primitive p (y, a, b);
  output y;
  input a, b;
  table
    0 ? : 0;
    0 1 : 1;
    1 ? : 1;
  endtable
endprimitive
