// Plain facade over the SDF grammar: the file as a tree of lists and atoms, no X3 types here.
#pragma once

#include <string>
#include <string_view>
#include <vector>

namespace settle::sdfgrammar {

/// One item of an SDF file: a parenthesised list or an atom (a word, a
/// number, a triple such as `1:2:3`, or a quoted string). SDF (IEEE 1497) is
/// written entirely in such lists; their meaning is read from the tree.
struct node {
  const char* pos = nullptr;  ///< the '(' of a list, the first byte of an atom
  bool is_list = false;
  bool quoted = false;     ///< an atom written as "..." (text without the quotes)
  std::string text;        ///< an atom's text
  std::vector<node> kids;  ///< a list's items
};

/// Why the text did not parse: where, and the reason in user words.
struct syntax_error {
  const char* pos = nullptr;
  std::string message;
};

/// Parses the whole text, one top-level list with comments (`//`, `/* */`)
/// and white space around it, into `out`.
bool parse_tree(std::string_view text, node& out, syntax_error& err);

}  // namespace settle::sdfgrammar
