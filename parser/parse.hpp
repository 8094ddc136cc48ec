// Plain facade over the grammar: parse one statement, no X3 types in the interface.
#pragma once

#include <string>
#include <string_view>

#include "parser/ast.hpp"

namespace settle::grammar {

/// Why a statement did not parse: where, and the reason in user words.
struct syntax_error {
  const char* pos = nullptr;
  std::string message;
};

/// Parses `text` (one statement, comments and terminator removed) into `out`.
/// Returns false and fills `err` when it is not a complete statement.
bool parse_statement(std::string_view text, ast::statement& out, syntax_error& err);

/// True for the words that cannot name a net, block or instance.
bool is_reserved_word(std::string_view w);

}  // namespace settle::grammar
