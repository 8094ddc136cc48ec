// Race culprits: ddmin on known predicates and a planted two-gate race.
#include "sim/analysis/culprit.hpp"

#include <algorithm>
#include <catch2/catch.hpp>

#include "parser/load.hpp"

TEST_CASE("ddmin: returns a 1-minimal failing subset", "[culprit]") {
  // Zeller and Hildebrandt 2002 (IEEE TSE 28(2)), section 3: ddmin's result is
  // 1-minimal. Here failure needs both 3 and 7, so {3, 7} is the only 1-minimal set.
  std::vector<std::uint32_t> items(16);
  for (std::uint32_t i = 0; i < 16; ++i) items[i] = i;
  auto needs_3_and_7 = [](const std::vector<std::uint32_t>& s) {
    return std::count(s.begin(), s.end(), 3u) && std::count(s.begin(), s.end(), 7u);
  };
  std::size_t tests = 0;
  CHECK(settle::ddmin(items, needs_3_and_7, 4096, &tests) == std::vector<std::uint32_t>{3, 7});
  CHECK(tests > 0);
  CHECK(tests < 16 * 16);  // far below the quadratic worst case (paper, section 4)
  // One element alone.
  auto needs_11 = [](const std::vector<std::uint32_t>& s) {
    return std::count(s.begin(), s.end(), 11u) > 0;
  };
  CHECK(settle::ddmin(items, needs_11) == std::vector<std::uint32_t>{11});
  // Either of two: a 1-minimal answer is one of them.
  auto needs_2_or_9 = [](const std::vector<std::uint32_t>& s) {
    return std::count(s.begin(), s.end(), 2u) || std::count(s.begin(), s.end(), 9u);
  };
  const auto one = settle::ddmin(items, needs_2_or_9);
  REQUIRE(one.size() == 1);
  CHECK((one[0] == 2 || one[0] == 9));
}

TEST_CASE("culprits: a planted two-gate race inside a larger design", "[culprit]") {
  // tests/data/margin_planted.settle: a sensor FIFO handshake and a lamp
  // driver around a cross-coupled NAND cell (arb.cell_a, arb.cell_b) whose
  // requests come straight from inputs. Corner A: every gate at min except
  // cell_a 40ps, cell_b 45ps (a wins). Corner B: every gate at max except
  // cell_a 44ps, cell_b 41ps (b wins). Moving cell_a alone gives 44 vs 45
  // (a still wins), moving cell_b alone 40 vs 41 (a still wins): only the two
  // together flip the grant, and no other gate takes part in the race.
  settle::diagnostics diags;
  const auto d = settle::load_design(
      std::string(SETTLE_SOURCE_DIR) + "/tests/data/margin_planted.settle", {}, diags);
  REQUIRE(d);
  const auto& n = d->nets;
  const settle::gate_id ga = n.driver[n.find("arb.cell_a")], gb = n.driver[n.find("arb.cell_b")];
  REQUIRE(ga != settle::no_id);
  REQUIRE(gb != settle::no_id);
  settle::delay_table a, b;
  settle::corner lo, hi;
  lo.what = settle::corner::kind::min;
  hi.what = settle::corner::kind::max;
  settle::fill_delays(n, lo, a);
  settle::fill_delays(n, hi, b);
  auto set = [](settle::delay_table& t, settle::gate_id g, settle::time_fs v) {
    t.rise[g] = t.fall[g] = v;
  };
  set(a, ga, 40'000), set(a, gb, 45'000);
  set(b, ga, 44'000), set(b, gb, 41'000);
  const std::string names[2] = {"A", "B"};
  // The race is step 3 of the stimulus (both requests at once).
  const auto r = settle::find_culprits(*d, {}, 3, a, b, names);
  REQUIRE(r.gates.size() == 2);
  std::vector<settle::gate_id> got{r.gates[0].gate, r.gates[1].gate};
  std::sort(got.begin(), got.end());
  std::vector<settle::gate_id> want{ga, gb};
  std::sort(want.begin(), want.end());
  CHECK(got == want);
  CHECK(r.differing > 10);  // the larger design: many gates differ between A and B
  CHECK(r.minimal);
  // The competing paths end at the two different grants, each through its own cell.
  REQUIRE_FALSE(r.path[0].empty());
  REQUIRE_FALSE(r.path[1].empty());
  CHECK(n.net_name[r.path[0].back().net] != n.net_name[r.path[1].back().net]);
  auto through = [&](int side, const char* net) {
    return std::any_of(r.path[side].begin(), r.path[side].end(),
                       [&](const settle::path_hop& h) { return n.net_name[h.net] == net; });
  };
  CHECK(through(0, "arb.cell_a"));
  CHECK(through(1, "arb.cell_b"));
  // Paths are in time order.
  for (int side = 0; side < 2; ++side)
    for (std::size_t i = 1; i < r.path[side].size(); ++i)
      CHECK(r.path[side][i - 1].time < r.path[side][i].time);
}

TEST_CASE("culprits: the same outcome gives no culprits", "[culprit]") {
  settle::diagnostics diags;
  const auto d = settle::load_design(
      std::string(SETTLE_SOURCE_DIR) + "/tests/data/margin_planted.settle", {}, diags);
  REQUIRE(d);
  settle::corner lo, hi;
  lo.what = settle::corner::kind::min;
  hi.what = settle::corner::kind::max;
  // Step 1 (everything idle) settles the same way at min and max.
  const auto r = settle::find_culprits(*d, {}, 1, lo, hi);
  CHECK(r.gates.empty());
}
