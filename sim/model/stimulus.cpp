// Stimulus helpers shared by the reports.
#include "sim/model/stimulus.hpp"

#include <fmt/format.h>

#include "sim/model/enum_names.hpp"

namespace settle {

logic eval_expr(const net_expr& e, const logic* values) {
  // Postfix code as in complex gates, over e.nets.
  logic stack[64];
  std::vector<logic> big;
  logic* st = stack;
  if (e.code.size() > 64) big.resize(e.code.size()), st = big.data();
  const int sp = run_postfix(
      e.code, [&](std::uint32_t k) { return values[e.nets[k]]; }, st);
  return sp ? st[0] : logic::x;
}

const char* gauge_kind_name(gauge::kind k) {
  static constexpr const char* names[] = {"period", "pulse_high", "pulse_low", "latency"};
  return enum_name<gauge::kind::latency>(k, names);
}

std::string expectation_words(const netlist& n, const expectation& e) {
  const auto ref = e.ref.empty() ? n.net_name[e.net] : e.ref;
  switch (e.what) {
    case expectation::kind::value:
      return fmt::format("expect {} = {}", ref, to_char(e.want));
    case expectation::kind::stable:
      return "expect stable";
    case expectation::kind::within:
      return fmt::format("settle within {}", format_time(e.hi));
    case expectation::kind::oscillating:
      return e.has_range ? fmt::format("expect oscillating period {}..{}", format_time(e.lo),
                                       format_time(e.hi))
                         : std::string("expect oscillating");
    case expectation::kind::no_glitch:
      return fmt::format("expect no glitch on {}", ref);
    case expectation::kind::deterministic:
      return "expect deterministic";
    case expectation::kind::gauge:
      return fmt::format("expect {} within {}..{}", ref, format_time(e.lo), format_time(e.hi));
    case expectation::kind::resolves:
      return fmt::format("expect resolves {} within {}", ref, format_time(e.hi));
  }
  return "expect";
}

std::string step_title(std::size_t index, const std::string& label) {
  return fmt::format("step {}: {}", index, label.empty() ? "(no input change)" : label);
}

}  // namespace settle
