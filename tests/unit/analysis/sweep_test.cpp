// Corner sweeps: spec counts, races found and replayed, determinism across threads, soundness
// against interval runs.
#include "sim/analysis/sweep.hpp"

#include <algorithm>
#include <catch2/catch.hpp>
#include <cmath>
#include <filesystem>
#include <set>
#include <string>

#include "parser/load.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/load_design.hpp"
#include "tests/unit/random_circuits.hpp"

using namespace settle;

namespace {

// A cabinet-door interlock: a NAND set/reset latch whose two active-low
// controls are both held low, then released at the same instant (our own
// scenario). {A} and {B} are the two NANDs' delays.
std::string door_latch(const std::string& a, const std::string& b) {
  return "input  open_n, close_n\n"
         "output door, door_n\n"
         "door   = nand(open_n, door_n)   delay " +
         a +
         "\n"
         "door_n = nand(close_n, door)    delay " +
         b +
         "\n"
         "stimulus {\n"
         "    at 0ns     open_n = 0, close_n = 0\n"
         "    settle\n"
         "    expect door = 1, door_n = 1\n"
         "    after 1ns  open_n = 1, close_n = 1\n"
         "    settle\n"
         "}\n";
}

design load_text(const std::string& text) {
  return settle::testing::load_text(text, "door.settle");
}

design load_file(const std::string& path) { return settle::testing::load_file(path); }

sweep_plan plan_of(const std::string& spec, std::uint64_t seed, std::size_t gates) {
  std::string err;
  auto p = plan_sweep(spec, seed, gates, &err);
  INFO(err);
  REQUIRE(p);
  return *p;
}

sweep_result sweep(const design& d, const std::string& spec, unsigned threads = 2,
                   std::uint64_t seed = 1) {
  sweep_options o;
  o.threads = threads;
  return run_sweep(d, plan_of(spec, seed, delay_variables(d)), o);
}

}  // namespace

TEST_CASE("random and gauss corners draw a gate's rise and fall independently", "[sweep][corner]") {
  // One gate with the same range on both edges. Independent draws have a
  // sample correlation near 0: under independence r is about normal with
  // standard deviation 1/sqrt(n) (common practice), 0.016 for n = 4000, so
  // |r| < 0.08 is five deviations. The seeds are fixed: the test replays.
  const design d = load_text(door_latch("rise 10ps..50ps fall 10ps..50ps", "20ps"));
  for (auto kind : {corner::kind::random, corner::kind::gauss}) {
    const std::size_t n = 4000;
    double sr = 0, sf = 0, srr = 0, sff = 0, srf = 0;
    bool slow_rise_fast_fall = false;
    delay_table t;
    for (std::uint64_t i = 0; i < n; ++i) {
      corner c;
      c.what = kind;
      c.seed = 5;
      c.index = i;
      fill_delays(d, c, t);
      const double r = double(t.rise[0]), f = double(t.fall[0]);
      sr += r, sf += f, srr += r * r, sff += f * f, srf += r * f;
      slow_rise_fast_fall = slow_rise_fast_fall || (r > 40'000 && f < 20'000);
    }
    const double cov = srf / n - sr / n * sf / n;
    const double corr = cov / std::sqrt((srr / n - sr / n * sr / n) * (sff / n - sf / n * sf / n));
    INFO(corner{kind}.name() << " r = " << corr);
    CHECK(std::abs(corr) < 0.08);
    CHECK(slow_rise_fast_fall);
  }
  // The gate is one variable in extremes and exhaustive: equal ranges move together.
  CHECK(delay_variables(d) == 1);
}

TEST_CASE("extremes has 3 + 2g corners in the order fill_delays defines", "[sweep][plan]") {
  for (std::size_t g : {0u, 1u, 2u, 7u, 40u}) {
    const auto p = plan_of("extremes", 1, g);
    CHECK(p.corners == 3 + 2 * g);
    CHECK(p.sampled == 0);
    CHECK(p.corner_at(0).name() == "extremes#0");
    CHECK(p.corner_at(p.corners - 1).name() == "extremes#" + std::to_string(2 + 2 * g));
  }
}

TEST_CASE("exhaustive has 2^g corners and refuses more than 2^20", "[sweep][plan]") {
  for (std::size_t g : {0u, 1u, 5u, 20u})
    CHECK(plan_of("exhaustive", 1, g).corners == std::uint64_t{1} << g);
  std::string err;
  CHECK_FALSE(plan_sweep("exhaustive", 1, 21, &err));
  CHECK(err.find("2^21") != std::string::npos);
  CHECK(err.find("random:") != std::string::npos);
  CHECK_FALSE(plan_sweep("extremes+exhaustive", 1, 200, &err));
}

