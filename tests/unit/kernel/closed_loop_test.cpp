// Closed-loop environments: reaction rules, deadlock, whole-run properties and
// timing gauges, checked against facts of timing that hold for any simulator.
#include <fmt/format.h>

#include <catch2/catch.hpp>
#include <set>
#include <string>
#include <vector>

#include "parser/load.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;

namespace {

design load(const std::string& text) { return settle::testing::load_text(text, "closed.settle"); }

// Collects every value change of a run.
struct recorder final : change_sink {
  std::vector<change> changes;
  std::vector<logic> initial;
  void on_start(std::span<const logic> v) override { initial.assign(v.begin(), v.end()); }
  void on_changes(std::span<const change> batch) override {
    changes.insert(changes.end(), batch.begin(), batch.end());
  }
  void on_finish(time_fs) override {}
  std::vector<time_fs> rises(net_id n) const {
    std::vector<time_fs> out;
    logic last = initial.at(n);
    for (const auto& c : changes)
      if (c.net == n) {
        if (last == logic::zero && c.value == logic::one) out.push_back(c.time);
        last = c.value;
      }
    return out;
  }
};

run_result run_at(const design& d, const corner& c, change_sink* trace = nullptr) {
  delay_table t;
  fill_delays(d, c, t);
  return run_stimulus(d, t, run_options{}, trace);
}
run_result run_at(const design& d, corner::kind k = corner::kind::typ,
                  change_sink* trace = nullptr) {
  corner c;
  c.what = k;
  return run_at(d, c, trace);
}

const gauge_result& gauge_named(const design& d, const run_result& r, const std::string& name) {
  for (const auto& g : r.gauges)
    if (d.stim.gauges[g.gauge].name == name) return g;
  FAIL("no gauge " << name);
  return r.gauges.front();
}

// A four-phase handshake: the circuit is one buffer of delay d, the
// environment lowers req e after ack rises and raises it e after ack falls.
std::string handshake(time_fs d_ps, time_fs e_ps, const std::string& times) {
  return fmt::format(R"(input req
output ack
ack = buf(req) delay {}ps
init req = 0
stimulus {{
  watch req
  gauge cycle = period of ack
  at 0fs req = 1
  when ack = 1 after {}ps : req = 0
  when ack = 0 after {}ps : req = 1 {}
  settle
}}
)",
                     d_ps, e_ps, e_ps, times);
}

}  // namespace

TEST_CASE("a four-phase cycle through a buffer lasts two round trips", "[closed]") {
  // Common practice: a four-phase (return-to-zero) handshake makes two round
  // trips per cycle, req+ ack+ req- ack-, so its period is 2 (d + e).
  for (auto [d_ps, e_ps] :
       {std::pair<time_fs, time_fs>{300, 200}, {100, 900}, {1000, 1}, {250, 250}}) {
    const time_fs n = 7;
    const design d = load(handshake(d_ps, e_ps, fmt::format("times {}", n)));
    recorder rec;
    const run_result r = run_at(d, corner::kind::typ, &rec);
    INFO("d = " << d_ps << "ps, e = " << e_ps << "ps");
    REQUIRE(r.steps.size() == 1);
    CHECK(r.steps[0].status == step_status::settled);  // with `times` the loop finishes
    const auto& g = gauge_named(d, r, "cycle");
    // n + 1 rises of ack; the first is from x (ack starts unknown), which is
    // no edge, so n - 1 periods lie between the others.
    CHECK(g.count == n - 1);
    CHECK(g.min == 2 * (d_ps + e_ps) * 1000);
    CHECK(g.max == 2 * (d_ps + e_ps) * 1000);
    // `times N` fires the raising rule N times: N + 1 rises of req with the
    // first one from `at`.
    const auto req_rises = rec.rises(d.nets.find("req"));
    CHECK(req_rises.size() == n + 1);
    CHECK(r.pass());
  }
}

TEST_CASE("a closed loop without times keeps cycling and is oscillating with its period",
          "[closed]") {
  // Common practice: the same 2 (d + e) cycle, found as a repeated state.
  const design d = load(handshake(300, 200, ""));
  const run_result r = run_at(d);
  REQUIRE(r.steps.size() == 1);
  CHECK(r.steps[0].status == step_status::oscillating);
  CHECK(r.steps[0].period == 2 * (300 + 200) * 1000);
}

