// expect: 2:11: gives no binary output for a=1, b=1
primitive half (y, a, b);
  output y;
  input a, b;
  table
    0 ? : 0;
    1 0 : 1;
  endtable
endprimitive
module m (input a, b, output y);
  half h (y, a, b);
endmodule
