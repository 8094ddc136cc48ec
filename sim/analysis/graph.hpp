// Strongly connected components of directed graphs, and the netlist's feedback loops.
#pragma once

#include <algorithm>
#include <cstdint>
#include <span>
#include <vector>

#include "sim/model/netlist.hpp"

namespace settle {

/// Calls `component(members)` for each strongly connected component of a
/// directed graph of `nodes` nodes, in reverse topological order (a component
/// comes before every component that reaches it). The out-edges of node v are
/// the positions [first(v), last(v)) and edge e leads to node to(e). `members`
/// is a span of node ids valid during the call only.
///
/// Tarjan 1972 (SIAM J. Computing 1(2)), iterative: no recursion, so deep
/// graphs cannot overflow the stack. The one SCC of the project: the gate
/// graph's feedback loops and the state graphs of `explore` both come here.
template <class First, class Last, class To, class Component>
void for_each_component(std::uint32_t nodes, First first, Last last, To to, Component component) {
  constexpr std::uint32_t unvisited = UINT32_MAX;
  std::vector<std::uint32_t> index(nodes, unvisited), low(nodes, 0), stack;
  std::vector<std::uint8_t> on_stack(nodes, 0);
  struct frame {
    std::uint32_t v, pos;
  };
  std::vector<frame> calls;
  std::uint32_t counter = 0;
  auto visit = [&](std::uint32_t v) {
    index[v] = low[v] = counter++;
    stack.push_back(v);
    on_stack[v] = 1;
    calls.push_back({v, static_cast<std::uint32_t>(first(v))});
  };
  for (std::uint32_t root = 0; root < nodes; ++root) {
    if (index[root] != unvisited) continue;
    visit(root);
    while (!calls.empty()) {
      frame& f = calls.back();
      const std::uint32_t v = f.v;
      if (f.pos < last(v)) {
        const std::uint32_t w = to(f.pos++);
        if (index[w] == unvisited)
          visit(w);
        else if (on_stack[w])
          low[v] = std::min(low[v], index[w]);
        continue;
      }
      calls.pop_back();
      if (!calls.empty()) low[calls.back().v] = std::min(low[calls.back().v], low[v]);
      if (low[v] != index[v]) continue;
      std::size_t from = stack.size();
      do --from;
      while (stack[from] != v);
      for (std::size_t i = from; i < stack.size(); ++i) on_stack[stack[i]] = 0;
      component(std::span<const std::uint32_t>(stack.data() + from, stack.size() - from));
      stack.resize(from);
    }
  }
}

/// The non-trivial SCCs of the gate graph (edge g -> h when h reads g's
/// output; a gate reading its own output is a loop of size 1), each sorted by
/// gate id, largest first.
std::vector<std::vector<gate_id>> feedback_loops(const netlist& n);

}  // namespace settle
