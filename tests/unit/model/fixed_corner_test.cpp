// `fixed:` corners: names that print and parse back, the builder for programs, name resolution
// against a design (hierarchical names included), the errors, and exact time literals.
#include <catch2/catch.hpp>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "sim/model/time_parse.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;

namespace {

// A delay-monitor ring's tap stage: one block instance (hierarchical names), a top-level gate with
// separate rise and fall ranges, a gate with a fixed delay, and two reaction rules (the second
// with a range, the first fixed).
const char* const monitor = R"(input  kick, probe
output tap
wire   slow

block stage(in a; out y) {
    wire mid
    mid = not(a)   delay 35ps..55ps
    y   = not(mid) delay 20ps..30ps
}
inst s0 stage(a: kick, y: slow)
tap = and(slow, probe) rise 30ps..40ps fall 22ps..32ps

stimulus {
    at 0ns kick = 0, probe = 1
    settle
    when tap after 100ps : kick = 0 times 3
    when ~tap after 200ps..400ps : kick = 1 times 3
    settle
}
)";

const char* const fixed_delay = R"(input  a
output y
y = not(a) delay 40ps
stimulus {
    at 0ns a = 0
    settle
}
)";

design load(const char* text) { return settle::testing::load_text(text, "monitor.settle"); }

corner parsed(const std::string& name) {
  std::string err;
  auto c = parse_corner(name, &err);
  INFO(err);
  REQUIRE(c);
  return *c;
}

std::string parse_error(const std::string& name) {
  std::string err;
  CHECK_FALSE(parse_corner(name, &err));
  return err;
}

std::string design_error(const design& d, const std::string& name) {
  corner c = parsed(name);
  return corner_design_error(d, c);
}

gate_id gate_of(const design& d, const std::string& name) {
  for (gate_id g = 0; g < d.nets.gate_count(); ++g)
    if (d.nets.gate_name(g) == name) return g;
  FAIL("no gate " << name);
  return 0;
}

constexpr time_fs ps = 1000;  // 1 ps = 1000 fs (SI prefixes, BIPM SI Brochure, 9th ed., Table 7)

}  // namespace

