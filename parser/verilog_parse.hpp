// Plain facade over the Verilog grammar: parse one statement, no X3 types in the interface.
#pragma once

#include <string>
#include <string_view>

#include "parser/verilog_ast.hpp"

namespace settle::vgrammar {

/// Why a statement did not parse: where, and the reason in user words.
struct syntax_error {
  const char* pos = nullptr;
  std::string message;
};

/// Parses `text` (one statement without its `;`, comments blanked) into `out`.
bool parse_statement(std::string_view text, vast::statement& out, syntax_error& err);

}  // namespace settle::vgrammar
