// Stimulus helpers shared by the reports.
#include "sim/model/stimulus.hpp"

#include <fmt/format.h>

namespace settle {

logic eval_expr(const net_expr& e, const logic* values) {
  // Postfix code as in complex gates (sim/kernel/eval.cpp), over e.nets.
  constexpr auto inv = [](logic v) {
    return v == logic::x ? logic::x : from_bool(v == logic::zero);
  };
  logic stack[64];
  std::vector<logic> big;
  logic* st = stack;
  if (e.code.size() > 64) big.resize(e.code.size()), st = big.data();
  int sp = 0;
  for (std::uint32_t w : e.code) {
    switch (opcode(w)) {
      case op::input:
        st[sp++] = values[e.nets[operand(w)]];
        break;
      case op::const0:
        st[sp++] = logic::zero;
        break;
      case op::const1:
        st[sp++] = logic::one;
        break;
      case op::inv:
        st[sp - 1] = inv(st[sp - 1]);
        break;
      case op::and2: {
        const logic a = st[--sp], b = st[sp - 1];
        st[sp - 1] = (a == logic::zero || b == logic::zero) ? logic::zero
                     : (a == logic::x || b == logic::x)     ? logic::x
                                                            : logic::one;
        break;
      }
      case op::or2: {
        const logic a = st[--sp], b = st[sp - 1];
        st[sp - 1] = (a == logic::one || b == logic::one) ? logic::one
                     : (a == logic::x || b == logic::x)   ? logic::x
                                                          : logic::zero;
        break;
      }
      case op::xor2: {
        const logic a = st[--sp], b = st[sp - 1];
        st[sp - 1] = (a == logic::x || b == logic::x) ? logic::x : from_bool(a != b);
        break;
      }
    }
  }
  return sp ? st[0] : logic::x;
}

const char* gauge_kind_name(gauge::kind k) {
  switch (k) {
    case gauge::kind::period:
      return "period";
    case gauge::kind::pulse_high:
      return "pulse_high";
    case gauge::kind::pulse_low:
      return "pulse_low";
    case gauge::kind::latency:
      return "latency";
  }
  return "?";
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
  }
  return "expect";
}

}  // namespace settle
