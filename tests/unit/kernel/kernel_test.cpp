// The kernel against circuit facts: ring periods, latches, inertial versus transport delay.
#include <catch2/catch.hpp>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/netlist_builder.hpp"
#include "tests/unit/random_circuits.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic O = logic::zero, I = logic::one, X = logic::x;

run_result run_at(const design& d, corner::kind k = corner::kind::typ, run_options opt = {}) {
  delay_table t;
  corner c;
  c.what = k;
  fill_delays(d, c, t);
  return run_stimulus(d, t, opt);
}

logic value(const run_result& r, const design& d, std::size_t step, const std::string& net) {
  const net_id n = d.nets.find(net);
  for (std::size_t i = 0; i < r.reported.size(); ++i)
    if (r.reported[i] == n) return r.steps.at(step).values[i];
  FAIL("net not reported: " << net);
  return X;
}

// A ring of `stages` inverting stages behind an enabling NAND.
design ring(int stages, std::vector<time_fs> delays) {
  builder b;
  b.input("en");
  b.gate(gate_kind::nand, "s0", {"en", "s" + std::to_string(stages - 1)}, fixed(delays[0]));
  for (int i = 1; i < stages; ++i)
    b.gate(gate_kind::inv, "s" + std::to_string(i), {"s" + std::to_string(i - 1)},
           fixed(delays[i]));
  b.output("s0");
  b.at(0, {{"en", O}}).settle();
  b.after(1000 * ps, {{"en", I}}).settle();
  return b.finish();
}

}  // namespace

// Common practice: a ring of N (odd) inverting stages oscillates with period
// 2 x the sum of its stage delays.
TEST_CASE("odd rings oscillate with period twice the sum of their stage delays", "[kernel]") {
  for (int n : {3, 5, 7}) {
    std::vector<time_fs> d;
    time_fs sum = 0;
    for (int i = 0; i < n; ++i) d.push_back((20 + 7 * i) * ps), sum += d.back();
    design des = ring(n, d);
    auto r = run_at(des);
    REQUIRE(r.steps.size() == 2);
    CHECK(r.steps[0].status == step_status::settled);
    CHECK(r.steps[1].status == step_status::oscillating);
    CHECK(r.steps[1].period == 2 * sum);
    CHECK(r.steps[1].toggling.size() == static_cast<std::size_t>(n));
    CHECK_FALSE(r.pass());
  }
}

// The same fact with a stage of 5 us: delays of 2^32 fs (about 4.3 us) and
// more take the kernel's wide-delay path, which must give the same periods.
TEST_CASE("a ring with a stage delay beyond 2^32 fs keeps period twice the sum", "[kernel]") {
  const std::vector<time_fs> d = {5'000'000 * ps, 20 * ps, 31 * ps};
  REQUIRE(d[0] > time_fs{0xffffffff});
  design des = ring(3, d);
  auto r = run_at(des);
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[1].status == step_status::oscillating);
  CHECK(r.steps[1].period == 2 * (d[0] + d[1] + d[2]));
}

// Derived from the ring fact with separate edges: T = sum of (rise + fall).
TEST_CASE("a ring with different rise and fall delays has period sum(rise + fall)", "[kernel]") {
  builder b;
  b.input("en");
  b.gate_rf(gate_kind::nand, "a", {"en", "c"}, fixed(30 * ps), fixed(20 * ps));
  b.gate_rf(gate_kind::inv, "b", {"a"}, fixed(25 * ps), fixed(15 * ps));
  b.gate_rf(gate_kind::inv, "c", {"b"}, fixed(40 * ps), fixed(10 * ps));
  b.output("a");
  b.at(0, {{"en", O}}).settle().after(1000 * ps, {{"en", I}}).settle();
  design d = b.finish();
  auto r = run_at(d);
  CHECK(r.steps[1].status == step_status::oscillating);
  CHECK(r.steps[1].period == (30 + 20 + 25 + 15 + 40 + 10) * ps);
}

