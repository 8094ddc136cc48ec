// Ternary simulation (Eichelberger 1965, algorithms A and B) over a worklist of gates.
#include "sim/analysis/ternary.hpp"

#include "sim/kernel/eval.hpp"

namespace settle {
namespace {

// Iterates `step` on the gates of the worklist until nothing changes; a gate
// whose output changes puts its readers on the list. `step` returns the new
// output of gate g given the current values.
template <class Step>
void iterate(const netlist& n, std::vector<logic>& y, std::vector<gate_id>& work, Step&& step) {
  std::vector<std::uint8_t> queued(n.gate_count(), 0);
  for (gate_id g : work) queued[g] = 1;
  // Monotone operators on a finite lattice: chaotic iteration reaches the same
  // fixed point as the synchronous one, and each net moves at most once.
  while (!work.empty()) {
    const gate_id g = work.back();
    work.pop_back();
    queued[g] = 0;
    const net_id out = n.gate_out[g];
    const logic v = step(g);
    if (v == y[out]) continue;
    y[out] = v;
    for (auto i = n.fanout_begin[out]; i < n.fanout_begin[out + 1]; ++i) {
      const gate_id r = n.fanout[i];
      if (!queued[r]) {
        queued[r] = 1;
        work.push_back(r);
      }
    }
    if (holds_state(n.kind[g]) && !queued[g]) {  // a holding gate reads its own output
      queued[g] = 1;
      work.push_back(g);
    }
  }
}

}  // namespace

bool ternary_result::settled_binary(const netlist& n) const {
  for (net_id o : n.gate_out)
    if (after_b[o] == logic::x) return false;
  return true;
}

ternary_result ternary_change(const netlist& n, std::span<const logic> start,
                              std::span<const assignment> changes) {
  ternary_result r;
  std::vector<logic> y(start.begin(), start.end());
  std::vector<gate_id> work;
  work.reserve(n.gate_count());

  // Algorithm A: changing inputs go to lub(old, new); every gate is evaluated
  // once, since the start need not be stable (the first step starts from init).
  for (const auto& a : changes) y[a.net] = lub(y[a.net], a.value);
  for (gate_id g = 0; g < n.gate_count(); ++g) work.push_back(g);
  iterate(n, y, work, [&](gate_id g) {
    const logic present = y[n.gate_out[g]];
    return lub(present, eval_gate(n, g, y.data(), present));
  });
  r.after_a = y;

  // Algorithm B: the inputs take their new values; iterate F from A's result.
  for (const auto& a : changes) y[a.net] = a.value;
  for (gate_id g = 0; g < n.gate_count(); ++g) work.push_back(g);
  iterate(n, y, work, [&](gate_id g) { return eval_gate(n, g, y.data(), y[n.gate_out[g]]); });
  r.after_b = std::move(y);
  return r;
}

}  // namespace settle
