// Graphviz DOT text of explored state graphs, one cluster per stimulus step.
#pragma once

#include <string>

#include "sim/analysis/explore.hpp"

namespace settle {

/// The state graphs kept in `r` (explore_options::keep_graphs) as one DOT
/// digraph. Node `s<step>_<i>` is state i of that step, labelled with its gate
/// outputs as 0/1 in gate order; start states are bold, stable states have a
/// double border, edges are labelled with the gates that fired together.
std::string state_graph_dot(const netlist& n, const explore_result& r, const std::string& title);

/// States kept over all steps (what the DOT file would hold).
std::uint64_t kept_states(const explore_result& r);

}  // namespace settle
