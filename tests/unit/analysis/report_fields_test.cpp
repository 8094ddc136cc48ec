// What a step result says about oscillations and timeouts: the detection instant,
// how far a timeout got, and net values that repeated before the full state did.
// Fact of the trade (common practice): a ring of N inverting stages of delay d
// oscillates with period 2·N·d; two independent periodic signals that start
// together repeat jointly after the least common multiple of their periods.
#include <catch2/catch.hpp>
#include <numeric>
#include <string>

#include "parser/load.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"

using namespace settle;

namespace {

design rings() {
  // Two three-stage rings of 10007 fs and 10009 fs stages (coprime), enabled together.
  const std::string text =
      "input en\noutput a3, b3\nwire a1, a2, b1, b2\n"
      "a1 = nand(en, a3) delay 10007fs\na2 = not(a1) delay 10007fs\na3 = not(a2) delay 10007fs\n"
      "b1 = nand(en, b3) delay 10009fs\nb2 = not(b1) delay 10009fs\nb3 = not(b2) delay 10009fs\n"
      "stimulus {\n at 0ns en = 0\n settle\n after 1ns en = 1\n settle\n}\n";
  diagnostics diags;
  auto d = load_design_text(text, "rings.settle", load_options{}, diags);
  REQUIRE(d);
  return std::move(*d);
}

run_result run_at(const design& d, time_fs horizon) {
  delay_table t;
  fill_delays(d.nets, corner{}, t);
  run_options o;
  o.horizon = horizon;
  return run_stimulus(d, t, o);
}

}  // namespace

TEST_CASE("a timeout reports how far it got and that its values repeated", "[report]") {
  const auto d = rings();
  const time_fs joint = std::lcm(time_fs{6 * 10007}, time_fs{6 * 10009});  // 600,960,378 fs
  REQUIRE(joint == 600'960'378);
  const auto r = run_at(d, 0);  // the default limit: 10,000 x 10009 fs, short of the joint repeat
  REQUIRE(r.steps.size() == 2);
  const auto& s = r.steps[1];
  CHECK(s.status == step_status::timeout);
  CHECK(s.end - s.start == 10000 * 10009);
  CHECK(s.events > 0);
  CHECK(r.steps[0].events + s.events == r.events);  // per-step counts add up to the run's
  CHECK(s.values_period > 0);
  CHECK(s.values_repeat_at > s.start);
  CHECK(s.values_repeat_at <= s.end);
}

TEST_CASE("an oscillation past the joint repeat: period, and detection at the step's end",
          "[report]") {
  const auto d = rings();
  const auto r = run_at(d, 5'000'000'000);  // 5 us
  const auto& s = r.steps.at(1);
  CHECK(s.status == step_status::oscillating);
  CHECK(s.period == 600'960'378);
  CHECK(s.end - s.start >= s.period);  // the repeat is seen a period or more into the step
  CHECK(s.values_period == 0);         // the full state repeated: no partial-repeat note

  // A sweep's oscillating outcome keeps detection times (end - start), not last changes.
  std::string err;
  auto plan = plan_sweep("extremes", 1, delay_variables(d), &err);
  REQUIRE(plan);
  sweep_options so;
  so.threads = 1;
  so.run.horizon = 5'000'000'000;
  const auto sw = run_sweep(d, *plan, so);
  const auto& oc = sw.steps.at(1).outcomes.at(0);
  CHECK(oc.status == step_status::oscillating);
  CHECK(oc.settle.min == s.end - s.start);
  CHECK(oc.settle.max == s.end - s.start);  // fixed delays: every corner alike
}

TEST_CASE("a sweep's timeout outcome carries its witness's figures", "[report]") {
  const auto d = rings();
  std::string err;
  auto plan = plan_sweep("extremes", 1, delay_variables(d), &err);
  REQUIRE(plan);
  sweep_options so;
  so.threads = 1;
  const auto sw = run_sweep(d, *plan, so);
  const auto& oc = sw.steps.at(1).outcomes.at(0);
  const auto r = run_at(d, 0);
  CHECK(oc.status == step_status::timeout);
  CHECK(oc.reached == r.steps[1].end - r.steps[1].start);
  CHECK(oc.events == r.steps[1].events);
  CHECK(oc.values_period == r.steps[1].values_period);
  CHECK(oc.values_repeat_at == r.steps[1].values_repeat_at);
}
