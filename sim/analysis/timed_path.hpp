// Whether the timed kernel can follow an untimed firing sequence: difference
// constraints over the firing times, solved by Bellman-Ford, and a replay.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "sim/analysis/explore.hpp"
#include "sim/model/design.hpp"

namespace settle {

/// One instant of a closed system's path from the start of the run: what
/// changed together, and which gates are excited after it.
struct path_instant {
  std::size_t step = 0;                        ///< 0-based stimulus step
  bool boundary = false;                       ///< the step's own input changes and activations
  std::vector<gate_id> fired;                  ///< gates whose output changes
  std::vector<std::uint32_t> rules_fired;      ///< rules whose pending firing applies
  std::vector<std::uint32_t> rules_triggered;  ///< rules whose condition turned true
  std::vector<net_id> changed;  ///< nets that move between binary values (gate outputs, inputs)
  std::vector<std::uint8_t> excited;  ///< per gate, after the instant
  std::vector<std::uint8_t> value;    ///< per gate, its output after the instant
};

/// A finding and the path that reaches it; the finding holds after the last instant.
struct timed_problem {
  enum class kind : std::uint8_t { deadlock, property, hazard } what = kind::deadlock;
  std::vector<path_instant> instants;
  std::size_t step = 0;        ///< 0-based step of the finding
  std::uint32_t property = 0;  ///< property findings: index in stimulus::properties
  /// The start state is not the kernel's (gates left x by init, enumerated):
  /// an infeasible answer is then not a proof.
  bool approximate_start = false;
};

/// Decides the problem. Each gate firing takes t(fire) - t(excitation) equal to
/// the gate's delay for that edge, and an excitation that ends without firing
/// (or is still pending at the end) lasts less than it; each rule firing takes
/// one delay of its own. Per-firing delays are difference constraints, exact
/// when no gate fires twice on one edge along the path; a gate's firings on
/// one edge must then share one delay, which a second solve with that delay
/// fixed enforces (not deciding when it fails). A feasible answer names a
/// `fixed:` corner, replayed in the timed kernel to confirm it.
timed_check check_timed(const design& d, const timed_problem& p);

/// The first half of check_timed alone: false when no delays within the
/// ranges give the path even with every firing's delay free. A path's
/// constraints include its prefix's, so a false prunes every extension.
bool may_be_timed(const design& d, const timed_problem& p);

/// The first of `corners` sampled corners (extremes, then random:1#i) whose
/// run shows the finding of p.step: a deadlock in state `gates` (per gate)
/// with `inputs` (per netlist::inputs), or property p.property violated in
/// that step. Its name, or empty. For findings the constraints cannot reach
/// within their budget; a run is no path, so it proves nothing when it fails.
std::string sample_corners(const design& d, const timed_problem& p,
                           std::span<const std::uint8_t> gates, std::span<const logic> inputs,
                           std::uint64_t corners);

}  // namespace settle
