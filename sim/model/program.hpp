// Postfix programs over ternary values: the code of complex gates, generalised
// C-elements and stimulus conditions, and the one interpreter that runs it.
#pragma once

#include <cstdint>
#include <span>

#include "sim/model/logic.hpp"

namespace settle {

/// Programs of complex gates are postfix code over the gate's fan-in list.
/// One 32-bit word per instruction: the opcode in the low byte, the operand
/// (an index into the gate's fan-in) above it.
enum class op : std::uint8_t { input, const0, const1, inv, and2, or2, xor2 };
constexpr std::uint32_t encode(op o, std::uint32_t arg = 0) {
  return static_cast<std::uint32_t>(o) | (arg << 8);
}
constexpr op opcode(std::uint32_t w) { return static_cast<op>(w & 0xff); }
constexpr std::uint32_t operand(std::uint32_t w) { return w >> 8; }

/// Ternary not, and, or, xor (Eichelberger 1965): x wherever the result
/// depends on an x operand.
constexpr logic inv(logic v) { return v == logic::x ? logic::x : from_bool(v == logic::zero); }
constexpr logic and3(logic a, logic b) {
  return (a == logic::zero || b == logic::zero) ? logic::zero
         : (a == logic::one && b == logic::one) ? logic::one
                                                : logic::x;
}
constexpr logic or3(logic a, logic b) {
  return (a == logic::one || b == logic::one)     ? logic::one
         : (a == logic::zero && b == logic::zero) ? logic::zero
                                                  : logic::x;
}
constexpr logic xor3(logic a, logic b) {
  return (a == logic::x || b == logic::x) ? logic::x : from_bool(a != b);
}

/// Runs `code` with `input(k)` the value of operand k, on `stack` (room for
/// code.size() values at least); returns the stack depth at the end (1 for
/// a well-formed program, whose value is stack[0]). The operators are
/// monotone: sound, though not exact when an x input is read twice.
template <class Input>
int run_postfix(std::span<const std::uint32_t> code, Input&& input, logic* stack) {
  int sp = 0;
  for (const std::uint32_t w : code) {
    switch (opcode(w)) {
      case op::input:
        stack[sp++] = input(operand(w));
        break;
      case op::const0:
        stack[sp++] = logic::zero;
        break;
      case op::const1:
        stack[sp++] = logic::one;
        break;
      case op::inv:
        stack[sp - 1] = inv(stack[sp - 1]);
        break;
      case op::and2:
        --sp, stack[sp - 1] = and3(stack[sp - 1], stack[sp]);
        break;
      case op::or2:
        --sp, stack[sp - 1] = or3(stack[sp - 1], stack[sp]);
        break;
      case op::xor2:
        --sp, stack[sp - 1] = xor3(stack[sp - 1], stack[sp]);
        break;
    }
  }
  return sp;
}

}  // namespace settle
