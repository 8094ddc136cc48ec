// The .settle writer: quoted names, rise/fall, transport, every gate kind and an x init read back.
#include "waves/emit.hpp"

#include <catch2/catch.hpp>

#include "parser/parse.hpp"
#include "tests/unit/load_design.hpp"

namespace settle {
namespace {

// The netlist's gates as (name, kind, fan-in names, delay, program): equal for a faithful copy.
bool same_gates(const netlist& a, const netlist& b) {
  if (a.gate_count() != b.gate_count() || a.net_count() != b.net_count()) return false;
  for (gate_id g = 0; g < a.gate_count(); ++g) {
    const gate_id h = b.driver[b.find(a.gate_name(g))];
    if (h == no_id || a.kind[g] != b.kind[h] || !(a.delay[g] == b.delay[h])) return false;
    if (a.fanin_begin[g + 1] - a.fanin_begin[g] != b.fanin_begin[h + 1] - b.fanin_begin[h])
      return false;
    for (auto i = a.fanin_begin[g], j = b.fanin_begin[h]; i < a.fanin_begin[g + 1]; ++i, ++j)
      if (a.net_name[a.fanin[i]] != b.net_name[b.fanin[j]]) return false;
    if (!std::equal(a.code.begin() + a.code_begin[g], a.code.begin() + a.code_begin[g + 1],
                    b.code.begin() + b.code_begin[h], b.code.begin() + b.code_begin[h + 1]))
      return false;
  }
  for (net_id k = 2; k < a.net_count(); ++k)
    if (b.find(a.net_name[k]) == no_id || a.init[k] != b.init[b.find(a.net_name[k])]) return false;
  return true;
}

// Every gate kind of the language (parser/LANGUAGE.md, "Gates"), rise/fall, transport,
// three-time ranges and an x init; the delays are exact to the femtosecond.
constexpr const char* every_kind = R"(
input a, b, c, d
output q1, q2, q3, q4, q5, q6, q7, q8, q9, q10, q11, q12, q13, q14
q1 = not(a) delay 1fs
q2 = buf(b) rise 10ps fall 12.345ps
q3 = and(a, b, 1) delay 30ps..40ps
q4 = nand(a, b) delay 30ps..31ps..40ps transport
q5 = or(a, 0) delay 1.000001ns
q6 = nor(a, b, c) delay 5ps
q7 = xor(a, b) delay 5ps
q8 = xnor(a, b) delay 5ps
q9 = mux(a, b, c) delay 5ps
q10 = maj(a, b, c) delay 5ps
q11 = c(a, b) delay 60ps..90ps
q12 = gc(set: a & b, reset: ~a & ~(b | c)) delay 70ps
q13 = ~(a & b | c & d) ^ (a | b) & ~c delay 45ps..65ps
q14 = a | (b | c) delay 1ps
init q11 = x, q12 = 1
)";

TEST_CASE("emit: every gate kind, rise/fall, transport and exact delays read back", "[emit]") {
  const auto d = testing::load_text(every_kind, "k.settle");
  const auto e = settle_text(d, "settle test");
  INFO(e.text);
  REQUIRE(e.error.empty());
  const auto back = testing::load_text(e.text, "back.settle");
  CHECK(same_gates(d.nets, back.nets));
  CHECK(e.text.find("rise 10ps fall 12.345ps") != std::string::npos);
  CHECK(e.text.find("delay 30ps..31ps..40ps transport") != std::string::npos);
}

// ISCAS-style names (tests/data/iscas/SOURCE.md: nets are numbers) need the quoted form, and a
// quoted "1" is a net, not the constant 1.
TEST_CASE("emit: names that are no identifier are quoted and read back", "[emit]") {
  load_options bench;
  bench.format = "bench";
  diagnostics diags;
  auto loaded = load_design_text(R"(INPUT(1)
INPUT(2)
OUTPUT(22)
22 = NAND(1, 2)
)",
                                 "n.bench", bench, diags);
  REQUIRE(loaded);
  const auto& d = *loaded;
  const auto e = settle_text(d, "settle test");
  INFO(e.text);
  CHECK(e.text.find("\"22\" = nand(\"1\", \"2\")") != std::string::npos);
  const auto back = testing::load_text(e.text, "back.settle");
  CHECK(same_gates(d.nets, back.nets));
  CHECK(back.nets.fanin[back.nets.fanin_begin[0]] > netlist::const1);
}

TEST_CASE("emit: blocks are rebuilt from the scopes", "[emit]") {
  const auto d = testing::load_text(R"(
block stage(in req, ack; out done) {
    wire ack_n
    ack_n = not(ack) delay 50ps..80ps
    done  = c(req, ack_n) delay 60ps..90ps
}
input r, a
output d1, d2
inst s0 stage(req: r, ack: a, done: d1)
inst s1 stage(req: d1, ack: a, done: d2)
init d1 = 0, s0.ack_n = 1
)",
                                    "h.settle");
  const auto e = settle_text(d, "settle test");
  INFO(e.text);
  CHECK_FALSE(e.flat);
  const auto back = testing::load_text(e.text, "back.settle");
  CHECK(back.nets.blocks == 1);
  CHECK(back.nets.instances == 2);
  CHECK(same_gates(d.nets, back.nets));
}

// The writer's list of reserved words is the parser's (waves/ may not include the parser).
TEST_CASE("emit: reserved words are the parser's", "[emit]") {
  for (const char* w : {"input",     "output", "wire", "default", "delay",    "rise",   "fall",
                        "transport", "block",  "inst", "init",    "stimulus", "at",     "after",
                        "clock",     "settle", "run",  "expect",  "watch",    "when",   "always",
                        "never",     "gauge",  "not",  "c",       "period",   "stable", "q"})
    CHECK(settle_identifier(w) == !grammar::is_reserved_word(w));
}

}  // namespace
}  // namespace settle
