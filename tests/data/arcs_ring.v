// The delay-monitor ring of arcs_ring.settle in structural Verilog: each stage a cell whose
// specify block times its input-to-output paths (IEEE 1364-2005 clause 14).
`timescale 1ps/1fs
module enable_stage(input en, input fb, output y);
  nand g (y, en, fb);
  specify
    (fb => y) = (20:25:32, 28:35:44);
    (en => y) = 5:350:400;
  endspecify
endmodule

module trim_stage(input a, input trim, output y);
  nand g (y, a, trim);
  specify
    (a => y) = (14:18:23, 16:21:27);
    (trim => y) = 6:500:600;
  endspecify
endmodule

module out_stage(input a, output y);
  not g (y, a);
  specify
    (a *> y) = (11:13:16, 9:12:15);
  endspecify
endmodule

module monitor_arcs(input en, input trim, output tap);
  wire n0, n1;
  enable_stage s0 (.en(en), .fb(tap), .y(n0));
  trim_stage s1 (.a(n0), .trim(trim), .y(n1));
  out_stage s2 (.a(n1), .y(tap));
endmodule
