// Exploration of a closed system: the circuit together with its environment's
// reaction rules, under unbounded gate and environment delays.
#pragma once

#include <optional>
#include <string>

#include "sim/analysis/explore.hpp"

namespace settle {

/// Explores a stimulus with reaction rules or properties. The state holds the
/// gate outputs, the inputs, each rule's pending firings and each `times N`
/// rule's count; a gate fires, or a pending firing applies, after an unbounded
/// delay (gmw: any non-empty subset of them in one instant; single: one at a
/// time). Per step: deadlocks, property violations and non-persistent gates,
/// each with a shortest path and its timed check, besides the open explorer's
/// answers. `base` carries the reported nets and the model; nullopt and *error
/// for what cannot be explored.
std::optional<explore_result> explore_closed(const design& d, const explore_options& o,
                                             explore_result base, std::string* error);

}  // namespace settle
