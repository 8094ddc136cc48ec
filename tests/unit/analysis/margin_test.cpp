// Delay margins by bisection, settle-time margins and baselines, checked against hand arithmetic.
#include "sim/analysis/margin.hpp"

#include <catch2/catch.hpp>
#include <chrono>
#include <cmath>
#include <thread>

#include "parser/load.hpp"
#include "sim/analysis/baseline.hpp"

namespace {

settle::design load_data(const std::string& name) {
  settle::diagnostics diags;
  auto d = settle::load_design(std::string(SETTLE_SOURCE_DIR) + "/tests/data/" + name, {}, diags);
  REQUIRE(d);
  return std::move(*d);
}

// One inverter, y = not(a) at 40ps..60ps, with a = 0 and `expect y = WANT` after it settles.
settle::design inverter(char want) {
  settle::diagnostics diags;
  auto d = settle::load_design_text(
      std::string("input a\noutput y\ny = not(a) delay 40ps..60ps\nstimulus {\n at 0ns a = 0\n "
                  "settle\n expect y = ") +
          want + "\n}\n",
      "inverter.settle", {}, diags);
  REQUIRE(d);
  return std::move(*d);
}

}  // namespace

TEST_CASE("margin: bisection finds the delay ratio at which two chains swap order", "[margin]") {
  // Hand arithmetic (tests/data/margin_race.settle): at spread w the early
  // chain (3 x 40ps..60ps) arrives by 150ps + 3 x 10ps x w at the latest and
  // the late chain (4 x 36ps..44ps) at 160ps - 4 x 4ps x w at the earliest.
  // The late chain can take the NAND cell once 160 - 16w < 150 + 30w, i.e.
  // w > 10/46 = 0.21739. With exhaustive corners the all-max/all-min corner
  // is among those run, so the largest passing point of the 1% grid is 21%.
  const auto d = load_data("margin_race.settle");
  settle::margin_options o;
  o.spec = "exhaustive";
  o.threads = 2;
  std::string err;
  const auto r = settle::find_margin(d, o, &err);
  REQUIRE(r);
  const double ratio = 10.0 / 46.0;
  CHECK(r->margin <= ratio);
  CHECK(ratio - r->margin <= o.resolution_pct / 100.0);
  CHECK(r->exact);
  REQUIRE(r->failure);
  CHECK(r->failure->step == 2);
  CHECK(r->failure->spread > ratio);
  CHECK(r->failure->spread - r->margin == Approx(0.01));
  CHECK(r->failure->witness.find("@0.22") != std::string::npos);
  // Steps 1 and 3 hold at every spread searched.
  REQUIRE(r->steps.size() == 3);
  CHECK(r->steps[0].at_ceiling);
  CHECK(r->steps[2].at_ceiling);
  CHECK_FALSE(r->passes_as_written());
  // Every probe is a full pass over the 2^9 corners (sweep's exhaustive
  // formula): of the 11 gates the two NANDs have fixed delays and are no
  // corner variables.
  CHECK(r->corners_per_probe == 512);
  CHECK(r->corner_runs == 512 * r->probes.size());
}

TEST_CASE("margin: sampled corners can only overstate the exact margin", "[margin]") {
  // A failing corner seen at w is a real failure at w, so a random spec's
  // bisection never stops below the exhaustive one (given monotone failure).
  const auto d = load_data("margin_race.settle");
  settle::margin_options exact, sampled;
  exact.spec = "exhaustive";
  sampled.spec = "random:100";
  std::string err;
  const auto a = settle::find_margin(d, exact, &err);
  const auto b = settle::find_margin(d, sampled, &err);
  REQUIRE(a);
  REQUIRE(b);
  CHECK(b->margin >= a->margin);
  CHECK(b->sampled);
  CHECK_FALSE(b->exact);
  CHECK(b->confidence_note().find("lower-confidence") != std::string::npos);
}

