// Pin-to-pin delays in the kernel: a change caused by fan-in k takes arc k's delay, and when
// several fan-ins change at one instant, the largest of their arcs.
#include <catch2/catch.hpp>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/netlist_builder.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic O = logic::zero, I = logic::one;

run_result run_typ(const design& d) {
  delay_table t;
  corner c;
  c.what = corner::kind::typ;
  fill_delays(d, c, t);
  return run_stimulus(d, t, run_options{});
}

// A panel-switch debouncer's vote gate: y = and(a, b), arc a 30 ps, arc b 70 ps. The gate's
// own delay (10 ps) is replaced by the arcs' envelope, so it times nothing here.
design vote_gate(bool both_at_once) {
  builder b;
  b.input("a");
  b.input("b");
  b.output("y");
  const gate_id g = b.gate(gate_kind::and_, "y", {"a", "b"}, fixed(10 * ps));
  design d0 = [&] {
    b.at(0, {{"a", O}, {"b", O}}).settle();
    if (both_at_once) {
      b.after(1000 * ps, {{"a", I}, {"b", I}}).settle();
    } else {
      b.after(1000 * ps, {{"b", I}}).settle();
      b.after(1000 * ps, {{"a", I}}).settle();
    }
    return b.finish();
  }();
  // Built after finish() so that the arc index covers every gate (netlist::set_arcs).
  const gate_delay arcs[] = {{fixed(30 * ps), fixed(30 * ps)}, {fixed(70 * ps), fixed(70 * ps)}};
  d0.nets.set_arcs(g, arcs);
  return d0;
}

}  // namespace

TEST_CASE("arcs: two inputs changing at one instant take the larger of their arcs", "[kernel]") {
  // The rule of the issue (sim/kernel/simulator.cpp, arc_delay_of): an output change caused by
  // several fan-ins changing together waits for the slowest of their arcs; common practice for
  // pin-to-pin delays (the output cannot move before the latest input's path has finished).
  const design d = vote_gate(true);
  REQUIRE(d.nets.has_arcs(0));
  const run_result r = run_typ(d);
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[1].settle == 70 * ps);
  CHECK(r.steps[1].values.at(0) == I);
}

TEST_CASE("arcs: a change of one input takes that input's arc", "[kernel]") {
  const design d = vote_gate(false);
  const run_result r = run_typ(d);
  REQUIRE(r.steps.size() == 3);
  // b rises alone: and(0, 1) stays 0, nothing changes.
  CHECK(r.steps[1].settle == 0);
  // a rises: the output follows after arc a's 30 ps, not b's 70 ps nor the envelope.
  CHECK(r.steps[2].settle == 30 * ps);
  CHECK(r.steps[2].values.at(0) == I);
}
