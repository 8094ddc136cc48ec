// expect: 2:1: a user-defined primitive ('primitive') is not supported
primitive inv_udp (y, a);
  output y;
  input a;
  table 0 : 1; 1 : 0; endtable
endprimitive