TEST_CASE("margin: settle-time margin of a budget at the written spread", "[margin]") {
  // Step 3 (ready falls) at extremes#1, every gate at max: the late chain
  // holds the cell there (4 x 44ps = 176ps < 3 x 60ps = 180ps), so the
  // release runs 176ps + 30ps (NAND rises) + 30ps (grant falls) = 236ps.
  // No extremes corner is slower: the early winner's release at most
  // 4 x 44 + ... or 180 + 30 + 30 needs the early chain to win at all-max,
  // which it does not. Budget 300ps: margin 64ps.
  const auto d = load_data("margin_race.settle");
  settle::margin_options o;
  o.spec = "extremes";
  std::string err;
  const auto r = settle::find_margin(d, o, &err);
  REQUIRE(r);
  REQUIRE(r->within.size() == 1);
  CHECK(r->within[0].step == 3);
  CHECK(r->within[0].budget == 300'000);
  CHECK(r->within[0].worst == 236'000);
  CHECK(r->within[0].worst_corner == "extremes#1");
  CHECK(r->within[0].margin_fs == 64'000);
  CHECK(r->within[0].unsettled == 0);
}

TEST_CASE("margin: a step that fails at the typical delays reports 0", "[margin]") {
  const auto d = inverter('0');
  settle::margin_options o;
  o.spec = "extremes";
  std::string err;
  const auto r = settle::find_margin(d, o, &err);
  REQUIRE(r);
  CHECK(r->fails_at_zero);
  CHECK(r->margin == 0);
  REQUIRE(r->failure);
  CHECK(r->failure->spread == 0);
  CHECK(r->probes.size() == 2);  // w = 1 fails, w = 0 fails: nothing to bisect
}

TEST_CASE("margin: a budget spent before the written spread is probed stops the search",
          "[margin]") {
  // y = not(a) with a = 0 is 1 at any delay (Boolean algebra), so the step
  // passes at the ceiling (200%) and nothing is left to bisect; the written
  // spread (100%) is still to be probed when the budget runs out. margin.hpp's
  // contract for a stopped search: the finished probes' margins, no sweep
  // at the written spread, and the reason.
  const auto d = inverter('1');
  settle::margin_options o;
  o.spec = "extremes";
  o.threads = 1;
  o.ceiling_pct = 200;
  o.timeout_s = 0.5;
  o.progress = [&](double, std::uint64_t, bool) {
    std::this_thread::sleep_for(std::chrono::duration<double>(o.timeout_s + 0.1));
  };
  std::string err;
  const auto r = settle::find_margin(d, o, &err);
  REQUIRE(r);
  CHECK(r->stopped == settle::sweep_stop::timeout);
  REQUIRE(r->probes.size() == 1);
  CHECK(r->probes[0].spread == 2.0);
  CHECK(r->probes[0].pass);
  REQUIRE(r->steps.size() == 1);
  CHECK(r->steps[0].at_ceiling);
  CHECK(r->at_ceiling);
  CHECK(r->written.steps.empty());
  CHECK(r->within.empty());
}

TEST_CASE("margin: bad options are refused", "[margin]") {
  const auto d = load_data("margin_race.settle");
  std::string err;
  settle::margin_options o;
  o.resolution_pct = 0;
  CHECK_FALSE(settle::find_margin(d, o, &err));
  o.resolution_pct = 1;
  o.spec = "nonsense";
  CHECK_FALSE(settle::find_margin(d, o, &err));
  CHECK_FALSE(err.empty());
}

TEST_CASE("baseline: text round trip and versions", "[margin][baseline]") {
  settle::baseline_file f;
  f.written_by = "settle test";
  settle::baseline_entry e;
  e.design = "a.settle";
  e.spec = "extremes";
  e.margin_pct = 21;
  e.steps = {{1, "at 0ns a = 1", 100, true}, {2, "after 1ns a = 0", 21, false}};
  e.within = {{2, 0, 300'000, 64'000, 0}};
  f.designs.push_back(e);
  std::string err;
  const auto back = settle::parse_baseline(settle::baseline_text(f), &err);
  REQUIRE(back);
  REQUIRE(back->designs.size() == 1);
  CHECK(back->designs[0].steps.size() == 2);
  CHECK(back->designs[0].within[0].margin_fs == 64'000);
  CHECK(settle::compare_baseline(e, back->designs[0], 2).changes.empty());

  // A newer file is refused; an older minimal one (only required fields) is read.
  CHECK_FALSE(settle::parse_baseline(R"({"format_version": 99, "designs": []})", &err));
  CHECK(err.find("newer") != std::string::npos);
  const auto old = settle::parse_baseline(
      R"({"format_version": 1, "designs": [{"design": "a.settle", "margin_pct": 30, "steps": [{"index": 2, "margin_pct": 30}]}]})",
      &err);
  REQUIRE(old);
  CHECK(old->designs[0].steps[0].margin_pct == 30);

  // A step that shrank by more than the tolerance is a regression named by its step.
  auto now = e;
  now.steps[1].margin_pct = 18;
  now.margin_pct = 18;
  const auto c = settle::compare_baseline(e, now, 2);
  REQUIRE(c.regressed());
  bool named = false;
  for (const auto& ch : c.changes) named = named || (ch.regression && ch.what.find("step 2") == 0);
  CHECK(named);
  now.steps[1].margin_pct = 19.5;
  now.margin_pct = 19.5;
  CHECK_FALSE(settle::compare_baseline(e, now, 2).regressed());  // 1.5 points: within tolerance
}
