// Stimulus helpers shared by the reports.
#include "sim/stimulus.hpp"

#include <fmt/format.h>

namespace settle {

std::string expectation_words(const netlist& n, const expectation& e) {
  const auto ref = e.ref.empty() ? n.net_name[e.net] : e.ref;
  switch (e.what) {
    case expectation::kind::value: return fmt::format("expect {} = {}", ref, to_char(e.want));
    case expectation::kind::stable: return "expect stable";
    case expectation::kind::within: return fmt::format("settle within {}", format_time(e.hi));
    case expectation::kind::oscillating:
      return e.has_range ? fmt::format("expect oscillating period {}..{}", format_time(e.lo), format_time(e.hi))
                         : std::string("expect oscillating");
    case expectation::kind::no_glitch: return fmt::format("expect no glitch on {}", ref);
    case expectation::kind::deterministic: return "expect deterministic";
  }
  return "expect";
}

}  // namespace settle
