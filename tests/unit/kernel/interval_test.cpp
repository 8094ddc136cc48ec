// The min-max ambiguity run: what it proves, and that no sampled corner ever contradicts it.
#include "sim/kernel/interval.hpp"

#include <catch2/catch.hpp>
#include <random>

#include "tests/unit/netlist_builder.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic O = logic::zero, I = logic::one, X = logic::x;

design nand_latch_release(delay_range dq, delay_range dqn) {
  builder b;
  b.input("s_n"), b.input("r_n");
  b.gate(gate_kind::nand, "q", {"s_n", "qn"}, dq);
  b.gate(gate_kind::nand, "qn", {"r_n", "q"}, dqn);
  b.output("q"), b.output("qn");
  b.at(0, {{"s_n", O}, {"r_n", O}}).settle();
  b.after(1000 * ps, {{"s_n", I}, {"r_n", I}}).settle();
  return b.finish();
}

}  // namespace

// Abramovici, Breuer and Friedman (1990), ch. 3: overlapping ambiguity windows
// of two racing gates leave the outcome unknown; disjoint windows decide it.
TEST_CASE("interval runs prove a latch release with disjoint ranges and not with overlapping ones",
          "[interval]") {
  auto overlap =
      run_interval(nand_latch_release(range(35 * ps, 55 * ps), range(35 * ps, 55 * ps)), {});
  REQUIRE(overlap.steps.size() == 2);
  CHECK(overlap.steps[0].proven);
  CHECK(overlap.steps[0].values == std::vector<logic>{I, I});
  CHECK_FALSE(overlap.steps[1].proven);
  CHECK(overlap.steps[1].values[0] == X);

  // q's gate is always faster: q falls first and holds qn at 1.
  auto disjoint =
      run_interval(nand_latch_release(range(10 * ps, 20 * ps), range(50 * ps, 60 * ps)), {});
  CHECK(disjoint.steps[1].proven);
  CHECK(disjoint.steps[1].values == std::vector<logic>{O, I});
}

TEST_CASE("an interval run of a clean chain is binary after the last window closes", "[interval]") {
  builder b;
  b.input("a");
  b.gate(gate_kind::inv, "b", {"a"}, range(10 * ps, 30 * ps));
  b.gate(gate_kind::inv, "c", {"b"}, range(10 * ps, 30 * ps));
  b.output("c");
  b.at(0, {{"a", O}}).settle().after(1000 * ps, {{"a", I}}).settle();
  auto r = run_interval(b.finish(), {});
  CHECK(r.steps[1].proven);
  CHECK(r.steps[1].values == std::vector<logic>{I});
}

// Soundness (Breuer and Friedman 1976: the ambiguity run covers every delay
// assignment): on seeded random feedback circuits, a binary interval value is
// the value of every sampled corner that settled.
TEST_CASE("no sampled corner contradicts a binary interval value", "[interval][property]") {
  std::mt19937_64 rng(20261202);
  const gate_kind kinds[] = {gate_kind::nand, gate_kind::nor,  gate_kind::inv, gate_kind::celem,
                             gate_kind::xor_, gate_kind::and_, gate_kind::or_};
  int proven_values = 0, checked = 0;
  for (int c = 0; c < 250; ++c) {
    builder b;
    const int inputs = 2, gates = 3 + static_cast<int>(rng() % 5);
    for (int i = 0; i < inputs; ++i) b.input("i" + std::to_string(i));
    auto pick = [&](int self) {
      int k = static_cast<int>(rng() % (inputs + gates));
      if (k == self + inputs && rng() % 2) k = (k + 1) % (inputs + gates);
      return k < inputs ? "i" + std::to_string(k) : "g" + std::to_string(k - inputs);
    };
    for (int g = 0; g < gates; ++g) {
      gate_kind k = kinds[rng() % std::size(kinds)];
      const time_fs lo = (5 + rng() % 40) * ps, hi = lo + (rng() % 30) * ps;
      const bool transport = rng() % 6 == 0;
      const std::string out = "g" + std::to_string(g);
      if (k == gate_kind::inv)
        b.gate(k, out, {pick(g)}, range(lo, hi), transport);
      else
        b.gate(k, out, {pick(g), pick(g)}, range(lo, hi), transport);
    }
    for (int g = 0; g < gates; ++g) b.output("g" + std::to_string(g));
    for (int s = 0; s < 4; ++s) {
      b.after((s == 0 ? 0 : 2000) * ps,
              {{"i0", from_bool(rng() & 1)}, {"i1", from_bool(rng() & 1)}})
          .settle();
    }
    design d = b.finish();
    run_options opt;
    opt.horizon = 20000 * ps;
    auto iv = run_interval(d, opt);
    for (std::uint64_t k = 0; k < 40; ++k) {
      corner cn;
      cn.what = k < 2 ? (k == 0 ? corner::kind::min : corner::kind::max) : corner::kind::random;
      cn.seed = c;
      cn.index = k;
      delay_table t;
      fill_delays(d, cn, t);
      auto r = run_stimulus(d, t, opt);
      for (std::size_t s = 0; s < r.steps.size() && s < iv.steps.size(); ++s) {
        if (iv.steps[s].status != step_status::settled) continue;
        for (std::size_t n = 0; n < r.reported.size(); ++n) {
          const logic want = iv.steps[s].values[n];
          if (want == X) continue;
          ++checked;
          INFO("circuit " << c << " corner " << cn.name() << " step " << s + 1 << " net " << n);
          REQUIRE(r.steps[s].values[n] == want);
        }
      }
    }
    for (auto& s : iv.steps)
      for (auto v : s.values) proven_values += v != X;
  }
  CHECK(proven_values > 100);  // the property is not vacuous
  CHECK(checked > 10000);
}
