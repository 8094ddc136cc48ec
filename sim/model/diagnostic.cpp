// Diagnostics: counting, and the "file:line:col: error: reason" + source line + caret format.
#include "sim/model/diagnostic.hpp"

#include <algorithm>

namespace settle {

bool diagnostics::has_errors() const { return error_count() > 0; }

std::size_t diagnostics::error_count() const {
  return static_cast<std::size_t>(
      std::count_if(items.begin(), items.end(),
                    [](const diagnostic& d) { return d.severity == diagnostic::level::error; }));
}

namespace {

bool is_control(unsigned char c) { return c < 0x20 || c == 0x7f; }

// How a byte is shown: itself, or an escape ("\0", "\x01").
std::string shown_byte(unsigned char c) {
  static constexpr char hex[] = "0123456789abcdef";
  if (c == 0) return "\\0";
  return {'\\', 'x', hex[c >> 4], hex[c & 15]};
}

}  // namespace

std::string escape_controls(std::string_view text, bool keep_tabs) {
  std::string out;
  out.reserve(text.size());
  for (char ch : text) {
    const auto c = static_cast<unsigned char>(ch);
    if (!is_control(c) || (keep_tabs && c == '\t'))
      out += ch;
    else
      out += shown_byte(c);
  }
  return out;
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
  out += escape_controls(d.message);
  out += '\n';
  if (d.line && !d.source_line.empty()) {
    const bool cut_front = d.source_col > 1;
    if (cut_front) out += "...";
    out += escape_controls(d.source_line, true);
    out += '\n';
    if (d.col >= d.source_col) {
      if (cut_front) out += "   ";
      // Keep tabs so the caret lines up under the same column in a terminal;
      // an escaped byte takes as many columns as its escape.
      for (std::uint32_t i = 0; i + d.source_col < d.col; ++i) {
        const auto c =
            i < d.source_line.size() ? static_cast<unsigned char>(d.source_line[i]) : ' ';
        if (c == '\t')
          out += '\t';
        else
          out.append(is_control(c) ? shown_byte(c).size() : 1, ' ');
      }
      out += "^\n";
    }
  }
  for (const auto& n : d.notes) out += format_diagnostic(n);
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