TEST_CASE("an environment waiting on an acknowledge that never comes deadlocks", "[closed]") {
  const design d = load(R"(input req, en
output ack
ack = and(req, en) delay 300ps
init req = 0, en = 0
stimulus {
  at 0fs req = 1
  when ack = 1 after 200ps : req = 0 times 3
  settle
  run 10ns
}
)");
  const run_result r = run_at(d);
  REQUIRE(r.steps.size() == 2);
  for (const auto& s : r.steps) {
    CHECK(s.status == step_status::deadlock);
    REQUIRE(s.owed.size() == 1);
    CHECK(d.stim.rules[s.owed[0].rule].text == "when ack = 1 after 200ps : req = 0");
    CHECK(s.owed[0].fired == 0);
    CHECK(s.owed[0].times == 3);
    CHECK(s.owed[0].condition == logic::zero);
    CHECK_FALSE(s.pass());
  }
  // A run window advances by its length even when nothing happens in it.
  CHECK(r.steps[1].end - r.steps[1].start == 10'000'000);
  CHECK_FALSE(r.pass());
}

TEST_CASE("a rule that has fired its times is not owed", "[closed]") {
  const design d = load(R"(input req
output ack
ack = buf(req) delay 300ps
init req = 0
stimulus {
  at 0fs req = 1
  when ack = 1 after 200ps : req = 0 times 1
  settle
}
)");
  const run_result r = run_at(d);
  CHECK(r.steps[0].status == step_status::settled);
  CHECK(r.steps[0].owed.empty());
}

TEST_CASE("never a & b reports the first instant both are 1", "[closed]") {
  // Common practice: a change through a gate of delay t appears t after its
  // cause, so a rises at 1ns + 300ps and b at 1ns + 500ps: the overlap starts
  // at 1.5ns.
  const design d = load(R"(input x, y
output a, b
a = buf(x) delay 300ps
b = buf(y) delay 500ps
init x = 0, y = 0
stimulus {
  never a & b
  always ~(a & b)
  never b rises while a = 1
  never a rises while b = 1
  settle
  at 1ns x = 1, y = 1
  settle
}
)");
  const run_result r = run_at(d);
  REQUIRE(r.properties.size() == 4);
  for (int i : {0, 1, 2}) {
    INFO(d.stim.properties[i].text);
    CHECK_FALSE(r.properties[i].holds);
    CHECK(r.properties[i].first_violation == 1'500'000);
    CHECK(r.properties[i].step == 2);
  }
  CHECK(r.properties[3].holds);  // a rose while b was still 0
  for (const auto& [net, v] : r.properties[0].values) CHECK(v == logic::one);
  CHECK(r.properties[0].values.size() == 2);
  CHECK_FALSE(r.pass());
}

