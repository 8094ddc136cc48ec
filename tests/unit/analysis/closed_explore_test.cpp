// Exploration of closed systems (circuit and reaction rules) and the timed
// check of its paths by difference constraints.
#include <catch2/catch.hpp>

#include "sim/analysis/explore.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

explore_result explore_ok(const design& d, explore_model m = explore_model::gmw) {
  explore_options o;
  o.model = m;
  std::string err;
  auto r = explore_design(d, o, &err);
  INFO(err);
  REQUIRE(r);
  return std::move(*r);
}

// Runs the design at a corner name explore printed.
run_result run_at(const design& d, const std::string& name) {
  std::string err;
  auto c = parse_corner(name, &err);
  INFO(name << ": " << err);
  REQUIRE(c);
  REQUIRE(corner_design_error(d, *c).empty());
  delay_table t;
  fill_delays(d, *c, t);
  return run_stimulus(d, t, run_options{});
}

// A request line fans out to a fast and a slow buffer; `pass` is high while
// the fast copy has arrived and the slow one has not yet been inverted. The
// window is 10ps after the request (fast buffer) until 55ps..65ps (slow buffer
// plus inverter), so it lasts 45ps to 55ps.
std::string window_design(const std::string& pass_delay) {
  return "input req\noutput pass\nwire fast, slow, slow_n\n"
         "fast = buf(req) delay 10ps\n"
         "slow = buf(req) delay 50ps..60ps\n"
         "slow_n = not(slow) delay 5ps\n"
         "pass = and(fast, slow_n) delay " +
         pass_delay +
         "\n"
         "init fast = 0, slow = 0, slow_n = 1, pass = 0\n"
         "stimulus {\n  at 0ns req = 0\n  never pass\n  settle\n  after 1ns req = 1\n  settle\n}\n";
}

}  // namespace

TEST_CASE("an inertial gate slower than its input pulse cannot follow the untimed path",
          "[explore][closed]") {
  // Under unbounded delays `pass` may rise whatever its delay. In time, an
  // inertial gate swallows a pulse shorter than its delay (common practice:
  // the inertial delay model), so with 100ps against a window of at most 55ps
  // no delays give the violation, and with 20ps..30ps some do.
  SECTION("100ps: infeasible, and proved so") {
    const design d = load_text(window_design("100ps"), "window.settle");
    const auto r = explore_ok(d);
    REQUIRE(r.steps.size() == 2);
    const auto& p = r.steps[1].properties.at(0);
    CHECK_FALSE(p.holds);
    CHECK_FALSE(p.timed.feasible);
    CHECK(p.timed.exact);
  }
  SECTION("20ps..30ps: feasible, and the corner replays the violation") {
    const design d = load_text(window_design("20ps..30ps"), "window.settle");
    const auto r = explore_ok(d);
    const auto& p = r.steps[1].properties.at(0);
    CHECK_FALSE(p.holds);
    REQUIRE(p.timed.feasible);
    CHECK(p.timed.confirmed);
    const run_result run = run_at(d, p.timed.corner);
    REQUIRE(run.properties.size() == 1);
    CHECK_FALSE(run.properties[0].holds);
    CHECK(run.properties[0].step == 2);
  }
}

namespace {

// A sensor's four-phase handshake with a one-gate place: the acknowledge is
// the request delayed, or (the bug) the inverted request, which answers a
// request that was never made and then waits for ever.
std::string handshake(const std::string& gate) {
  return "input req\noutput ack\nack = " + gate +
         "(req) delay 20ps..40ps\ninit ack = 0\n"
         "stimulus {\n  at 0ns req = 0\n  settle\n"
         "  when ~ack & ~req after 100ps..200ps : req = 1 times 3\n"
         "  when ack & req after 100ps..200ps : req = 0 times 3\n"
         "  settle\n  expect ack = 0\n}\n";
}

}  // namespace

TEST_CASE("a four-phase handshake completes its cycles; a wrong polarity deadlocks",
          "[explore][closed]") {
  for (auto m : {explore_model::gmw, explore_model::single}) {
    INFO((m == explore_model::gmw ? "gmw" : "single"));
    {
      // Common practice (four-phase protocol): req+ ack+ req- ack-, three times,
      // then the rules are spent and everything rests at 0.
      const design d = load_text(handshake("buf"), "good.settle");
      const auto r = explore_ok(d, m);
      const auto& s = r.steps.at(1);
      CHECK(s.complete);
      CHECK(s.deadlocks.empty());
      CHECK(s.nonpersistent.empty());
      REQUIRE(s.stable.size() == 1);
      CHECK(s.stable[0].gates == std::vector<std::uint8_t>{0});
      CHECK(r.pass());
    }
    {
      // With an inverter the acknowledge is already 1 when the request is 0:
      // `~ack & ~req` never holds and `ack & req` cannot until a request comes.
      const design d = load_text(handshake("not"), "bad.settle");
      const auto r = explore_ok(d, m);
      CHECK_FALSE(r.pass());
      const auto& s = r.steps.at(1);
      REQUIRE(s.deadlocks.size() == 1);
      const auto& dl = s.deadlocks[0];
      REQUIRE(dl.owed_rules.size() == 2);
      CHECK(dl.owed_rules[0].fired == 0);
      REQUIRE(dl.timed.feasible);
      CHECK(dl.timed.confirmed);
      const run_result run = run_at(d, dl.timed.corner);
      REQUIRE(run.steps.size() == 2);
      CHECK(run.steps[1].status == step_status::deadlock);
    }
  }
}
