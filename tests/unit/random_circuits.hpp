// A seeded generator of small random feedback circuits with a stimulus, for property tests.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "sim/model/design.hpp"

namespace settle::testing {

/// A small deterministic generator (splitmix64), the same on every platform.
class seeded_rng {
 public:
  explicit seeded_rng(std::uint64_t seed) : s_(seed) {}
  std::uint64_t next() {
    std::uint64_t z = (s_ += 0x9e3779b97f4a7c15ull);
    z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
    z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
    return z ^ (z >> 31);
  }
  /// Uniform in [0, n).
  std::uint32_t below(std::uint32_t n) { return static_cast<std::uint32_t>(next() % n); }
  bool coin() { return next() & 1; }

 private:
  std::uint64_t s_;
};

/// Shape of the circuits random_feedback_circuit builds.
struct random_circuit_options {
  int inputs = 2;         ///< primary inputs in0, in1, ...
  int steps = 4;          ///< stimulus steps: all inputs at 0ns, then flips of one or two inputs
  bool watch_all = true;  ///< watch every gate output, so run results carry the full state
  time_fs min_lo = 10'000,
          min_hi = 50'000;  ///< a gate's min delay is drawn from [min_lo, min_hi) fs
  time_fs spread = 40'000;  ///< its max is min + [0, spread) fs
};

/// A design of `gates` gates n0, n1, ... of mixed kinds (not, buf, and, nand,
/// or, nor, xor, xnor, c, maj, mux) whose inputs are drawn from the primary
/// inputs and every gate output, so loops are common. Every gate and input has
/// a binary init value (inputs start at their first-step values), outputs are
/// the last two gates, every delay is a random inertial range. The same seed
/// always gives the same design. Invented data, for tests only.
inline design random_feedback_circuit(std::uint64_t seed, int gates,
                                      const random_circuit_options& o = random_circuit_options{}) {
  seeded_rng rng(seed);
  design d;
  d.path = "random:" + std::to_string(seed);
  netlist& n = d.nets;
  n.begin();
  std::vector<net_id> ins, outs;
  for (int i = 0; i < o.inputs; ++i) {
    ins.push_back(n.add_net("in" + std::to_string(i), 0));
    n.inputs.push_back(ins.back());
  }
  for (int g = 0; g < gates; ++g) outs.push_back(n.add_net("n" + std::to_string(g), 0));
  auto pick = [&](int self) {
    // Prefer other gates; inputs a third of the time.
    if (rng.below(3) == 0 || gates == 1)
      return ins[rng.below(static_cast<std::uint32_t>(ins.size()))];
    for (;;) {
      const int g = static_cast<int>(rng.below(static_cast<std::uint32_t>(gates)));
      if (g != self) return outs[g];
    }
  };
  static constexpr gate_kind kinds[] = {
      gate_kind::inv, gate_kind::buf,  gate_kind::and_, gate_kind::nand,  gate_kind::or_,
      gate_kind::nor, gate_kind::xor_, gate_kind::xnor, gate_kind::celem, gate_kind::maj,
      gate_kind::mux, gate_kind::nand, gate_kind::nor,  gate_kind::inv};
  for (int g = 0; g < gates; ++g) {
    const gate_kind k = kinds[rng.below(std::size(kinds))];
    int arity = 2;
    if (k == gate_kind::inv || k == gate_kind::buf)
      arity = 1;
    else if (k == gate_kind::maj || k == gate_kind::mux)
      arity = 3;
    else if (k != gate_kind::celem && rng.below(4) == 0)
      arity = 3;
    std::vector<net_id> fanin;
    for (int a = 0; a < arity; ++a) fanin.push_back(pick(g));
    auto edge = [&] {
      const time_fs lo = o.min_lo + rng.next() % (o.min_hi - o.min_lo);
      const time_fs hi = lo + rng.next() % o.spread;
      return delay_range{lo, lo + (hi - lo) / 2, hi};
    };
    const delay_range rise = edge(), fall = edge();
    n.add_gate(k, outs[g], fanin, {}, gate_delay{rise, fall, false});
    n.init[outs[g]] = from_bool(rng.coin());
  }
  n.outputs.push_back(outs[gates - 1]);
  if (gates > 1) n.outputs.push_back(outs[gates - 2]);
  n.finish();

  std::vector<logic> level(ins.size());
  for (std::size_t s = 0; s < static_cast<std::size_t>(o.steps); ++s) {
    step_spec st;
    stim_action a;
    a.what = s == 0 ? stim_action::kind::at : stim_action::kind::after;
    a.time = s == 0 ? 0 : 1'000'000;  // after 1ns
    if (s == 0) {
      for (std::size_t i = 0; i < ins.size(); ++i) {
        level[i] = from_bool(rng.coin());
        n.init[ins[i]] = level[i];
        a.assigns.push_back({ins[i], level[i]});
      }
    } else {
      const std::size_t first = rng.below(static_cast<std::uint32_t>(ins.size()));
      const int flips = ins.size() > 1 && rng.coin() ? 2 : 1;
      for (int f = 0; f < flips; ++f) {
        const std::size_t i = (first + f) % ins.size();
        level[i] = level[i] == logic::one ? logic::zero : logic::one;
        a.assigns.push_back({ins[i], level[i]});
      }
    }
    st.actions.push_back(a);
    st.label = "step " + std::to_string(s + 1);
    d.stim.steps.push_back(std::move(st));
  }
  if (o.watch_all)
    for (net_id w : outs) d.stim.watch.push_back(w);
  return d;
}

}  // namespace settle::testing