TEST_CASE("spec items number their corners in spec order", "[sweep][plan]") {
  const auto p = plan_of("extremes+random:3+gauss:2+interval+random:2", 7, 2);
  REQUIRE(p.corners == 7 + 3 + 2 + 2);
  CHECK(p.interval);
  CHECK(p.sampled == 7);
  std::vector<std::string> names;
  for (std::uint64_t i = 0; i < p.corners; ++i) names.push_back(p.corner_at(i).name());
  CHECK(names[6] == "extremes#6");
  CHECK(names[7] == "random:7#0");
  CHECK(names[9] == "random:7#2");
  CHECK(names[10] == "gauss:7#0");
  CHECK(names[11] == "gauss:7#1");
  // A second random item continues the numbering: no corner repeats.
  CHECK(names[12] == "random:7#3");
  CHECK(names[13] == "random:7#4");
  CHECK(std::set<std::string>(names.begin(), names.end()).size() == names.size());
  CHECK_FALSE(p.is_sampled(6));
  CHECK(p.is_sampled(7));
  CHECK(p.is_sampled(13));
}

TEST_CASE("bad corner specs are refused with a reason", "[sweep][plan]") {
  for (const char* bad :
       {"", "extremes+", "random:", "random:0", "random:x", "gauss:-1", "corners", "interval+"}) {
    std::string err;
    INFO(bad);
    CHECK_FALSE(plan_sweep(bad, 1, 3, &err));
    CHECK_FALSE(err.empty());
  }
}

TEST_CASE("interval alone is a plan of no corners judged by the min-max run", "[sweep][plan]") {
  const auto p = plan_of("interval", 1, 3);
  CHECK(p.interval);
  CHECK(p.corners == 0);
  CHECK(p.interval_only());
  CHECK_FALSE(plan_of("extremes+interval", 1, 3).interval_only());
}

TEST_CASE("every sweep corner's name replays the same delay table", "[sweep][plan]") {
  const design d = load_file(SETTLE_SOURCE_DIR "/examples/arbiter.settle");
  const auto p = plan_of("extremes+exhaustive+random:20+gauss:20", 5, d.nets.gate_count());
  delay_table a, b;
  for (std::uint64_t i = 0; i < p.corners; ++i) {
    const corner c = p.corner_at(i);
    std::string err;
    const auto back = parse_corner(c.name(), &err);
    REQUIRE(back);
    fill_delays(d, c, a);
    fill_delays(d, *back, b);
    CHECK(a.rise == b.rise);
    CHECK(a.fall == b.fall);
  }
}

// A NAND latch released from (0, 0) is a critical race: the gate that falls
// first wins (handbook behaviour of set/reset latches; METHODS.md section 7).
TEST_CASE("overlapping delay ranges: the latch release settles two ways, and each witness replays",
          "[sweep]") {
  const design d = load_text(door_latch("40ps..60ps", "40ps..60ps"));
  const auto r = sweep(d, "extremes+random:200");
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[0].verdict == sweep_verdict::deterministic);
  CHECK(r.steps[0].pass);
  const auto& st = r.steps[1];
  // The exact ties of extremes (all-min, all-max, typ) oscillate, the rest settle: mixed.
  CHECK(st.verdict == sweep_verdict::mixed);
  CHECK(st.first_divergence);
  CHECK_FALSE(st.pass);
  CHECK_FALSE(r.pass());
  CHECK_FALSE(st.unseen_outcome_bound);
  std::set<std::vector<logic>> settled;
  std::uint64_t total = 0;
  for (const auto& o : st.outcomes) {
    total += o.count;
    if (o.status == step_status::settled) settled.insert(o.values);
    // Replaying the witness by name gives this outcome again (issue 3's replay contract).
    std::string err;
    const auto c = parse_corner(o.witness_name, &err);
    REQUIRE(c);
    delay_table t;
    fill_delays(d, *c, t);
    const auto run = run_stimulus(d, t, run_options{});
    CHECK(run.steps[1].status == o.status);
    CHECK(run.steps[1].values == o.values);
    CHECK(run.steps[1].settle >= o.settle.min);
    CHECK(run.steps[1].settle <= o.settle.max);
  }
  CHECK(total == r.corners);
  const std::set<std::vector<logic>> both = {{logic::zero, logic::one}, {logic::one, logic::zero}};
  CHECK(settled == both);
  // Equal extremes (all-min, all-max, typ) tie exactly: those corners oscillate.
  CHECK(std::any_of(st.outcomes.begin(), st.outcomes.end(),
                    [](const sweep_outcome& o) { return o.status == step_status::oscillating; }));
  // Random corners alone (no exact tie among these draws) settle both ways.
  const auto sampled = sweep(d, "random:200");
  CHECK(sampled.steps[1].verdict == sweep_verdict::nondeterministic);
  CHECK(sampled.steps[1].outcomes.size() == 2);
}

