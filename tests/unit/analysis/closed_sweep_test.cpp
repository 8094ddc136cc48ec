// Closed loops under sweeps: deadlock verdicts, property tallies and gauge distributions against
// corner-by-corner runs.
#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <string>
#include <vector>

#include "parser/load.hpp"
#include "sim/analysis/sweep.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;

namespace {

// A sensor handshake whose acknowledge is a buffer with a delay range and
// whose environment answers each acknowledge edge after 80ps..160ps (our own
// scenario). `gate` replaces the buffer, e.g. by one that never acknowledges.
std::string handshake(const std::string& gate = "ack = buf(req) delay 30ps..90ps") {
  return "input  req\n"
         "output ack\n" +
         gate +
         "\n"
         "stimulus {\n"
         "    at 0ns req = 0\n"
         "    settle\n"
         "    after 1ns req = 1\n"
         "    when ack after 80ps..160ps : req = 0 times 5\n"
         "    when ~ack & ~req after 80ps..160ps : req = 1 times 5\n"
         "    gauge cycle = period of ack\n"
         "    gauge high = pulse of ack high\n"
         "    never ack & ~req\n"
         "    always req | ~ack\n"
         "    settle\n"
         "}\n";
}

design load_text(const std::string& text) {
  return settle::testing::load_text(text, "handshake.settle");
}

sweep_plan plan_of(const design& d, const std::string& spec) {
  std::string err;
  auto p = plan_sweep(spec, 3, delay_variables(d), &err);
  INFO(err);
  REQUIRE(p);
  return *p;
}

sweep_result sweep(const design& d, const sweep_plan& p, unsigned threads) {
  sweep_options o;
  o.threads = threads;
  return run_sweep(d, p, o);
}

}  // namespace

TEST_CASE("sweep gauges and properties equal the corners' own runs", "[sweep]") {
  const design d = load_text(handshake());
  const sweep_plan plan = plan_of(d, "extremes+random:60");
  const sweep_result r = sweep(d, plan, 2);
  REQUIRE(r.gauges.size() == 2);
  REQUIRE(r.properties.size() == 2);

  // Corner by corner, as `settle run --corner NAME` would see them.
  std::vector<double> means;
  time_fs lo = UINT64_MAX, hi = 0;
  std::uint64_t lo_at = 0, hi_at = 0, violating = 0, first = UINT64_MAX;
  delay_table t;
  for (std::uint64_t i = 0; i < plan.corners; ++i) {
    fill_delays(d, plan.corner_at(i), t);
    const run_result one = run_stimulus(d, t, run_options{});
    REQUIRE(one.gauges.size() == 2);
    const gauge_result& g = one.gauges[0];
    REQUIRE(g.count == 5);  // six acknowledge rises, one per request rise
    if (g.min < lo) lo = g.min, lo_at = i;
    if (g.max > hi) hi = g.max, hi_at = i;
    means.push_back(g.mean);
    if (!one.properties[0].holds) {
      ++violating;
      first = std::min(first, i);
    }
  }
  std::sort(means.begin(), means.end());
  const auto& g = r.gauges[0];
  CHECK(g.corners == plan.corners);
  CHECK(g.samples == 5 * plan.corners);
  CHECK(g.min == lo);
  CHECK(g.max == hi);
  CHECK(g.witness_min == lo_at);
  CHECK(g.witness_max == hi_at);
  CHECK(g.median == means[(means.size() - 1) / 2]);  // the lower median
  // Common practice: a four-phase cycle is two round trips through the
  // circuit and the environment, so it lies within 2 x (30 + 80)ps and
  // 2 x (90 + 160)ps whatever the draws.
  CHECK(g.min >= 220'000);
  CHECK(g.max <= 500'000);
  CHECK(r.properties[0].violating == violating);
  if (violating) CHECK(r.properties[0].witness == first);
  // ack lags req through a buffer: when req falls, ack stays 1 for the
  // buffer's delay, so both properties (one the De Morgan form of the
  // other) are violated in every corner.
  CHECK(r.properties[0].violating == plan.corners);
  CHECK(r.properties[1].violating == plan.corners);
  CHECK(!r.pass());
}

TEST_CASE("sweep closed-loop figures do not depend on the thread count", "[sweep]") {
  const design d = load_text(handshake());
  const sweep_plan plan = plan_of(d, "extremes+random:200");
  const sweep_result one = sweep(d, plan, 1), two = sweep(d, plan, 2), three = sweep(d, plan, 3);
  for (const sweep_result* r : {&two, &three}) {
    REQUIRE(r->gauges.size() == one.gauges.size());
    for (std::size_t k = 0; k < one.gauges.size(); ++k) {
      const auto &a = one.gauges[k], &b = r->gauges[k];
      CHECK(a.min == b.min);
      CHECK(a.max == b.max);
      CHECK(a.median == b.median);
      CHECK(a.witness_min == b.witness_min);
      CHECK(a.witness_max == b.witness_max);
      CHECK(a.samples == b.samples);
    }
    for (std::size_t k = 0; k < one.properties.size(); ++k) {
      CHECK(one.properties[k].violating == r->properties[k].violating);
      CHECK(one.properties[k].witness == r->properties[k].witness);
      CHECK(one.properties[k].first_violation == r->properties[k].first_violation);
    }
  }
}

TEST_CASE("a sweep where every corner deadlocks has the verdict deadlock and names the owed rules",
          "[sweep]") {
  const design d = load_text(handshake("ack = and(req, 0) delay 30ps..90ps"));
  const sweep_plan plan = plan_of(d, "extremes+random:20");
  const sweep_result r = sweep(d, plan, 2);
  REQUIRE(r.steps.size() == 2);
  const auto& st = r.steps[1];
  CHECK(st.verdict == sweep_verdict::deadlock);
  CHECK(std::string(verdict_name(st.verdict)) == "deadlock");
  CHECK_FALSE(st.pass);
  CHECK_FALSE(st.first_divergence);
  REQUIRE_FALSE(st.outcomes.empty());
  for (const auto& o : st.outcomes) {
    CHECK(o.status == step_status::deadlock);
    REQUIRE(o.owed.size() == 2);
    CHECK(o.owed[0].fired == 0);
    CHECK(o.owed[0].times == 5);
  }
  CHECK(r.gauges[0].corners == 0);  // the acknowledge never rises
  CHECK(!r.pass());
}
