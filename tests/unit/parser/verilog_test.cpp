// The structural Verilog reader: names, selects, concatenations and delays as IEEE 1364-2005
// defines them.
#include <fmt/format.h>

#include <catch2/catch.hpp>
#include <string>

#include "parser/load.hpp"

using namespace settle;

namespace {

design read(const std::string& text, const std::string& top = "") {
  diagnostics diags;
  load_options opt;
  opt.format = "verilog";
  opt.top = top;
  auto d = load_design_text(text, "t.v", opt, diags);
  std::string all;
  for (auto& x : diags.items) all += format_diagnostic(x);
  INFO(all);
  REQUIRE(d);
  return std::move(*d);
}

/// The nets a gate reads, by name, in fan-in order.
std::vector<std::string> reads(const netlist& n, const std::string& out) {
  const net_id o = n.find(out);
  REQUIRE(o != no_id);
  const gate_id g = n.driver[o];
  REQUIRE(g != no_id);
  std::vector<std::string> r;
  for (auto i = n.fanin_begin[g]; i < n.fanin_begin[g + 1]; ++i)
    r.push_back(n.fanin[i] == netlist::const0   ? "0"
                : n.fanin[i] == netlist::const1 ? "1"
                                                : n.net_name[n.fanin[i]]);
  return r;
}

const gate_delay& delay_of(const netlist& n, const std::string& out) {
  return n.delay[n.driver[n.find(out)]];
}

}  // namespace

TEST_CASE("Verilog: vector bits, part-selects and concatenations connect MSB first", "[parser]") {
  // IEEE 1364-2005 5.1.14 (concatenations list their operands from the most
  // significant bit) and 12.3.9 (a port connection is bit-for-bit, MSB to MSB).
  auto d = read(R"(module pair (input [1:0] d, output y, output z);
  and (y, d[1], d[0]);
  xor (z, d[0], d[1]);
endmodule
module top (input a, input [3:0] b, output [2:0] y);
  wire spare;
  pair p0 (.d({a, b[2]}), .y(y[2]), .z(y[1]));
  pair p1 (b[1:0], y[0], spare);
endmodule
)");
  const auto& n = d.nets;
  CHECK(reads(n, "y[2]") == std::vector<std::string>{"a", "b[2]"});  // d[1] = a, d[0] = b[2]
  CHECK(reads(n, "y[1]") == std::vector<std::string>{"b[2]", "a"});
  CHECK(reads(n, "y[0]") == std::vector<std::string>{"b[1]", "b[0]"});  // d[1:0] = b[1:0]
  // The instance's own names alias the nets connected to its ports (as .settle blocks do).
  CHECK(n.find("p0.d[1]") == n.find("a"));
  CHECK(n.find("p1.d[0]") == n.find("b[0]"));
  CHECK(n.find("p1.z") == n.find("spare"));  // by position: the ports in header order
  CHECK(n.inputs.size() == 5);
  CHECK(n.outputs.size() == 3);
}

TEST_CASE("Verilog: min:typ:max and rise/fall delays in `timescale units", "[parser]") {
  // IEEE 1364-2005 7.14 (gate delays: one value for every change, two for
  // rise and fall; each a min:typ:max expression) and 19.8 (`timescale).
  auto d = read(R"(`timescale 1ns / 1ps
module m (input a, output y1, y2, y3, y4);
  not #2 g1 (y1, a);
  not #(1:2:3) g2 (y2, a);
  not #(0.5, 0.25) g3 (y3, a);
  assign #(1:2:3, 4:5:6) y4 = ~a;
endmodule
)");
  const auto& n = d.nets;
  const time_fs ns = 1000000;
  CHECK(delay_of(n, "y1").rise == delay_range{2 * ns, 2 * ns, 2 * ns});
  CHECK(delay_of(n, "y1").fall == delay_range{2 * ns, 2 * ns, 2 * ns});
  CHECK(delay_of(n, "y2").rise == delay_range{1 * ns, 2 * ns, 3 * ns});
  CHECK(delay_of(n, "y3").rise == delay_range{500000, 500000, 500000});
  CHECK(delay_of(n, "y3").fall == delay_range{250000, 250000, 250000});
  CHECK(delay_of(n, "y4").rise == delay_range{1 * ns, 2 * ns, 3 * ns});
  CHECK(delay_of(n, "y4").fall == delay_range{4 * ns, 5 * ns, 6 * ns});
  CHECK_FALSE(delay_of(n, "y1").transport);  // gate delays are inertial (IEEE 1364-2005 7.14)
}

