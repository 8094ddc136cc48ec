// The character classes of names: one definition for the .settle grammar, the gate fast
// path in lower.cpp, the statement scanner in driver.cpp and the Verilog reader.
#pragma once

namespace settle::lexical {

/// A name starts with an ASCII letter or '_' ...
constexpr bool ident_start(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_';
}
/// ... and goes on with letters, digits and '_'. A keyword is a whole word:
/// it is not followed by one of these.
constexpr bool ident_char(char c) { return ident_start(c) || (c >= '0' && c <= '9'); }

/// Verilog names (IEEE 1364-2005 3.7) also go on with '$'.
constexpr bool verilog_ident_char(char c) { return ident_char(c) || c == '$'; }

/// The same classes as X3 character-set strings (x3::char_(...)).
inline constexpr const char ident_start_set[] = "a-zA-Z_";
inline constexpr const char ident_char_set[] = "a-zA-Z0-9_";
inline constexpr const char verilog_ident_char_set[] = "a-zA-Z0-9_$";

}  // namespace settle::lexical
