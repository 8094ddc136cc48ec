// Ternary simulation (Eichelberger 1965, algorithms A and B) on small circuits with known answers.
#include "sim/analysis/ternary.hpp"

#include <catch2/catch.hpp>

#include "tests/unit/netlist_builder.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic L0 = logic::zero, L1 = logic::one, LX = logic::x;

// Per-net start vector from the design's init values (inputs included).
std::vector<logic> start_of(const design& d) { return d.nets.init; }

logic at(const design& d, const std::vector<logic>& v, const char* name) {
  return v[d.nets.find(name)];
}

// NOR set/reset latch: q = nor(r, q_n), q_n = nor(s, q), held at s = r = 1 (q = q_n = 0).
design nor_latch_held() {
  builder b;
  b.input("s");
  b.input("r");
  b.gate(gate_kind::nor, "q", {"r", "q_n"}, range(30 * ps, 50 * ps));
  b.gate(gate_kind::nor, "q_n", {"s", "q"}, range(30 * ps, 50 * ps));
  b.output("q");
  b.output("q_n");
  for (auto [n, v] : {std::pair{"s", L1}, {"r", L1}, {"q", L0}, {"q_n", L0}}) b.init(n, v);
  return b.finish();
}

}  // namespace

TEST_CASE("NOR latch released from (1,1) to (0,0) leaves both outputs x", "[ternary]") {
  // METHODS.md section 3, derived check: yA = yB = (x, x) on the simultaneous release.
  design d = nor_latch_held();
  const assignment release[] = {{d.nets.find("s"), L0}, {d.nets.find("r"), L0}};
  auto r = ternary_change(d.nets, start_of(d), release);
  CHECK(at(d, r.after_a, "q") == LX);
  CHECK(at(d, r.after_a, "q_n") == LX);
  CHECK(at(d, r.after_b, "q") == LX);
  CHECK(at(d, r.after_b, "q_n") == LX);
  CHECK_FALSE(r.settled_binary(d.nets));
}

TEST_CASE("NOR latch released on one input settles binary", "[ternary]") {
  // METHODS.md section 3, derived check: releasing only S gives yB = (Q, Q_n) = (0, 1).
  design d = nor_latch_held();
  const assignment release_s[] = {{d.nets.find("s"), L0}};
  auto r = ternary_change(d.nets, start_of(d), release_s);
  CHECK(at(d, r.after_b, "q") == L0);
  CHECK(at(d, r.after_b, "q_n") == L1);
  CHECK(r.settled_binary(d.nets));
  // Releasing R instead sets the latch (handbook behaviour).
  const assignment release_r[] = {{d.nets.find("r"), L0}};
  auto t = ternary_change(d.nets, start_of(d), release_r);
  CHECK(at(d, t.after_b, "q") == L1);
  CHECK(at(d, t.after_b, "q_n") == L0);
}

TEST_CASE("a static hazard shows as x after A and the old value after B", "[ternary]") {
  // METHODS.md section 3: yA = x with yB = b flags a possible static hazard.
  // out = and(a, a_n), a_n = not(a): a rising can pulse out high.
  builder b;
  b.input("a");
  b.gate(gate_kind::inv, "a_n", {"a"}, fixed(20 * ps));
  b.gate(gate_kind::and_, "out", {"a", "a_n"}, fixed(20 * ps));
  b.output("out");
  for (auto [n, v] : {std::pair{"a", L0}, {"a_n", L1}, {"out", L0}}) b.init(n, v);
  design d = b.finish();
  const assignment rise[] = {{d.nets.find("a"), L1}};
  auto r = ternary_change(d.nets, start_of(d), rise);
  CHECK(at(d, r.after_a, "out") == LX);
  CHECK(at(d, r.after_b, "out") == L0);
  CHECK(at(d, r.after_b, "a_n") == L0);
}

TEST_CASE("six-NAND D flip-flop: on a clock rise with D steady, Q takes D", "[ternary]") {
  // METHODS.md section 7 netlist (the TTL '74 logic without preset/clear, from memory);
  // section 3 derived check: yB is binary with Q = D.
  for (logic dval : {L0, L1}) {
    builder b;
    b.input("clk");
    b.input("d");
    const auto r = range(30 * ps, 50 * ps);
    b.gate(gate_kind::nand, "n1", {"n4", "n2"}, r);
    b.gate(gate_kind::nand, "n2", {"n1", "clk"}, r);
    b.gate(gate_kind::nand, "n3", {"n2", "clk", "n4"}, r);
    b.gate(gate_kind::nand, "n4", {"n3", "d"}, r);
    b.gate(gate_kind::nand, "q", {"n2", "q_n"}, r);
    b.gate(gate_kind::nand, "q_n", {"n3", "q"}, r);
    b.output("q");
    // Stable with clk = 0: n2 = n3 = 1, n4 = not d, n1 = d; Q holds the opposite of D.
    const logic nd = dval == L1 ? L0 : L1;
    for (auto [n, v] : {std::pair{"clk", L0},
                        {"d", dval},
                        {"n1", dval},
                        {"n2", L1},
                        {"n3", L1},
                        {"n4", nd},
                        {"q", nd},
                        {"q_n", dval}})
      b.init(n, v);
    design dd = b.finish();
    const assignment clk_rise[] = {{dd.nets.find("clk"), L1}};
    auto t = ternary_change(dd.nets, start_of(dd), clk_rise);
    CHECK(t.settled_binary(dd.nets));
    CHECK(at(dd, t.after_b, "q") == dval);
    CHECK(at(dd, t.after_b, "q_n") == nd);
  }
}

TEST_CASE("an enabled three-stage ring goes x everywhere", "[ternary]") {
  // METHODS.md section 3, derived check: NAND-enabled 3-ring, en 0 -> 1, every node x.
  builder b;
  b.input("en");
  b.gate(gate_kind::nand, "r1", {"en", "r3"}, fixed(20 * ps));
  b.gate(gate_kind::inv, "r2", {"r1"}, fixed(20 * ps));
  b.gate(gate_kind::inv, "r3", {"r2"}, fixed(20 * ps));
  b.output("r3");
  for (auto [n, v] : {std::pair{"en", L0}, {"r1", L1}, {"r2", L0}, {"r3", L1}}) b.init(n, v);
  design d = b.finish();
  const assignment enable[] = {{d.nets.find("en"), L1}};
  auto r = ternary_change(d.nets, start_of(d), enable);
  for (const char* n : {"r1", "r2", "r3"}) CHECK(at(d, r.after_b, n) == LX);
}

TEST_CASE("a C-element holds through disagreeing inputs in ternary simulation", "[ternary]") {
  // Muller and Bartky 1959: the C-element holds while its inputs disagree.
  builder b;
  b.input("a");
  b.input("b");
  b.gate(gate_kind::celem, "c", {"a", "b"}, fixed(20 * ps));
  b.output("c");
  for (auto [n, v] : {std::pair{"a", L0}, {"b", L0}, {"c", L0}}) b.init(n, v);
  design d = b.finish();
  const assignment a_up[] = {{d.nets.find("a"), L1}};
  auto r = ternary_change(d.nets, start_of(d), a_up);
  CHECK(at(d, r.after_a, "c") == L0);  // never moves: every resolution holds 0
  CHECK(at(d, r.after_b, "c") == L0);
  const assignment both_up[] = {{d.nets.find("a"), L1}, {d.nets.find("b"), L1}};
  auto t = ternary_change(d.nets, start_of(d), both_up);
  CHECK(at(d, t.after_a, "c") == LX);
  CHECK(at(d, t.after_b, "c") == L1);
}
