// expect: 7:5: edge-sensitive table entries are not supported yet
primitive ff (q, d, ck);
  output reg q;
  input d, ck;
  table
    ? 0 : ? : -;
    (01) 1 : ? : 1;
  endtable
endprimitive
