// A parsed and elaborated design: its netlist, stimulus and where it came from.
#pragma once

#include <string>
#include <vector>

#include "sim/netlist.hpp"
#include "sim/stimulus.hpp"

namespace settle {

/// Counts read from an imported netlist file (for `check`).
struct source_counts {
  std::string format;  ///< "settle" or "bench"
  std::uint32_t inputs = 0, outputs = 0, dffs = 0, inverters = 0, buffers = 0, gates = 0;
};

struct design {
  std::string path;       ///< the design file as given
  netlist nets;
  stimulus stim;
  source_counts source;
};

/// The delay variables a corner sets: every gate, then every reaction rule
/// (what `extremes` and `exhaustive` enumerate).
inline std::size_t delay_variables(const design& d) { return d.nets.gate_count() + d.stim.rules.size(); }

}  // namespace settle
