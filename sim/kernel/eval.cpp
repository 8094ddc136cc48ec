// Exact ternary evaluation of every gate kind (Eichelberger 1965; Muller and Bartky 1959 for
// C-elements).
#include "sim/kernel/eval.hpp"

#include <array>

namespace settle {
namespace {

struct counts {
  std::uint32_t zero = 0, one = 0, x = 0, n = 0;
};

// The C-element over counts: 1 when every input can be 1 together, 0 when
// every input can be 0 together, the present value when they can disagree.
logic c_element(const counts& c, logic present) {
  bool can1 = c.zero == 0, can0 = c.one == 0;
  bool can_mixed = (c.zero && c.one) || (c.zero && c.x) || (c.one && c.x) || c.x >= 2;
  int seen = 0;  // bit 0: result 0 possible, bit 1: result 1 possible
  if (can1) seen |= 2;
  if (can0) seen |= 1;
  if (can_mixed) seen |= present == logic::zero ? 1 : present == logic::one ? 2 : 3;
  return seen == 1 ? logic::zero : seen == 2 ? logic::one : logic::x;
}

constexpr int max_stack = 256;

// One evaluation with the given input values (binary or not): the closed
// forms, exact when no net is read twice.
template <class Value>
logic eval_direct(const netlist& n, gate_id g, Value&& input, logic present) {
  const auto b = n.fanin_begin[g], e = n.fanin_begin[g + 1];
  auto count = [&] {
    counts c;
    for (auto i = b; i < e; ++i) {
      auto v = input(i - b);
      c.zero += v == logic::zero, c.one += v == logic::one, c.x += v == logic::x;
    }
    c.n = e - b;
    return c;
  };
  switch (n.kind[g]) {
    case gate_kind::buf:
      return input(0);
    case gate_kind::inv:
      return inv(input(0));
    case gate_kind::and_:
    case gate_kind::nand: {
      auto c = count();
      logic r = c.zero ? logic::zero : c.x ? logic::x : logic::one;
      return n.kind[g] == gate_kind::nand ? inv(r) : r;
    }
    case gate_kind::or_:
    case gate_kind::nor: {
      auto c = count();
      logic r = c.one ? logic::one : c.x ? logic::x : logic::zero;
      return n.kind[g] == gate_kind::nor ? inv(r) : r;
    }
    case gate_kind::xor_:
    case gate_kind::xnor: {
      auto c = count();
      if (c.x) return logic::x;
      bool odd = c.one & 1;
      return from_bool(n.kind[g] == gate_kind::xor_ ? odd : !odd);
    }
    case gate_kind::mux: {
      logic s = input(0), a0 = input(1), a1 = input(2);
      return s == logic::zero ? a0 : s == logic::one ? a1 : lub(a0, a1);
    }
    case gate_kind::maj: {
      auto c = count();
      return 2 * c.one > c.n ? logic::one : 2 * c.zero > c.n ? logic::zero : logic::x;
    }
    case gate_kind::celem:
      return c_element(count(), present);
    case gate_kind::dff: {
      // Without the clock's history a flip-flop can only be bounded: it holds
      // while CK is 0 and may have taken D otherwise. The timed kernel knows
      // the edges and evaluates it exactly (simulator::eval_fast).
      const logic ck = input(1);
      return ck == logic::zero ? present : lub(present, input(0));
    }
    case gate_kind::mutex: {
      // Untimed, a grant can only be bounded: it falls without its request or
      // while the other grant is high, rises for a request alone, and while
      // both requests stand it is decided (held) or undecided (x). The timed
      // kernel resolves it (simulator::evaluate_meta).
      const logic own = input(0), other = input(1), other_grant = input(2);
      if (own == logic::zero || other_grant == logic::one) return logic::zero;
      if (own == logic::x || other_grant == logic::x) return logic::x;
      if (other == logic::zero) return logic::one;
      return present == logic::one ? present : logic::x;
    }
    case gate_kind::syncff: {
      const logic ck = input(1);  // as a flip-flop primitive, without the clock's history
      return ck == logic::zero ? present : lub(present, input(0));
    }
    case gate_kind::gc:
    case gate_kind::expr: {
      std::array<logic, max_stack> stack;
      const std::span<const std::uint32_t> code(n.code.data() + n.code_begin[g],
                                                n.code_begin[g + 1] - n.code_begin[g]);
      run_postfix(code, input, stack.data());
      if (n.kind[g] == gate_kind::expr) return stack[0];
      logic set = stack[0], reset = stack[1];
      if (set == logic::zero && reset == logic::zero) return present;
      if (set == logic::one && reset == logic::zero) return logic::one;
      if (set == logic::zero && reset == logic::one) return logic::zero;
      if (set == logic::one && reset == logic::one) return logic::x;
      // Ternary set or reset: the outcomes of every resolution, joined.
      logic r = logic::x;
      bool first = true;
      auto join = [&](logic v) { r = first ? v : lub(r, v), first = false; };
      for (logic s : {logic::zero, logic::one}) {
        if (set != logic::x && set != s) continue;
        for (logic q : {logic::zero, logic::one}) {
          if (reset != logic::x && reset != q) continue;
          join(s == logic::one && q == logic::one ? logic::x
               : s == logic::one                  ? logic::one
               : q == logic::one                  ? logic::zero
                                                  : present);
        }
      }
      return r;
    }
  }
  return logic::x;
}

// Distinct x variables of a gate: its x input nets and, for holding gates, an
// x present output. At most this many are enumerated exactly.
constexpr int max_enumerated = 12;

logic eval_enumerated(const netlist& n, gate_id g, const logic* v, logic present) {
  const auto b = n.fanin_begin[g], e = n.fanin_begin[g + 1];
  std::array<net_id, max_enumerated + 1> vars;
  int k = 0;
  const net_id self = n.gate_out[g];
  const bool holds = holds_state(n.kind[g]);
  auto add_var = [&](net_id net) {
    for (int i = 0; i < k; ++i)
      if (vars[i] == net) return true;
    if (k == max_enumerated) return false;
    vars[k++] = net;
    return true;
  };
  bool exact = true;
  for (auto i = b; i < e && exact; ++i)
    if (v[n.fanin[i]] == logic::x) exact = add_var(n.fanin[i]);
  if (holds && present == logic::x && exact) exact = add_var(self);
  auto direct = [&](auto&& value_of, logic p) { return eval_direct(n, g, value_of, p); };
  if (!exact || k == 0) return direct([&](std::uint32_t i) { return v[n.fanin[b + i]]; }, present);

  logic result = logic::x;
  for (std::uint32_t m = 0; m < (1u << k); ++m) {
    auto value = [&](net_id net) {
      for (int i = 0; i < k; ++i)
        if (vars[i] == net) return from_bool(m >> i & 1);
      return net == self && holds ? present : v[net];
    };
    logic r = direct([&](std::uint32_t i) { return value(n.fanin[b + i]); },
                     holds ? value(self) : present);
    if (r == logic::x) return logic::x;
    if (m == 0)
      result = r;
    else if (r != result)
      return logic::x;
  }
  return result;
}

}  // namespace

logic eval_gate(const netlist& n, gate_id g, const logic* v, logic present) {
  if (n.enumerate[g]) return eval_enumerated(n, g, v, present);
  return eval_direct(
      n, g, [&](std::uint32_t i) { return v[n.fanin[n.fanin_begin[g] + i]]; }, present);
}

}  // namespace settle