// Common practice: one inverting gate and one buffer in a loop oscillate with
// period 2 x (inverting delay + buffer delay).
TEST_CASE("an inverter and a buffer in a loop oscillate with period 2(d_inv + d_buf)", "[kernel]") {
  builder b;
  b.input("en");
  b.gate(gate_kind::nand, "n", {"en", "m"}, fixed(33 * ps));
  b.gate(gate_kind::buf, "m", {"n"}, fixed(12 * ps));
  b.output("n");
  b.at(0, {{"en", O}}).settle().after(500 * ps, {{"en", I}}).settle();
  design d = b.finish();
  auto r = run_at(d);
  CHECK(r.steps[1].status == step_status::oscillating);
  CHECK(r.steps[1].period == 2 * (33 + 12) * ps);
}

// Handbook behaviour of set/reset latches of NAND (active-low) and NOR gates.
TEST_CASE("NAND and NOR set/reset latches set, reset and hold", "[kernel]") {
  SECTION("NAND latch") {
    builder b;
    b.input("s_n"), b.input("r_n");
    b.gate(gate_kind::nand, "q", {"s_n", "qn"}, range(35 * ps, 55 * ps));
    b.gate(gate_kind::nand, "qn", {"r_n", "q"}, range(35 * ps, 55 * ps));
    b.output("q"), b.output("qn");
    b.at(0, {{"s_n", O}, {"r_n", I}}).settle();  // set
    b.after(1000 * ps, {{"s_n", I}}).settle();   // hold
    b.after(1000 * ps, {{"r_n", O}}).settle();   // reset
    b.after(1000 * ps, {{"r_n", I}}).settle();   // hold
    design d = b.finish();
    for (auto k : {corner::kind::min, corner::kind::typ, corner::kind::max}) {
      auto r = run_at(d, k);
      REQUIRE(r.steps.size() == 4);
      for (const auto& s : r.steps) CHECK(s.status == step_status::settled);
      CHECK(value(r, d, 0, "q") == I);
      CHECK(value(r, d, 0, "qn") == O);
      CHECK(value(r, d, 1, "q") == I);
      CHECK(value(r, d, 2, "q") == O);
      CHECK(value(r, d, 2, "qn") == I);
      CHECK(value(r, d, 3, "q") == O);
    }
  }
  SECTION("NOR latch") {
    builder b;
    b.input("s"), b.input("r");
    b.gate(gate_kind::nor, "q", {"r", "qn"}, fixed(40 * ps));
    b.gate(gate_kind::nor, "qn", {"s", "q"}, fixed(45 * ps));
    b.output("q"), b.output("qn");
    b.at(0, {{"s", I}, {"r", O}}).settle();
    b.after(1000 * ps, {{"s", O}}).settle();
    b.after(1000 * ps, {{"r", I}}).settle();
    b.after(1000 * ps, {{"r", O}}).settle();
    design d = b.finish();
    auto r = run_at(d);
    CHECK(value(r, d, 0, "q") == I);
    CHECK(value(r, d, 1, "q") == I);
    CHECK(value(r, d, 2, "q") == O);
    CHECK(value(r, d, 2, "qn") == I);
    CHECK(value(r, d, 3, "qn") == I);
    CHECK(r.steps[0].settle == 85 * ps);  // s rises: qn falls after 45ps, then q rises after 40ps
  }
}

// Common practice (the ideal model of metastability): two cross-coupled NANDs
// with equal delays released together switch together and keep switching,
// period 2 x the gate delay (METHODS.md §7, derived).
TEST_CASE("a NAND latch released from (0,0) with equal delays oscillates with period 2d",
          "[kernel]") {
  builder b;
  b.input("s_n"), b.input("r_n");
  b.gate(gate_kind::nand, "q", {"s_n", "qn"}, fixed(40 * ps));
  b.gate(gate_kind::nand, "qn", {"r_n", "q"}, fixed(40 * ps));
  b.output("q"), b.output("qn");
  b.at(0, {{"s_n", O}, {"r_n", O}}).settle();
  b.after(1000 * ps, {{"s_n", I}, {"r_n", I}}).settle();
  design d = b.finish();
  auto r = run_at(d);
  CHECK(value(r, d, 0, "q") == I);
  CHECK(value(r, d, 0, "qn") == I);
  CHECK(r.steps[1].status == step_status::oscillating);
  CHECK(r.steps[1].period == 80 * ps);
}

