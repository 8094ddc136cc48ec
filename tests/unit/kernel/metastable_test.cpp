// The metastable elements through the public run API: a sensor FIFO's
// two-requester mutual-exclusion element and a panel button's synchronizing
// flip-flop (scenarios of our own), their resolution times exact to the fs.
//
// The model, from memory of Veendrick 1980 (IEEE JSSC 15(2)), Kleeman and
// Cantoni 1987 (IEEE Trans. Computers 36(10)) and Ginosar 2011 (IEEE Design &
// Test 28(5)): two events a gap apart inside the window W resolve
// tau x ln(W / gap) later than the element's delay D; a synchronizing
// flip-flop's window is centred on the clock edge, so its reach is W/2.
#include <catch2/catch.hpp>
#include <cmath>
#include <string>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr time_fs D = 50'000, tau = 20'000, W = 10'000;  // delay 50ps tau 20ps window 10ps

// D + tau x ln(reach / gap), rounded to the nearest fs.
time_fs resolved_after(double reach, double gap) {
  return D + static_cast<time_fs>(std::llround(static_cast<double>(tau) * std::log(reach / gap)));
}

// The FIFO's sampler (wr_req) asks at 1ns, its drain (rd_req) `second` later;
// the sampler releases at 2ns.
std::string fifo_arbiter(const std::string& second) {
  return "input  wr_req, rd_req\n"
         "output wr_gnt, rd_gnt\n"
         "wr_gnt, rd_gnt = mutex(wr_req, rd_req) delay 50ps tau 20ps window 10ps\n"
         "init wr_gnt = 0, rd_gnt = 0\n"
         "stimulus {\n"
         "  at 0ns wr_req = 0, rd_req = 0\n"
         "  settle\n"
         "  at 1ns wr_req = 1\n"
         "  at " +
         second +
         " rd_req = 1\n"
         "  settle\n"
         "  at 2ns wr_req = 0\n"
         "  settle\n"
         "}\n";
}

// The panel button's synchronizer: the button and the clock low from 0ns,
// then `extra` (the changes around a rising clock edge at 1ns).
std::string button_sync(const std::string& extra) {
  return "input  button, clk\n"
         "output button_s\n"
         "button_s = syncff(button, clk) delay 50ps tau 20ps window 10ps\n"
         "init button_s = 0\n"
         "stimulus {\n"
         "  at 0ns button = 0, clk = 0\n"
         "  settle\n" +
         extra +
         "  settle\n"
         "}\n";
}

delay_table table_for(const design& d, const std::string& corner_name) {
  std::string err;
  auto c = parse_corner(corner_name, &err);
  INFO(err);
  REQUIRE(c);
  delay_table t;
  fill_delays(d, *c, t);
  return t;
}

run_result run_at(const design& d, const std::string& corner_name = "typ") {
  return run_stimulus(d, table_for(d, corner_name), run_options{});
}

gate_id driver_of(const design& d, const char* net) {
  const net_id n = d.nets.find(net);
  REQUIRE(n != no_id);
  return d.nets.driver[n];
}

}  // namespace

