// Bounded runs in the libraries: a stop flag ends a kernel run and a sweep at once, a wall-clock
// budget ends a sweep, the explore memory guard.
#include <atomic>
#include <catch2/catch.hpp>
#include <chrono>
#include <string>
#include <thread>

#include "parser/load.hpp"
#include "sim/analysis/explore.hpp"
#include "sim/analysis/sweep.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;

namespace {

// A delay-monitor ring (our demo scenario) enabled in step 2 and left running for a
// millisecond of simulated time: millions of events, so only a stop can end it soon.
const char* ring_text =
    "input  enable\n"
    "output tap\n"
    "wire   n0, n1, n2\n"
    "n0  = nand(enable, n2) delay 30ps..50ps\n"
    "n1  = not(n0)          delay 20ps..30ps\n"
    "n2  = not(n1)          delay 20ps..30ps\n"
    "tap = buf(n2)          delay 20ps..30ps\n"
    "stimulus {\n"
    "    at 0ns enable = 0\n"
    "    settle\n"
    "    after 1ns enable = 1\n"
    "    run 1ms\n"
    "}\n";

design load_text(const std::string& text) {
  return settle::testing::load_text(text, "ring.settle");
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace

TEST_CASE("a raised stop flag ends a kernel run at the next instant", "[harden]") {
  const design d = load_text(ring_text);
  delay_table delays;
  fill_delays(d, corner{}, delays);
  std::atomic<bool> stop{true};
  run_options opt;
  opt.stop = &stop;
  const run_result r = run_stimulus(d, delays, opt);
  REQUIRE(!r.steps.empty());
  CHECK(r.steps.front().status == step_status::event_limit);  // stopped like the event limit
  CHECK(r.events < 100);
  CHECK_FALSE(r.pass());
}

TEST_CASE("a sweep stops within a fraction of a second of its stop flag", "[harden]") {
  const design d = load_text(ring_text);
  std::string err;
  auto plan = plan_sweep("random:100000", 1, d.nets.gate_count(), &err);
  REQUIRE(plan);
  std::atomic<bool> stop{false};
  sweep_options o;
  o.threads = 2;
  o.stop = &stop;
  std::thread raiser([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(300));
    stop.store(true);
  });
  const auto t0 = std::chrono::steady_clock::now();
  const sweep_result r = run_sweep(d, *plan, o);
  const double el = seconds_since(t0);
  raiser.join();
  // Each corner runs ~10^7 events; without the kernel polling the flag this takes minutes.
  CHECK(el < 1.3);
  CHECK(r.stopped == sweep_stop::interrupted);
  CHECK(r.planned == 100000);
  CHECK(r.corners < r.planned);
  CHECK_FALSE(r.pass());
  for (const auto& s : r.steps) {
    std::uint64_t total = 0;
    for (const auto& oc : s.outcomes) total += oc.count;
    CHECK(total == r.corners);  // the steps group the finished corners only
  }
}

TEST_CASE("a sweep's wall-clock budget gives a partial result marked timeout", "[harden]") {
  const design d = load_text(
      "input  a\noutput y\nwire m\nm = not(a) delay 10ps..20ps\ny = not(m) delay 10ps..20ps\n"
      "stimulus {\n  at 0ns a = 0\n  settle\n  after 1ns a = 1\n  settle\n  expect y = 1\n}\n");
  std::string err;
  auto plan = plan_sweep("random:5000000", 3, d.nets.gate_count(), &err);
  REQUIRE(plan);
  sweep_options o;
  o.threads = 2;
  o.timeout_s = 0.3;
  const auto t0 = std::chrono::steady_clock::now();
  const sweep_result r = run_sweep(d, *plan, o);
  CHECK(seconds_since(t0) < 3.0);  // the budget, the grouping of what finished, a loaded machine
  CHECK(r.stopped == sweep_stop::timeout);
  REQUIRE(r.corners > 0);
  CHECK(r.corners < r.planned);
  // What finished is still judged: this two-inverter path is deterministic in every corner.
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[1].verdict == sweep_verdict::deterministic);
  CHECK(r.steps[1].outcomes.front().count == r.corners);
  CHECK(r.steps[1].outcomes.front().share == 1.0);
  CHECK_FALSE(r.pass());  // a sweep that did not run its plan is not a pass
}

TEST_CASE("a sweep without stop or budget runs every corner", "[harden]") {
  const design d = load_text(ring_text);
  std::string err;
  auto plan = plan_sweep("extremes", 1, d.nets.gate_count(), &err);
  REQUIRE(plan);
  sweep_options o;
  o.threads = 2;
  o.run.max_events = 2000;
  const sweep_result r = run_sweep(d, *plan, o);
  CHECK(r.stopped == sweep_stop::none);
  CHECK(r.corners == r.planned);
  CHECK(r.corners == 3 + 2 * d.nets.gate_count());  // extremes: 3 + 2g corners (issue 3)
}

TEST_CASE("the explore memory guard stops a large state graph with a reason", "[harden]") {
  // Six independent C-element toggles released together: 2^6 interleavings of their
  // firings at least (combinatorics), far beyond a 4 KiB budget.
  std::string text = "input go\noutput ";
  for (int k = 0; k < 6; ++k) text += (k ? ", q" : "q") + std::to_string(k);
  text += "\nwire ";
  for (int k = 0; k < 6; ++k) text += (k ? ", m" : "m") + std::to_string(k);
  text += "\n";
  for (int k = 0; k < 6; ++k) {
    const auto s = std::to_string(k);
    text += "m" + s + " = not(q" + s + ") delay 10ps..90ps\nq" + s + " = c(go, m" + s +
            ") delay 10ps..90ps\n";
  }
  text += "init ";
  for (int k = 0; k < 6; ++k)
    text += (k ? ", q" : "q") + std::to_string(k) + " = 0, m" + std::to_string(k) + " = 1";
  text += "\nstimulus {\n  at 0ns go = 0\n  settle\n  after 1ns go = 1\n  settle\n}\n";
  const design d = load_text(text);
  explore_options o;
  o.max_bytes = 4096;
  std::string err;
  auto r = explore_design(d, o, &err);
  INFO(err);
  REQUIRE(r);
  REQUIRE(r->steps.size() == 2);
  const auto& s = r->steps[1];
  CHECK_FALSE(s.complete);
  CHECK_FALSE(s.stop.empty());
  CHECK_FALSE(r->pass());
}
