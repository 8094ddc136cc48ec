// Lowering of parsed statements (AST) into the IR: kinds, fan-in, programs, exact times.
#pragma once

#include "parser/ast.hpp"
#include "parser/ir.hpp"

namespace settle::ir {

/// The nesting limit of parenthesised expressions.
/// The grammar recurses once per level; 256 levels leave a wide margin on an
/// 8 MB stack even under AddressSanitizer (whose frames are several times
/// larger: 1,000 levels overflowed there).
inline constexpr int max_expr_depth = 256;

/// Lowers one gate statement, appending its reads and program to the scope's
/// pools; false (after reporting, pools restored) when it is malformed.
bool lower_gate(const ast::gate_stmt& g, gate& out, scope_def& pools, reporter& rep);
/// True for a gate statement of a metastable element (mutex, syncff), which
/// lower_element lowers instead of lower_gate.
bool is_element(const ast::gate_stmt& g);
/// Lowers `ga, gb = mutex(ra, rb) ...` into its two grant gates and
/// `q = syncff(d, ck) ...` into one gate, appended to the scope; false
/// (after reporting) when it is malformed.
bool lower_element(const ast::gate_stmt& g, scope_def& scope, reporter& rep);
/// Converts a delay written as one range (both edges) or two (rise, fall).
bool lower_delay(const std::vector<ast::range>& ranges, bool transport, gate_delay& out,
                 reporter& rep);
/// Converts a time literal; false (after reporting) when not exact or too large.
bool lower_time(const ast::time_lit& t, time_fs& out, reporter& rep);
/// A name with its position.
ref lower_ref(const ast::name& n, const reporter& rep);
/// A value character '0' '1' 'x' 'X'.
logic lower_value(char c);

/// Compiles an operand list `a op b op c ...` (left-associative) into postfix
/// code: each operand by `operand`, then `o` after every operand but the
/// first. Gate expressions and stimulus conditions share it.
template <class Operands, class Operand>
void lower_chain(const Operands& operands, op o, std::vector<std::uint32_t>& code,
                 Operand operand) {
  for (std::size_t i = 0; i < operands.size(); ++i) {
    operand(operands[i]);
    if (i) code.push_back(encode(o));
  }
}

}  // namespace settle::ir