TEST_CASE("pulse and latency gauges along a gate chain add up the delays", "[closed]") {
  // Common practice: a path's latency is the sum of its gates' delays, and a
  // high pulse through buffers leaves as wide as it came, plus the falls'
  // delays, less the rises'.
  const design d = load(R"(input in
output out
wire m, n
m = buf(in) rise 100ps fall 300ps
n = buf(m) rise 200ps fall 100ps
out = buf(n) delay 50ps
init in = 0
stimulus {
  gauge up = latency from in rises to out rises
  gauge down = latency from in falls to out falls
  gauge wide = pulse of out high
  gauge gap = pulse of out low
  settle
  at 1ns in = 1
  after 2ns in = 0
  after 3ns in = 1
  after 4ns in = 0
  settle
  expect wide within 2100ps..2100ps
  expect up within 350ps..350ps
  expect gap within 2ns..2ns
}
)");
  const run_result r = run_at(d);
  const auto& up = gauge_named(d, r, "up");
  CHECK(up.count == 2);
  CHECK(up.min == 100'000 + 200'000 + 50'000);
  CHECK(up.max == 350'000);
  const auto& down = gauge_named(d, r, "down");
  CHECK(down.min == 300'000 + 100'000 + 50'000);
  const auto& wide = gauge_named(d, r, "wide");
  CHECK(wide.count == 2);
  CHECK(wide.min == 2'000'000 + 450'000 - 350'000);
  CHECK(wide.max == 4'000'000 + 450'000 - 350'000);
  // The low pulse between them: 3ns less the falls', plus the rises' delays.
  const auto& gap = gauge_named(d, r, "gap");
  CHECK(gap.count == 1);
  CHECK(gap.min == 3'000'000 + 350'000 - 450'000);
  REQUIRE(r.steps[1].expects.size() == 3);
  CHECK_FALSE(r.steps[1].expects[0].pass);  // the second pulse is 4.1ns wide
  CHECK(r.steps[1].expects[1].pass);
  CHECK_FALSE(r.steps[1].expects[2].pass);  // 2.9ns
}

TEST_CASE("rule delays are corner variables", "[closed]") {
  const design d = load(handshake(300, 0, "times 4")
                            .replace(handshake(300, 0, "times 4").find("after 0ps : req = 0"), 19,
                                     "after 100ps..200ps..400ps : req = 0"));
  REQUIRE(d.stim.rules[0].delay.max == 400'000);
  // min, typ and max: every firing takes that bound (one period: 2 d + e_rule + 0).
  for (auto [k, e] : {std::pair<corner::kind, time_fs>{corner::kind::min, 100},
                      {corner::kind::typ, 200},
                      {corner::kind::max, 400}}) {
    const run_result r = run_at(d, k);
    const auto& g = gauge_named(d, r, "cycle");
    CHECK(g.min == (600 + e) * 1000);
    CHECK(g.max == (600 + e) * 1000);
  }
  // extremes: the gate's delay is fixed, so it is no variable; the ranged
  // rule is variable 0 and the other rule (fixed at 0) none.
  CHECK(delay_variables(d) == 1);
  corner c;
  c.what = corner::kind::extremes;
  c.index = 3 + 2 * 0;  // the rule at max
  CHECK(gauge_named(d, run_at(d, c), "cycle").min == (600 + 400) * 1000);
  // random: a fresh draw every firing, and the corner replays exactly.
  c.what = corner::kind::random;
  c.seed = 11;
  c.index = 5;
  recorder a, b;
  const run_result ra = run_at(d, c, &a), rb = run_at(d, c, &b);
  const auto fall_times = [&](const recorder& rec) {
    std::vector<time_fs> out;
    for (const auto& ch : rec.changes)
      if (ch.net == d.nets.find("req") && ch.value == logic::zero) out.push_back(ch.time);
    return out;
  };
  CHECK(fall_times(a) == fall_times(b));
  const auto& ga = gauge_named(d, ra, "cycle");
  CHECK(ga.count == 3);
  CHECK(ga.min >= 700'000);
  CHECK(ga.max <= 1'000'000);
  CHECK(ga.min < ga.max);  // three periods, three draws (all equal only by a 1-in-10^10 chance)
}

TEST_CASE("a clock anchored with at starts at that absolute time", "[closed]") {
  const design d = load(R"(input c, a
output q
q = buf(c) delay 10ps
init c = 0, a = 0
stimulus {
  gauge p = period of q
  at 3ns a = 1
  clock c period 2ns cycles 3 at 5ns
  settle
}
)");
  recorder rec;
  run_at(d, corner::kind::typ, &rec);
  const auto r = rec.rises(d.nets.find("c"));
  CHECK(r == std::vector<time_fs>{5'000'000, 7'000'000, 9'000'000});
}

TEST_CASE("an at earlier than the time a settle reached stops the run with an error at its literal",
          "[closed]") {
  // The first step takes 10ns to settle (a buffer of 10ns), so `at 3ns` lies
  // in the past when the second step begins: known only at run time.
  const design d = load(R"(input a
output q
q = buf(a) delay 10ns
init a = 0
stimulus {
  at 1ns a = 1
  settle
  at 3ns a = 0
  settle
}
)");
  const run_result r = run_at(d);
  REQUIRE(r.error);
  CHECK(r.error->line == 8);
  CHECK(r.error->col == 6);
  CHECK(r.error->file == "closed.settle");
  CHECK(r.error->message.find("'at 3ns' is earlier than 11ns") != std::string::npos);
  CHECK(r.steps.size() == 1);
  CHECK_FALSE(r.pass());
}

TEST_CASE("a gauge declared before an input change at its own time sees that edge", "[closed]") {
  // Common practice: the latency through one buffer is its delay.
  const design d = load(R"(input a
output q
q = buf(a) delay 70ps
init a = 0, q = 0
stimulus {
  gauge lag = latency from a rises to q rises
  at 0fs a = 1
  settle
}
)");
  const run_result r = run_at(d);
  const auto& g = gauge_named(d, r, "lag");
  CHECK(g.count == 1);
  CHECK(g.min == 70'000);
}