// Inertial delay swallows a pulse shorter than the delay; transport delay
// propagates every change (IEEE 1364-2005 §7.14 delay semantics; common practice).
TEST_CASE("inertial gates reject short pulses, transport gates propagate them", "[kernel]") {
  for (bool transport : {false, true}) {
    builder b;
    b.input("a");
    b.gate(gate_kind::buf, "y", {"a"}, fixed(50 * ps), transport);
    b.output("y");
    b.at(0, {{"a", O}}).settle();
    b.at(1000 * ps, {{"a", I}}).after(20 * ps, {{"a", O}}).settle();  // 20ps pulse < 50ps
    b.at(2000 * ps, {{"a", I}}).after(80 * ps, {{"a", O}}).settle();  // 80ps pulse > 50ps
    design d = b.finish();
    auto r = run_at(d);
    REQUIRE(r.steps.size() == 3);
    CHECK(r.steps[1].transitions[0] == (transport ? 2u : 0u));
    CHECK(r.steps[2].transitions[0] == 2u);
    CHECK(r.steps[2].settle == 130 * ps);
    CHECK(value(r, d, 2, "y") == O);
  }
}

TEST_CASE("a pulse exactly as long as the inertial delay propagates", "[kernel]") {
  // The change scheduled at t + d matures at the instant the input returns;
  // changes due at one instant take effect before the gates they feed are
  // evaluated, so the pulse passes (METHODS.md §2: fix and test width = d).
  builder b;
  b.input("a");
  b.gate(gate_kind::buf, "y", {"a"}, fixed(50 * ps));
  b.output("y");
  b.at(0, {{"a", O}}).settle();
  b.at(1000 * ps, {{"a", I}}).after(50 * ps, {{"a", O}}).settle();
  design d = b.finish();
  auto r = run_at(d);
  CHECK(r.steps[1].transitions[0] == 2u);
}

TEST_CASE("gates start at x and the initial evaluation resolves them", "[kernel]") {
  builder b;
  b.input("a");
  b.gate(gate_kind::inv, "y", {"a"}, fixed(10 * ps));
  b.gate(gate_kind::and_, "z", {"a", "0"}, fixed(10 * ps));
  b.output("y"), b.output("z");
  b.at(500 * ps, {{"a", I}}).settle();
  design d = b.finish();
  auto r = run_at(d);
  CHECK(value(r, d, 0, "y") == O);
  CHECK(value(r, d, 0, "z") == O);  // and(x, 0) = 0 already at time 0 + 10ps
  CHECK(r.steps[0].start == 500 * ps);
  CHECK(r.steps[0].settle == 10 * ps);
}

TEST_CASE("horizon and event limits end a step with a finding", "[kernel]") {
  std::vector<time_fs> d(5, 10 * ps);
  design des = ring(5, d);
  run_options opt;
  opt.max_events = 8;
  auto r = run_at(des, corner::kind::typ, opt);
  CHECK(r.steps.back().status == step_status::event_limit);
  CHECK(r.events >= 8);
  CHECK_FALSE(r.pass());
  run_options short_horizon;
  short_horizon.horizon = 60 * ps;  // less than one period (100ps): no repeat can be seen
  auto t = run_at(des, corner::kind::typ, short_horizon);
  CHECK(t.steps.back().status == step_status::timeout);
  CHECK(t.steps.back().end == t.steps.back().start + 60 * ps);
}

TEST_CASE("clocks drive inputs and run steps advance time", "[kernel]") {
  builder b;
  b.input("ck");
  b.gate(gate_kind::inv, "y", {"ck"}, fixed(5 * ps));
  b.output("y");
  b.clock("ck", 100 * ps, 30 * ps, 3).run(1000 * ps);
  design d = b.finish();
  auto r = run_at(d);
  REQUIRE(r.steps.size() == 1);
  // Six edges: the first rise takes y from x to 0, the other five toggle it.
  CHECK(r.steps[0].transitions[0] == 6u);
  CHECK(r.steps[0].status == step_status::settled);
}

