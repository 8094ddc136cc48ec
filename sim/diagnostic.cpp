// Diagnostics: counting, and the "file:line:col: error: reason" + source line + caret format.
#include "sim/diagnostic.hpp"

#include <algorithm>

namespace settle {

bool diagnostics::has_errors() const { return error_count() > 0; }

std::size_t diagnostics::error_count() const {
  return static_cast<std::size_t>(std::count_if(items.begin(), items.end(), [](const diagnostic& d) {
    return d.severity == diagnostic::level::error;
  }));
}

std::string format_diagnostic(const diagnostic& d) {
  static constexpr const char* words[] = {"error", "warning", "note"};
  std::string out = d.file;
  if (d.line) {
    out += ':' + std::to_string(d.line);
    if (d.col) out += ':' + std::to_string(d.col);
  }
  out += ": ";
  out += words[static_cast<int>(d.severity)];
  out += ": ";
  out += d.message;
  out += '\n';
  if (d.line && !d.source_line.empty()) {
    out += d.source_line;
    out += '\n';
    if (d.col) {
      // Keep tabs so the caret lines up under the same column in a terminal.
      for (std::uint32_t i = 0; i + 1 < d.col; ++i) out += i < d.source_line.size() && d.source_line[i] == '\t' ? '\t' : ' ';
      out += "^\n";
    }
  }
  return out;
}

}  // namespace settle
