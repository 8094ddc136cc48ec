// verilog_cells.v - a small cell library of our own for a sensor FIFO handshake, described
// the way cell libraries describe cells: a two-input C-element as a sequential user-defined
// primitive with an initial value, and a select cell as a combinational one.
`timescale 1ns / 1ps

primitive fifo_c2 (q, a, b);
  output q;
  reg q;
  input a, b;
  initial q = 1'b0;
  table
  //  a b : q : q+
      0 0 : ? : 0;
      1 1 : ? : 1;
      0 1 : ? : -;
      1 0 : ? : -;
  endtable
endprimitive

primitive fifo_sel (y, s, a, b);
  output y;
  input s, a, b;
  table
  //  s a b : y
      0 0 ? : 0;
      0 1 ? : 1;
      1 ? 0 : 0;
      1 ? 1 : 1;
  endtable
endprimitive

`celldefine
module fifo_stage (input req_in, input ack_out, input bypass, output req_out, output grant);
  wire ack_out_n;
  not #(0.010:0.015:0.020) inv (ack_out_n, ack_out);
  fifo_c2 #(0.030:0.040:0.050) join (req_out, req_in, ack_out_n);
  fifo_sel pick (grant, bypass, req_in, req_out);
endmodule
`endcelldefine
