// Tarjan's strongly connected components, iteratively, and the netlist's feedback loops.
#include "sim/analysis/graph.hpp"

#include <algorithm>

namespace settle {

std::vector<std::vector<std::uint32_t>> strongly_connected(std::uint32_t nodes,
                                                           const std::vector<std::uint32_t>& begin,
                                                           const std::vector<std::uint32_t>& next,
                                                           bool trivial) {
  constexpr std::uint32_t unvisited = UINT32_MAX;
  std::vector<std::uint32_t> index(nodes, unvisited), low(nodes, 0), edge(nodes, 0);
  std::vector<char> on_stack(nodes, 0);
  std::vector<std::uint32_t> stack, call;
  std::vector<std::vector<std::uint32_t>> out;
  std::uint32_t counter = 0;
  for (std::uint32_t root = 0; root < nodes; ++root) {
    if (index[root] != unvisited) continue;
    call.push_back(root);
    index[root] = low[root] = counter++;
    edge[root] = begin[root];
    stack.push_back(root), on_stack[root] = 1;
    while (!call.empty()) {
      const std::uint32_t v = call.back();
      if (edge[v] < begin[v + 1]) {
        const std::uint32_t w = next[edge[v]++];
        if (index[w] == unvisited) {
          index[w] = low[w] = counter++;
          edge[w] = begin[w];
          stack.push_back(w), on_stack[w] = 1;
          call.push_back(w);
        } else if (on_stack[w]) {
          low[v] = std::min(low[v], index[w]);
        }
        continue;
      }
      call.pop_back();
      if (!call.empty()) low[call.back()] = std::min(low[call.back()], low[v]);
      if (low[v] == index[v] && !trivial && stack.back() == v &&
          std::find(next.begin() + begin[v], next.begin() + begin[v + 1], v) ==
              next.begin() + begin[v + 1]) {
        stack.pop_back();
        on_stack[v] = 0;
      } else if (low[v] == index[v]) {
        std::vector<std::uint32_t> comp;
        std::uint32_t w;
        do {
          w = stack.back();
          stack.pop_back();
          on_stack[w] = 0;
          comp.push_back(w);
        } while (w != v);
        out.push_back(std::move(comp));
      }
    }
  }
  return out;
}

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
  for (auto& c : strongly_connected(gates, begin, next, false)) {
    if (c.size() == 1 && !self[c[0]]) continue;
    std::sort(c.begin(), c.end());
    loops.push_back(std::move(c));
  }
  std::stable_sort(loops.begin(), loops.end(),
                   [](const auto& a, const auto& b) { return a.size() > b.size(); });
  return loops;
}

}  // namespace settle
