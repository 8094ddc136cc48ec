// A parsed and elaborated design: its netlist, stimulus and where it came from.
#pragma once

#include <string>
#include <vector>

#include "sim/model/netlist.hpp"
#include "sim/model/stimulus.hpp"

namespace settle {

/// Counts read from an imported netlist file (for `check`).
struct source_counts {
  std::string format;  ///< "settle" or "bench"
  std::uint32_t inputs = 0, outputs = 0, dffs = 0, inverters = 0, buffers = 0, gates = 0;
};

struct design {
  std::string path;  ///< the design file as given
  netlist nets;
  stimulus stim;
  source_counts source;
};

}  // namespace settle