TEST_CASE("mutex: requests 1ps apart inside a 10ps window resolve 50 + 20 ln 10 ps later",
          "[kernel][metastable]") {
  const design d = load_text(fifo_arbiter("1.001ns"), "fifo_arbiter.settle");
  const time_fs want = resolved_after(static_cast<double>(W), 1000.0);
  REQUIRE(want == 96'052);  // 50 + 20 x 2.302585 ps
  for (const char* corner : {"min", "typ", "max", "random:3#1"}) {
    INFO(corner);
    const run_result r = run_at(d, corner);
    REQUIRE(r.steps.size() == 3);
    CHECK(r.pass());
    const auto& res = r.steps[1].resolutions;
    REQUIRE(res.size() == 1);
    CHECK(res[0].gate == driver_of(d, "wr_gnt"));
    CHECK(res[0].first == 1'000'000);
    CHECK(res[0].at == 1'000'000 + want);
    CHECK(res[0].time() == want);
    CHECK(res[0].near);
    CHECK(res[0].gap == 1000);
    CHECK_FALSE(res[0].drawn);
    CHECK(res[0].value == logic::one);
    CHECK(r.steps[1].settle == want);
    // The drain waits: its grant rises D after the sampler's grant falls,
    // itself D after the sampler's request falls at 2ns.
    const auto& rel = r.steps[2].resolutions;
    REQUIRE(rel.size() == 1);
    CHECK(rel[0].gate == driver_of(d, "rd_gnt"));
    CHECK(rel[0].first == 2'000'000 + D);
    CHECK(rel[0].at == 2'000'000 + 2 * D);
    CHECK_FALSE(rel[0].near);
  }
}

TEST_CASE("mutex: requests a window apart or more resolve after D", "[kernel][metastable]") {
  for (const char* second : {"1.01ns", "1.02ns"}) {
    INFO(second);
    const design d = load_text(fifo_arbiter(second), "fifo_arbiter.settle");
    const run_result r = run_at(d);
    REQUIRE(r.steps.size() == 3);
    const auto& res = r.steps[1].resolutions;
    REQUIRE(res.size() == 1);
    CHECK(res[0].time() == D);
    CHECK_FALSE(res[0].near);
  }
}

TEST_CASE("mutex: a tie replays exactly, also in a reused run context", "[kernel][metastable]") {
  const design d = load_text(fifo_arbiter("1ns"), "fifo_arbiter.settle");
  run_context ctx(d.nets);
  for (int i = 0; i < 8; ++i) {
    const std::string corner = "random:7#" + std::to_string(i);
    INFO(corner);
    const delay_table t = table_for(d, corner);
    const run_result a = run_stimulus(d, t, run_options{});
    const run_result b = run_stimulus(ctx, d, t, run_options{});
    const run_result c = run_stimulus(ctx, d, t, run_options{});
    REQUIRE(a.steps.size() == 3);
    REQUIRE(a.steps[1].resolutions.size() == 1);
    const resolution& x = a.steps[1].resolutions[0];
    CHECK(x.drawn);
    CHECK(x.first == 1'000'000);
    // a drawn gap lies in (0, W), so the tie resolves no sooner than D
    CHECK(x.gap >= 0);
    CHECK(x.gap <= static_cast<std::int64_t>(W));
    CHECK(x.time() >= D);
    for (const run_result* o : {&b, &c}) {
      REQUIRE(o->steps.size() == 3);
      REQUIRE(o->steps[1].resolutions.size() == 1);
      const resolution& y = o->steps[1].resolutions[0];
      CHECK(y.gate == x.gate);
      CHECK(y.at == x.at);
      CHECK(y.gap == x.gap);
      CHECK(y.drawn);
    }
  }
}

TEST_CASE("syncff: a change 1ps before the edge takes the new value 50 + 20 ln 5 ps after it",
          "[kernel][metastable]") {
  const design d =
      load_text(button_sync("  at 0.999ns button = 1\n  at 1ns clk = 1\n"), "button_sync.settle");
  const time_fs want = resolved_after(static_cast<double>(W) / 2, 1000.0);
  REQUIRE(want == 82'189);  // 50 + 20 x 1.609438 ps
  const run_result r = run_at(d);
  REQUIRE(r.steps.size() == 2);
  CHECK(r.pass());
  const auto& res = r.steps[1].resolutions;
  REQUIRE(res.size() == 1);
  CHECK(res[0].gate == driver_of(d, "button_s"));
  CHECK(res[0].first == 1'000'000);
  CHECK(res[0].at == 1'000'000 + want);
  CHECK(res[0].near);
  CHECK(res[0].gap == 1000);
  CHECK_FALSE(res[0].drawn);
  CHECK(res[0].value == logic::one);
  CHECK(r.steps[1].values[0] == logic::one);
}

TEST_CASE("syncff: a change 1ps after the edge keeps the value taken, as late",
          "[kernel][metastable]") {
  // The button closed long before the edge and opens 1ps after it: the
  // flip-flop keeps the closed level (1), resolved 50 + 20 ln 5 ps after the edge.
  const design d =
      load_text(button_sync("  at 0.5ns button = 1\n  at 1ns clk = 1\n  at 1.001ns button = 0\n"),
                "button_sync.settle");
  const run_result r = run_at(d);
  REQUIRE(r.steps.size() == 2);
  const auto& res = r.steps[1].resolutions;
  REQUIRE(res.size() == 1);
  CHECK(res[0].at == 1'000'000 + resolved_after(static_cast<double>(W) / 2, 1000.0));
  CHECK(res[0].gap == -1000);
  CHECK(res[0].value == logic::one);
  CHECK(r.steps[1].values[0] == logic::one);
}

TEST_CASE("syncff: a change half a window from the edge is outside it", "[kernel][metastable]") {
  for (const char* extra : {"  at 0.995ns button = 1\n  at 1ns clk = 1\n",
                            "  at 0.5ns button = 1\n  at 1ns clk = 1\n  at 1.005ns button = 0\n"}) {
    INFO(extra);
    const design d = load_text(button_sync(extra), "button_sync.settle");
    const run_result r = run_at(d);
    REQUIRE(r.steps.size() == 2);
    const auto& res = r.steps[1].resolutions;
    REQUIRE(res.size() == 1);
    CHECK(res[0].time() == D);
    CHECK_FALSE(res[0].near);
    CHECK(res[0].value == logic::one);
  }
}