TEST_CASE("non-overlapping ranges: the faster gate always wins and interval proves it", "[sweep]") {
  const design d = load_text(door_latch("20ps..30ps", "40ps..60ps"));
  const auto r = sweep(d, "extremes+random:300+gauss:100+interval");
  REQUIRE(r.steps.size() == 2);
  const auto& st = r.steps[1];
  CHECK(st.verdict == sweep_verdict::deterministic);
  CHECK_FALSE(st.first_divergence);
  CHECK(st.pass);
  CHECK(r.pass());
  REQUIRE(st.outcomes.size() == 1);
  CHECK(st.outcomes[0].values == std::vector<logic>{logic::zero, logic::one});
  CHECK(st.outcomes[0].count == r.corners);
  // Rule of three over the 400 sampled corners (Hanley and Lippman-Hand 1983).
  REQUIRE(st.unseen_outcome_bound);
  CHECK(*st.unseen_outcome_bound == Approx(3.0 / 400));
  REQUIRE(st.interval);
  CHECK(st.interval->proven);
  CHECK(st.interval->values == st.outcomes[0].values);
  // Settle time: the door NAND falls within 20..30ps (the only change). Lower median of the sorted
  // times.
  CHECK(st.outcomes[0].settle.min == 20'000);
  CHECK(st.outcomes[0].settle.max == 30'000);
}

TEST_CASE("exactly equal fixed delays: the release oscillates with period 2 x the gate delay",
          "[sweep]") {
  // Common practice: the ideal model of metastability; both NANDs fall and rise together.
  const design d = load_text(door_latch("50ps", "50ps"));
  const auto r = sweep(d, "extremes+random:50");
  const auto& st = r.steps[1];
  CHECK(st.verdict == sweep_verdict::oscillating);
  CHECK(st.first_divergence);
  REQUIRE(st.outcomes.size() == 1);
  CHECK(st.outcomes[0].status == step_status::oscillating);
  CHECK(st.outcomes[0].period == 100'000);
  CHECK_FALSE(r.pass());
}

TEST_CASE("outcome shares carry their Wilson interval and the lower median", "[sweep]") {
  const design d = load_text(door_latch("40ps..60ps", "40ps..60ps"));
  const auto p = plan_of("random:101", 3, d.nets.gate_count());
  const auto r = run_sweep(d, p, sweep_options{});
  // Recompute every corner alone, in order, to check grouping, witness and median.
  for (const auto& o : r.steps[1].outcomes) {
    std::vector<time_fs> times;
    std::uint64_t first = UINT64_MAX;
    delay_table t;
    for (std::uint64_t i = 0; i < p.corners; ++i) {
      fill_delays(d, p.corner_at(i), t);
      const auto run = run_stimulus(d, t, run_options{});
      if (run.steps[1].status != o.status || run.steps[1].values != o.values) continue;
      if (first == UINT64_MAX) first = i;
      times.push_back(run.steps[1].settle);
    }
    std::sort(times.begin(), times.end());
    CHECK(o.count == times.size());
    CHECK(o.witness == first);
    CHECK(o.settle.median == times[(times.size() - 1) / 2]);
    const auto ci = wilson_interval(o.count, p.corners);
    CHECK(o.share_ci95.lo == ci.lo);
    CHECK(o.share_ci95.hi == ci.hi);
    CHECK(o.share == Approx(static_cast<double>(o.count) / 101));
  }
}

TEST_CASE("the grouping is identical whatever the thread count", "[sweep][threads]") {
  const design d = load_file(SETTLE_SOURCE_DIR "/examples/arbiter.settle");
  const auto one = sweep(d, "extremes+random:400+gauss:100", 1);
  for (unsigned threads : {2u, 3u, 8u}) {
    const auto many = sweep(d, "extremes+random:400+gauss:100", threads);
    CHECK(many.events == one.events);
    REQUIRE(many.steps.size() == one.steps.size());
    for (std::size_t k = 0; k < one.steps.size(); ++k) {
      const auto &a = one.steps[k], &b = many.steps[k];
      CHECK(a.verdict == b.verdict);
      REQUIRE(a.outcomes.size() == b.outcomes.size());
      for (std::size_t o = 0; o < a.outcomes.size(); ++o) {
        CHECK(a.outcomes[o].values == b.outcomes[o].values);
        CHECK(a.outcomes[o].count == b.outcomes[o].count);
        CHECK(a.outcomes[o].witness == b.outcomes[o].witness);
        CHECK(a.outcomes[o].settle.median == b.outcomes[o].settle.median);
      }
    }
  }
}

TEST_CASE("the sensor FIFO's C-element pipeline is deterministic under extremes+random:500",
          "[sweep]") {
  // Muller C-elements (Muller and Bartky 1959) in a four-phase pipeline are
  // speed-independent: every step settles the same way whatever the delays.
  const design d = load_file(SETTLE_SOURCE_DIR "/examples/fifo_stage.settle");
  const auto r = sweep(d, "extremes+random:500");
  CHECK(r.corners == 3 + 2 * d.nets.gate_count() + 500);
  for (const auto& st : r.steps) {
    INFO("step " << st.index << ": " << st.label);
    CHECK(st.verdict == sweep_verdict::deterministic);
    for (const auto& e : st.expects) CHECK(e.failing == 0);
  }
  CHECK(r.pass());
}

namespace {

// No sampled corner may end a step with a binary value other than the one a
// settled interval run gives that net (Breuer and Friedman 1976; Abramovici,
// Breuer and Friedman 1990, ch. 3: the min-max run covers every delay in range).
void check_sound(const design& d, const sweep_result& r, std::size_t& binary_checked) {
  for (const auto& st : r.steps) {
    if (!st.interval || st.interval->status != step_status::settled) continue;
    for (std::size_t k = 0; k < st.interval->values.size(); ++k) {
      const logic v = st.interval->values[k];
      if (v == logic::x) continue;
      ++binary_checked;
      for (const auto& o : st.outcomes) {
        INFO(d.path << " step " << st.index << " net " << d.nets.net_name[r.reported[k]]
                    << " witness " << o.witness_name);
        CHECK(o.values[k] == v);
      }
    }
    if (st.interval->proven) CHECK(st.verdict == sweep_verdict::deterministic);
  }
}

}  // namespace

TEST_CASE("soundness: no sampled corner contradicts a binary interval value (examples)",
          "[sweep][soundness]") {
  std::size_t checked = 0, files = 0;
  for (const auto& e : std::filesystem::directory_iterator(SETTLE_SOURCE_DIR "/examples")) {
    if (e.path().extension() != ".settle") continue;
    ++files;
    const design d = load_file(e.path().string());
    check_sound(d, sweep(d, "extremes+random:200+gauss:100+interval"), checked);
  }
  // The examples' replacement stimuli, on the designs they belong to.
  for (const auto& [settle_file, stim] : {std::pair{"debounce.settle", "debounce_chatter.stim"},
                                          std::pair{"delay_ring.settle", "delay_ring_free.stim"}}) {
    load_options lo;
    lo.stim_path = std::string(SETTLE_SOURCE_DIR "/examples/") + stim;
    diagnostics diags;
    auto d = load_design(std::string(SETTLE_SOURCE_DIR "/examples/") + settle_file, lo, diags);
    REQUIRE(d);
    check_sound(*d, sweep(*d, "extremes+random:200+interval"), checked);
  }
  CHECK(files >= 4);
  CHECK(checked > 20);  // 68 binary interval values when written
}

TEST_CASE("soundness: no sampled corner contradicts a binary interval value (250 random circuits)",
          "[sweep][soundness]") {
  // random_feedback_circuit: a seeded generator of small feedback circuits (invented data, tests
  // only).
  std::size_t checked = 0, proven = 0;
  for (std::uint64_t seed = 1; seed <= 250; ++seed) {
    const int gates = 2 + static_cast<int>(seed % 5);
    const design d = testing::random_feedback_circuit(seed, gates);
    const auto r = sweep(d, "extremes+random:60+interval", 2, seed);
    check_sound(d, r, checked);
    for (const auto& st : r.steps) proven += st.interval && st.interval->proven;
  }
  // Not vacuous: thousands of binary interval values are compared (2811 when written).
  CHECK(checked > 500);
  CHECK(proven > 0);
}
