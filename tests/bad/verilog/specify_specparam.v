// expect: 6:5: 'specparam' is not supported by settle's structural reader
`timescale 1ps/1ps
module cell(input a, output y);
  not g0 (y, a);
  specify
    specparam t_ay = 10;
    (a => y) = t_ay;
  endspecify
endmodule