TEST_CASE("time_literal is exact and parse_time reads it back", "[corner][time]") {
  // SI prefixes (BIPM SI Brochure, 9th ed., Table 7): 1 ps = 10^3 fs, 1 ns = 10^6 fs.
  CHECK(time_literal(0) == "0fs");
  CHECK(time_literal(1) == "1fs");
  CHECK(time_literal(45 * ps) == "45ps");
  CHECK(time_literal(45'250) == "45.25ps");
  CHECK(time_literal(1'500'000) == "1.5ns");
  CHECK(time_literal(1'234'567) == "1234.567ps");
  std::mt19937_64 rng(17);
  for (int i = 0; i < 20000; ++i) {
    const int bits = static_cast<int>(rng() % 64) + 1;
    const time_fs t = rng() >> (64 - bits);
    INFO(t);
    CHECK(parse_time(time_literal(t)) == t);
  }
  CHECK(parse_time(time_literal(UINT64_MAX)) == UINT64_MAX);
}

TEST_CASE("fixed: names print back as written and parse to the same corner", "[corner]") {
  for (const char* name : {"fixed:", "fixed:tap=35ps", "fixed:s0.mid=40ps,tap=31.5ps/0fs",
                           "fixed:slow=1fs,rule#2=200ps/250.001ps/399ps"}) {
    const corner c = parsed(name);
    CHECK(c.what == corner::kind::fixed);
    CHECK(c.name() == name);
    CHECK(parsed(c.name()).name() == name);
  }
  // Gates print before rules, each in the order written.
  CHECK(parsed("fixed:rule#2=1ps,tap=2ps,rule#1=3ps,slow=4ps").name() ==
        "fixed:tap=2ps,slow=4ps,rule#2=1ps,rule#1=3ps");
  // R/F with R = F is the same corner as T, and prints as T.
  CHECK(parsed("fixed:tap=35ps/35ps").name() == "fixed:tap=35ps");
  // A literal with a coarser unit prints in the largest exact one.
  CHECK(parsed("fixed:tap=0.035ns").name() == "fixed:tap=35ps");
  // A name may hold '@' (ISCAS names can): no spread is read from a fixed: corner.
  CHECK(parsed("fixed:G1@x=1ps").fixed->gates.at(0).name == "G1@x");
}

TEST_CASE("fixed: delays reach every gate and every firing of a rule", "[corner]") {
  const design d = load(monitor);
  corner c = parsed("fixed:s0.mid=50ps,tap=31ps/23ps,rule#2=200ps/300ps/400ps");
  REQUIRE(corner_design_error(d, c) == "");
  delay_table t;
  fill_delays(d, c, t);
  const gate_id mid = gate_of(d, "s0.mid"), tap = gate_of(d, "tap"), slow = gate_of(d, "slow");
  CHECK(t.rise[mid] == 50 * ps);
  CHECK(t.fall[mid] == 50 * ps);
  CHECK(t.rise[tap] == 31 * ps);
  CHECK(t.fall[tap] == 23 * ps);
  // Not listed: typ, the midpoint of 20ps..30ps (LANGUAGE.md: typ = midpoint).
  CHECK(t.rise[slow] == 25 * ps);
  CHECK(t.fall[slow] == 25 * ps);
  const auto& r2 = d.stim.rules.at(1).delay;
  CHECK(rule_delay(t, r2, 1, 0) == 200 * ps);
  CHECK(rule_delay(t, r2, 1, 1) == 300 * ps);
  CHECK(rule_delay(t, r2, 1, 2) == 400 * ps);
  CHECK(rule_delay(t, r2, 1, 9) == 400 * ps);  // past the list: the last entry
  CHECK(fixed_rule_firings(c, 1) == 3);
  CHECK(fixed_rule_firings(c, 0) == 0);
  CHECK(rule_delay(t, d.stim.rules.at(0).delay, 0, 0) == 100 * ps);  // not listed: typ
  // The port name of the instance is an added name of the same net: the same gate.
  corner alias = parsed("fixed:s0.y=21ps");
  REQUIRE(corner_design_error(d, alias) == "");
  fill_delays(d, alias, t);
  CHECK(t.rise[slow] == 21 * ps);
  // fixed: alone is typ everywhere.
  corner none = parsed("fixed:"), typ;
  REQUIRE(corner_design_error(d, none) == "");
  delay_table a, b;
  fill_delays(d, none, a);
  fill_delays(d, typ, b);
  CHECK(a.rise == b.rise);
  CHECK(a.fall == b.fall);
  CHECK(rule_delay(a, r2, 1, 4) == rule_delay(b, r2, 1, 4));
}

TEST_CASE("fixed_corner's name replays the delays it was built from", "[corner]") {
  const design d = load(monitor);
  const auto gates = d.nets.gate_count();
  std::mt19937_64 rng(5);
  for (int round = 0; round < 50; ++round) {
    std::vector<time_fs> rise(gates), fall(gates);
    auto pick = [&](const delay_range& r) { return r.min + rng() % (r.max - r.min + 1); };
    for (gate_id g = 0; g < gates; ++g) {
      rise[g] = pick(d.nets.delay[g].rise);
      fall[g] = pick(d.nets.delay[g].fall);
    }
    std::vector<std::vector<time_fs>> rules(d.stim.rules.size());
    for (std::size_t k = 0; k < rules.size(); ++k)
      for (auto n = rng() % 4; n > 0; --n) rules[k].push_back(pick(d.stim.rules[k].delay));
    const corner built = fixed_corner(d, rise, fall, rules);
    INFO(built.name());
    corner back = parsed(built.name());
    REQUIRE(corner_design_error(d, back) == "");
    CHECK(back.name() == built.name());
    delay_table a, b;
    fill_delays(d, built, a);
    fill_delays(d, back, b);
    CHECK(a.rise == rise);
    CHECK(a.fall == fall);
    CHECK(b.rise == rise);
    CHECK(b.fall == fall);
    for (std::uint32_t k = 0; k < rules.size(); ++k)
      for (std::uint64_t i = 0; i < 6; ++i) {
        const auto& r = d.stim.rules[k].delay;
        const time_fs want =
            rules[k].empty() ? r.typ : rules[k][std::min<std::size_t>(i, rules[k].size() - 1)];
        CHECK(rule_delay(a, r, k, i) == want);
        CHECK(rule_delay(b, r, k, i) == want);
      }
  }
  // A gate with a fixed delay at its typ needs no entry.
  const design one = load(fixed_delay);
  const std::vector<time_fs> forty{40 * ps};
  CHECK(fixed_corner(one, forty, forty, {}).name() == "fixed:");
}

TEST_CASE("malformed fixed: corners are refused before the design is read", "[corner]") {
  CHECK(parse_error("fixed:tap").find("is not NAME=T") != std::string::npos);
  CHECK(parse_error("fixed:=1ps").find("is not NAME=T") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps,").find("entry ''") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps,,slow=2ps").find("entry ''") != std::string::npos);
  CHECK(parse_error("fixed:tap=").find("a delay is missing") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps/").find("a delay is missing") != std::string::npos);
  CHECK(parse_error("fixed:tap=40").find("unit") != std::string::npos);
  CHECK(parse_error("fixed:tap=0.5fs").find("whole number of femtoseconds") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps/2ps/3ps").find("not 3") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps, slow=2ps").find("without spaces") != std::string::npos);
  CHECK(parse_error("fixed:rule#0=1ps").find("rule number from 1") != std::string::npos);
  CHECK(parse_error("fixed:rule#=1ps").find("rule number from 1") != std::string::npos);
  CHECK(parse_error("fixed:rule#2x=1ps").find("rule number from 1") != std::string::npos);
  CHECK(parse_error("fixed:tap=1ps,tap=2ps").find("gate 'tap' is listed twice") !=
        std::string::npos);
  CHECK(parse_error("fixed:rule#1=1ps,rule#1=2ps").find("rule#1 is listed twice") !=
        std::string::npos);
  std::string err;
  CHECK(parse_corner("fixed:tap=1ps", &err));
}

TEST_CASE("fixed: corners that do not fit the design say why", "[corner]") {
  const design d = load(monitor);
  CHECK(design_error(d, "fixed:nope=40ps") == "no gate is named 'nope'");
  CHECK(design_error(d, "fixed:probe=40ps") == "'probe' is an input, not a gate");
  CHECK(design_error(d, "fixed:slow=21ps,s0.y=22ps") ==
        "gate 'slow' is listed twice (as 'slow' and 's0.y')");
  CHECK(design_error(d, "fixed:rule#3=1ps") ==
        "there is no rule#3: this design has 2 reaction rules, numbered 1..2");
  CHECK(design_error(d, "fixed:tap=90ps") ==
        "delay 90ps of gate 'tap' (rise) is outside its range 30ps..40ps");
  CHECK(design_error(d, "fixed:tap=35ps") ==
        "delay 35ps of gate 'tap' (fall) is outside its range 22ps..32ps");
  CHECK(design_error(d, "fixed:tap=29.999ps/30ps") ==
        "delay 29.999ps of gate 'tap' (rise) is outside its range 30ps..40ps");
  CHECK(design_error(d, "fixed:s0.mid=35ps/55.001ps") ==
        "delay 55.001ps of gate 's0.mid' (fall) is outside its range 35ps..55ps");
  CHECK(design_error(d, "fixed:rule#2=200ps/401ps") ==
        "delay 401ps of rule#2 (list entry 2) is outside its range 200ps..400ps");
  CHECK(design_error(d, "fixed:rule#1=99ps") ==
        "delay 99ps of rule#1 (list entry 1) is not its fixed delay 100ps");
  // The bounds themselves are in range (a closed interval, as the language writes ranges).
  CHECK(design_error(d, "fixed:tap=30ps/32ps,s0.mid=55ps,rule#2=200ps/400ps") == "");
  const design one = load(fixed_delay);
  CHECK(design_error(one, "fixed:y=41ps") ==
        "delay 41ps of gate 'y' (rise) is not its fixed delay 40ps");
  CHECK(design_error(one, "fixed:rule#1=0fs") ==
        "there is no rule#1: this design has no reaction rules");
  // Every other corner has nothing to resolve.
  corner typ;
  CHECK(corner_design_error(one, typ) == "");
}

namespace {

// A sensor handshake closed by the environment with no `times`: it cycles for ever, so a
// `settle` step ends oscillating once the full state repeats.
const char* const endless = R"(input  req
output ack
ack = buf(req) delay 30ps
stimulus {
    at 0ns req = 0
    settle
    after 1ns req = 1
    when ack after 100ps..500ps : req = 0
    when ~ack & ~req after 100ps : req = 1
    settle
}
)";

}  // namespace

