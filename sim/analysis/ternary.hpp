// Ternary simulation of one input change: Eichelberger's algorithms A and B.
#pragma once

#include <span>
#include <vector>

#include "sim/model/netlist.hpp"
#include "sim/model/stimulus.hpp"

namespace settle {

/// The two fixed points of ternary simulation, per net (indexed by net id).
struct ternary_result {
  std::vector<logic> after_a;  ///< A: every value any run may pass through (x = may change)
  std::vector<logic> after_b;  ///< B: the outcome; binary = certain under every delay
  /// True when B left every gate output binary.
  bool settled_binary(const netlist& n) const;
};

/// Runs algorithms A and B (Eichelberger 1965) from `start` (per net values;
/// ideally a stable state) for the input assignments `changes`, applied together.
/// A sets the changing inputs to x and iterates y <- lub(y, F(y)); B sets them
/// to their new values and iterates y <- F(y) from A's result. By Brzozowski and
/// Seger (1987; Asynchronous Circuits, 1995) a net B leaves binary has that value
/// in every stable state the unbounded gate-delay (gmw) model can reach.
ternary_result ternary_change(const netlist& n, std::span<const logic> start,
                              std::span<const assignment> changes);

}  // namespace settle