TEST_CASE("Verilog: a gate without a delay takes the --delay range", "[parser]") {
  load_options opt;
  opt.format = "verilog";
  opt.bench_delay = {10, 20, 30};
  diagnostics diags;
  auto d = load_design_text("module m (input a, output y);\n  buf (y, a);\nendmodule\n", "t.v", opt,
                            diags);
  REQUIRE(d);
  CHECK(delay_of(d->nets, "y").rise == delay_range{10, 20, 30});
  CHECK(delay_of(d->nets, "y").fall == delay_range{10, 20, 30});
}

TEST_CASE("Verilog: --top chooses among several root modules", "[parser]") {
  const std::string text =
      "module a (input x, output y);\n  not (y, x);\nendmodule\nmodule b (input x, output y);\n  "
      "buf (y, x);\n"
      "endmodule\n";
  CHECK(read(text, "b").nets.kind == std::vector<gate_kind>{gate_kind::buf});
  CHECK(read(text, "a").nets.kind == std::vector<gate_kind>{gate_kind::inv});
  diagnostics diags;
  load_options opt;
  opt.format = "verilog";
  CHECK_FALSE(load_design_text(text, "t.v", opt, diags));
  opt.top = "c";
  diagnostics diags2;
  CHECK_FALSE(load_design_text(text, "t.v", opt, diags2));
}

TEST_CASE("Verilog: based constants in four bases, sized and extended; x and z read as x",
          "[parser]") {
  // IEEE 1364-2005 3.5.1: a based constant's digits give 1 (b), 3 (o) or 4 (h)
  // bits each, a decimal one its binary value; a sized constant is cut from the
  // left or padded with 0, or with x when its leftmost digit is x or z. settle
  // has no high impedance, so z reads as x (parser/VERILOG.md says so).
  auto d = read(R"(module top (input a, output [7:0] h, output [5:0] o, output [4:0] dd,
            output [3:0] xs, output [1:0] cut, output w, output [2:0] c);
  assign h = 8'hA5;
  assign o = 6'o57;
  assign dd = 5'd19;
  assign xs = 4'bz1;
  assign cut = 2'b1101;
  and (w, a, 1'bZ);
  assign c = {1'b1, a, 1'b0};
endmodule
)");
  const auto& n = d.nets;
  auto bits = [&](const std::string& v, int w) {
    std::string s;
    for (int i = w - 1; i >= 0; --i) {
      const net_id k = n.find(fmt::format("{}[{}]", v, i));
      REQUIRE(k != no_id);
      const gate_id g = n.driver[k];
      REQUIRE(g != no_id);
      REQUIRE(n.fanin_begin[g + 1] - n.fanin_begin[g] == 1);  // a buffer of the bit
      const net_id in = n.fanin[n.fanin_begin[g]];
      s += in == netlist::const0   ? '0'
           : in == netlist::const1 ? '1'
           : in == n.find("1'bx")  ? 'x'
                                   : '?';
    }
    return s;
  };
  CHECK(bits("h", 8) == "10100101");
  CHECK(bits("o", 6) == "101111");
  CHECK(bits("dd", 5) == "10011");
  CHECK(bits("xs", 4) == "xxx1");  // padded with x: the leftmost digit is z
  CHECK(bits("cut", 2) == "01");   // cut from the left
  CHECK(reads(n, "w") == std::vector<std::string>{"a", "1'bx"});
  CHECK(reads(n, "1'bx") == std::vector<std::string>{"1'bx"});  // holds x: x in, x out
  CHECK(reads(n, "c[1]") == std::vector<std::string>{"a"});
}
