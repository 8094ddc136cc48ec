// The character classes of .settle names: one definition for the grammar, the
// gate fast path in lower.cpp and the statement scanner in driver.cpp.
#pragma once

namespace settle::lexical {

/// A name starts with an ASCII letter or '_' ...
constexpr bool ident_start(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_';
}
/// ... and goes on with letters, digits and '_'. A keyword is a whole word:
/// it is not followed by one of these.
constexpr bool ident_char(char c) { return ident_start(c) || (c >= '0' && c <= '9'); }

/// The same two classes as X3 character-set strings (x3::char_(...)).
inline constexpr const char ident_start_set[] = "a-zA-Z_";
inline constexpr const char ident_char_set[] = "a-zA-Z0-9_";

}  // namespace settle::lexical