TEST_CASE("a fixed: list of firing delays is part of the state until its last entry",
          "[corner][kernel]") {
  const design d = load(endless);
  // Common practice: a four-phase cycle is two round trips through circuit and environment, so
  // the acknowledge's period is 2 x 30ps + e1 + e2. The first 80 firings of rule 1 take 500ps
  // (well past the kernel's warm-up of 128 instants), every later one 100ps: the period the run
  // reports is the one after the list, 260ps, never the 660ps of the cycles before it.
  std::string list;
  for (int i = 0; i < 80; ++i) list += "500ps/";
  corner c = parsed("fixed:rule#1=" + list + "100ps");
  REQUIRE(corner_design_error(d, c) == "");
  delay_table t;
  fill_delays(d, c, t);
  const run_result r = run_stimulus(d, t, run_options{});
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[1].status == step_status::oscillating);
  CHECK(r.steps[1].period == 260 * ps);
  // The same corner at its min from the start: 260ps at once.
  corner lo = parsed("fixed:rule#1=100ps");
  REQUIRE(corner_design_error(d, lo) == "");
  fill_delays(d, lo, t);
  const run_result r0 = run_stimulus(d, t, run_options{});
  CHECK(r0.steps.at(1).period == 260 * ps);
  CHECK(r.steps[1].end > r0.steps.at(1).end);
}
