// Feedback loops: strongly connected components of the gate graph.
#pragma once

#include <vector>

#include "sim/model/netlist.hpp"

namespace settle {

/// Strongly connected components of a directed graph given as CSR adjacency
/// (Tarjan 1972, iterative: no recursion, so deep graphs cannot overflow the
/// stack). Components come in reverse topological order. With
/// `trivial` false, single nodes without an edge to themselves are left out
/// (large graphs are mostly such nodes).
std::vector<std::vector<std::uint32_t>> strongly_connected(std::uint32_t nodes,
                                                           const std::vector<std::uint32_t>& begin,
                                                           const std::vector<std::uint32_t>& next,
                                                           bool trivial = true);

/// The non-trivial SCCs of the gate graph (edge g -> h when h reads g's
/// output; a gate reading its own output is a loop of size 1), each sorted by
/// gate id, largest first.
std::vector<std::vector<gate_id>> feedback_loops(const netlist& n);

}  // namespace settle
