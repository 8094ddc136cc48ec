// The netlist's feedback loops: the strongly connected components of its gate graph.
#include "sim/analysis/graph.hpp"

#include <algorithm>

namespace settle {

std::vector<std::vector<gate_id>> feedback_loops(const netlist& n) {
  const auto gates = static_cast<std::uint32_t>(n.gate_count());
  std::vector<std::uint32_t> begin(gates + 1, 0), next;
  std::vector<char> self(gates, 0);
  next.reserve(n.fanout.size());
  for (gate_id g = 0; g < gates; ++g) {
    const net_id out = n.gate_out[g];
    for (auto i = n.fanout_begin[out]; i < n.fanout_begin[out + 1]; ++i) {
      next.push_back(n.fanout[i]);
      if (n.fanout[i] == g) self[g] = 1;
    }
    begin[g + 1] = static_cast<std::uint32_t>(next.size());
  }
  std::vector<std::vector<gate_id>> loops;
  for_each_component(
      gates, [&](std::uint32_t g) { return begin[g]; },
      [&](std::uint32_t g) { return begin[g + 1]; }, [&](std::uint32_t e) { return next[e]; },
      [&](std::span<const std::uint32_t> c) {
        if (c.size() == 1 && !self[c[0]]) return;
        std::vector<gate_id> loop(c.begin(), c.end());
        std::sort(loop.begin(), loop.end());
        loops.push_back(std::move(loop));
      });
  std::stable_sort(loops.begin(), loops.end(),
                   [](const auto& a, const auto& b) { return a.size() > b.size(); });
  return loops;
}

}  // namespace settle
