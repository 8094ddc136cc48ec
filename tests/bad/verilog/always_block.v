// expect: 3:3: 'always' (behavioural code) is not supported by settle's structural reader
module m (input a, output y);
  always @(a) y = a;
endmodule