TEST_CASE("corner names print and parse back; extremes follow their formula", "[corner]") {
  for (const char* s :
       {"min", "typ", "max", "random:7#3", "gauss:11#0", "extremes#4", "exhaustive#5", "max@0.5"}) {
    std::string err;
    auto c = parse_corner(s, &err);
    REQUIRE(c);
    CHECK(c->name() == s);
  }
  std::string err;
  CHECK_FALSE(parse_corner("fast", &err));
  CHECK(err.find("expected min, typ, max") != std::string::npos);

  builder b;
  b.input("a");
  b.gate(gate_kind::buf, "p", {"a"}, {10, 15, 20});
  b.gate(gate_kind::buf, "q", {"p"}, {100, 150, 200});
  design d = b.finish();
  delay_table t;
  corner c;
  c.what = corner::kind::extremes;
  c.index = 3;  // gate 0 at max, others at min
  fill_delays(d, c, t);
  CHECK(t.rise == std::vector<time_fs>{20, 100});
  c.index = 4;  // gate 0 at min, others at max
  fill_delays(d, c, t);
  CHECK(t.rise == std::vector<time_fs>{10, 200});
  c.what = corner::kind::random;
  c.seed = 5;
  delay_table t2;
  fill_delays(d, c, t);
  fill_delays(d, c, t2);
  CHECK(t.rise == t2.rise);
  for (int g = 0; g < 2; ++g)
    CHECK((t.rise[g] >= d.nets.delay[g].rise.min && t.rise[g] <= d.nets.delay[g].rise.max));
}

namespace {

// Counts the changes a run reports (a trace sink, so the run takes the
// kernel's general loop).
class counting_sink final : public change_sink {
 public:
  std::uint64_t changes = 0;
  void on_start(std::span<const logic>) override {}
  void on_changes(std::span<const change> batch) override { changes += batch.size(); }
  void on_finish(time_fs) override {}
};

}  // namespace

// A consistency check of the kernel against itself: without a trace it
// evaluates table gates by precomputed steps and queues without branches on
// the outcome; with one it takes the general path. Both must give the same
// run. random_feedback_circuit is a seeded generator of small feedback
// circuits (invented data, tests only) mixing table gates with majority and
// multiplexer gates, under random corners whose rise and fall delays differ;
// every other one starts its gates at x, so changes from x (which take the
// shorter delay) occur too.
TEST_CASE("runs with and without a trace agree on random feedback circuits", "[kernel][property]") {
  std::uint64_t events = 0;
  for (std::uint64_t seed = 1; seed <= 300; ++seed) {
    design d = testing::random_feedback_circuit(seed, 3 + static_cast<int>(seed % 10));
    if (seed % 2)
      for (gate_id g = 0; g < d.nets.gate_count(); ++g) d.nets.init[d.nets.gate_out[g]] = X;
    std::string error;
    const auto c = parse_corner("random:" + std::to_string(seed), &error);
    REQUIRE(c);
    delay_table t;
    fill_delays(d, *c, t);
    counting_sink sink;
    const run_result traced = run_stimulus(d, t, run_options{}, &sink);
    const run_result plain = run_stimulus(d, t, run_options{});
    INFO("seed " << seed);
    REQUIRE(plain.events == traced.events);
    CHECK(sink.changes == traced.events);
    CHECK(plain.end == traced.end);
    REQUIRE(plain.steps.size() == traced.steps.size());
    for (std::size_t i = 0; i < plain.steps.size(); ++i) {
      CHECK(plain.steps[i].status == traced.steps[i].status);
      CHECK(plain.steps[i].settle == traced.steps[i].settle);
      CHECK(plain.steps[i].values == traced.steps[i].values);
      CHECK(plain.steps[i].transitions == traced.steps[i].transitions);
    }
    events += plain.events;
  }
  CHECK(events > 3000);  // not vacuous
}
