// The pieces of a step's exploration that the open (fundamental-mode) and the
// closed (circuit with its environment) explorers share.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "sim/analysis/explore.hpp"
#include "sim/analysis/state_graph.hpp"

namespace settle {

using packed = std::vector<std::uint64_t>;

/// The step's input changes, the later assignment of a net winning.
std::vector<assignment> step_changes(const step_spec& s);

/// Gate names, comma separated, at most `most` of them and "and N more".
std::string join_names(const netlist& n, const std::vector<gate_id>& gates, std::size_t most = 8);

/// The start states of step 1 over the gate outputs (one bit per gate, packed):
/// init values, gates left x taking what their inputs force, the rest
/// enumerated over 0 and 1 up to `max_unknown`. False (and `stop` says why)
/// when more are unknown.
bool first_starts(const netlist& n, std::span<const logic> inputs, int max_unknown,
                  std::vector<packed>& starts, std::vector<std::string>& notes, std::string& stop);

/// Judges the step's expectations on its answers.
void check_expects(const netlist& n, const step_spec& spec, explore_step& st);

/// Fills the step's answers from its complete state graph (whose first
/// gate_count bits are the gate outputs); returns the states the circuit can
/// rest in (stable states and terminal oscillations), and their indices in
/// `rest_ids` when given. st.stable lists the stable ones among them, in order.
std::vector<packed> analyse_graph(const netlist& n, const state_graph& g,
                                  const std::vector<net_id>& reported, explore_step& st,
                                  std::vector<std::uint32_t>* rest_ids = nullptr);

}  // namespace settle
