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
    const bool cut_front = d.source_col > 1;
    if (cut_front) out += "...";
    out += d.source_line;
    out += '\n';
    if (d.col >= d.source_col) {
      if (cut_front) out += "   ";
      // Keep tabs so the caret lines up under the same column in a terminal.
      for (std::uint32_t i = 0; i + d.source_col < d.col; ++i)
        out += i < d.source_line.size() && d.source_line[i] == '\t' ? '\t' : ' ';
      out += "^\n";
    }
  }
  return out;
}

void set_source_line(diagnostic& d, std::string_view line) {
  constexpr std::size_t window = 240, before = 100;
  if (line.size() <= window) {
    d.source_line.assign(line);
    d.source_col = 1;
    return;
  }
  const std::size_t at = d.col ? d.col - 1 : 0;
  const std::size_t from = at > before ? std::min(at - before, line.size() - window) : 0;
  d.source_line.assign(line.substr(from, window));
  if (from + window < line.size()) d.source_line += "...";
  d.source_col = static_cast<std::uint32_t>(from + 1);
}

}  // namespace settle
