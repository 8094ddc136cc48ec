// Diagnostics with file:line:col, the offending source line and a caret.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

namespace settle {

struct diagnostic {
  enum class level : std::uint8_t { error, warning, note } severity = level::error;
  std::string file;
  std::uint32_t line = 0, col = 0;  ///< 1-based; 0 when there is no position
  std::string message;
  std::string source_line;       ///< the text of that line (or a window of it), without its newline
  std::uint32_t source_col = 1;  ///< the column where source_line starts (> 1: a window)
  /// Notes printed right after this diagnostic (e.g. where the other half of a conflict is).
  std::vector<diagnostic> notes;
};

/// Sets d.source_line from the whole line, keeping only a window around d.col
/// when the line is long, so a 10 MB line does not cost 10 MB per diagnostic.
void set_source_line(diagnostic& d, std::string_view line);

/// Diagnostics collected while loading a design.
struct diagnostics {
  std::vector<diagnostic> items;

  void add(diagnostic d) { items.push_back(std::move(d)); }
  bool has_errors() const;
  std::size_t error_count() const;
};

/// "file:line:col: error: message\n<line>\n    ^\n" (the caret under col),
/// then its notes the same way. Control bytes in the message and the line are
/// shown escaped (a NUL as \0, others as \xHH; tabs kept), with the caret
/// still under the byte at col.
std::string format_diagnostic(const diagnostic& d);

/// `text` with its control bytes escaped as format_diagnostic shows them.
std::string escape_controls(std::string_view text, bool keep_tabs = false);

}  // namespace settle
