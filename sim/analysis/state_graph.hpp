// The explored state graph of one step: bit-packed states in an arena, a hash set, CSR edges.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "sim/model/netlist.hpp"

namespace settle {

/// The successor rule of the unbounded gate-delay model.
enum class race_model : std::uint8_t {
  gmw,     ///< general multiple winner: any non-empty subset of the excited gates fires
  single,  ///< one excited gate fires at a time
};

/// Limits of one exploration.
struct graph_limits {
  std::uint64_t max_states = 2'000'000;
  std::uint64_t max_bytes = 0;  ///< 0: no memory guard (--max-memory)
  /// Bytes already held by the graphs of earlier steps kept for reports;
  /// they count against max_bytes with this graph's own storage.
  std::uint64_t held_bytes = 0;
  int max_excited = 20;  ///< gmw: more excited gates in one state stops the search
};

/// A state is one bit per gate output, in gate order, packed into 64-bit words.
/// Inputs are fixed for the whole step and are not part of the state.
class state_graph {
 public:
  /// An empty graph over `gates` state bits.
  explicit state_graph(std::size_t gates);

  std::size_t words() const { return words_; }
  std::uint32_t size() const { return static_cast<std::uint32_t>(arena_.size() / words_); }
  const std::uint64_t* state(std::uint32_t i) const {
    return arena_.data() + std::size_t{i} * words_;
  }
  bool bit(std::uint32_t i, gate_id g) const { return (state(i)[g >> 6] >> (g & 63)) & 1; }
  /// State i as text: one '0' or '1' per gate, in gate order (the reports' `state_order`).
  std::string bits_text(std::uint32_t i) const;
  /// Only the first `bits` state bits are the gates (a closed system's state
  /// holds its environment's after them): bits_text shows those.
  void show_bits(std::size_t bits) { shown_ = bits; }

  /// Finds `s` or adds it; returns its index and whether it was added.
  std::pair<std::uint32_t, bool> intern(const std::uint64_t* s, std::uint32_t parent);
  /// Bytes held by the arena, the hash table and the edge lists.
  std::size_t bytes() const;

  /// Explores breadth-first from the states already interned, with inputs
  /// fixed at `inputs` (per net values, gate outputs ignored). Returns false
  /// and sets `stop` when a limit was hit.
  bool explore(const netlist& n, std::span<const logic> inputs, race_model m,
               const graph_limits& lim, std::string& stop);

  // ---- results, valid after explore()
  std::vector<std::uint32_t> edge_begin;  ///< CSR over states: size states+1 (explored states)
  std::vector<std::uint32_t> edge_to;
  std::vector<std::uint32_t> parent;  ///< BFS tree; no_id for start states
  std::uint32_t starts = 0;           ///< states [0, starts) are the start states
  std::uint32_t explored = 0;         ///< states whose successors are listed
  bool any_race = false;              ///< some state had two or more excited gates

  bool is_stable(std::uint32_t i) const { return edge_begin[i] == edge_begin[i + 1]; }

 private:
  std::size_t hash_of(std::uint32_t i) const;
  std::size_t gates_;
  std::size_t shown_;
  std::size_t words_;
  std::vector<std::uint64_t> arena_;
  id_table ids_;  ///< the interned states, keyed by their words in arena_
};

/// Gate outputs (one 0 or 1 per gate, in gate order) as text: the spelling of
/// a state in every report (JSON, DOT, HTML tables and graphs alike).
std::string state_text(std::span<const std::uint8_t> gates);

/// The gates behind the characters of a state's text, space separated.
std::string state_order_text(const netlist& n);

/// Strongly connected components (Tarjan 1972, iterative) with what the analyses need.
struct scc_info {
  std::vector<std::uint32_t> comp;         ///< per state: its component
  std::uint32_t count = 0;                 ///< components, numbered in reverse topological order
  std::vector<std::uint32_t> size;         ///< per component
  std::vector<std::uint8_t> terminal;      ///< per component: no edge leaves it
  std::vector<std::uint8_t> nontransient;  ///< per component: holds a cycle that is not transient
  std::vector<std::uint32_t> slot;  ///< per component: row in `fired_inside`, or no_id if trivial
  std::vector<std::uint64_t>
      fired_inside;  ///< per non-trivial component: gates fired on its own edges
};

/// Computes the components of the explored part of `g` (all of it when complete).
scc_info strongly_connected(const state_graph& g);

/// Per reported gate: true when some path from a start state fires it twice or
/// more (a glitch: more changes than its net change needs), or a cycle of the
/// graph fires it.
std::vector<bool> hazard_gates(const state_graph& g, const scc_info& s,
                               std::span<const gate_id> gates);

}  // namespace settle
