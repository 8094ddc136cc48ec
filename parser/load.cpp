// The loading facade: file I/O, format dispatch, parse + elaborate, and --stim replacement.
#include "parser/load.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <fstream>
#include <sstream>

#include "parser/ir.hpp"

namespace settle {
namespace {

bool read_file(const std::string& path, std::string& text, diagnostics& diags) {
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    diags.add({diagnostic::level::error, path, 0, 0, fmt::format("cannot open file: {}", std::strerror(errno)), ""});
    return false;
  }
  std::ostringstream ss;
  ss << in.rdbuf();
  if (in.bad()) {
    diags.add({diagnostic::level::error, path, 0, 0, "cannot read file", ""});
    return false;
  }
  text = std::move(ss).str();
  return true;
}

bool ends_with(const std::string& s, std::string_view suffix) {
  return s.size() >= suffix.size() && s.compare(s.size() - suffix.size(), suffix.size(), suffix) == 0;
}

/// Orders this load's diagnostics by position (file-less ones first), keeping emission order otherwise.
void sort_from(diagnostics& diags, std::size_t first) {
  std::stable_sort(diags.items.begin() + static_cast<std::ptrdiff_t>(first), diags.items.end(),
                   [](const diagnostic& a, const diagnostic& b) {
                     if (a.file != b.file) return false;
                     return a.line != b.line ? a.line < b.line : a.col < b.col;
                   });
}

/// Parses a --stim file and rebuilds the design's stimulus from it.
bool apply_stim_file(design& d, const std::string& path, diagnostics& diags) {
  std::string text;
  if (!read_file(path, text, diags)) return false;
  const auto first = diags.items.size();
  ir::reporter rep(text, path, diags);
  ir::file f;
  ir::parse_file(text, ir::file_mode::stimulus_only, f, rep);
  if (!rep.errors() && !f.stim.present) rep.error({}, "the stimulus file holds no stimulus { } block");
  if (!rep.errors()) ir::build_stimulus(f.stim, d.nets, d.stim, rep);
  sort_from(diags, first);
  return rep.errors() == 0;
}

}  // namespace

std::optional<design> load_design_text(std::string_view text, const std::string& name, const load_options& opt,
                                       diagnostics& diags) {
  if (opt.format == "bench") return load_bench_text(text, name, opt, diags);
  const auto first = diags.items.size();
  ir::reporter rep(text, name, diags);
  ir::file f;
  ir::parse_file(text, ir::file_mode::design, f, rep);
  design d;
  d.path = name;
  if (!rep.errors()) {
    ir::elaborate(f, d.nets, rep);
    if (!rep.errors()) ir::build_stimulus(f.stim, d.nets, d.stim, rep);
  }
  sort_from(diags, first);
  if (rep.errors()) return std::nullopt;
  d.source.format = "settle";
  d.source.inputs = static_cast<std::uint32_t>(d.nets.inputs.size());
  d.source.outputs = static_cast<std::uint32_t>(d.nets.outputs.size());
  d.source.gates = static_cast<std::uint32_t>(d.nets.gate_count());
  d.nets.blocks = static_cast<std::uint32_t>(f.blocks.size());
  return d;
}

std::optional<design> load_design(const std::string& path, const load_options& opt, diagnostics& diags) {
  if (opt.format != "auto" && opt.format != "settle" && opt.format != "bench") {
    diags.add({diagnostic::level::error, path, 0, 0,
               fmt::format("unknown format '{}' (use auto, settle or bench)", opt.format), ""});
    return std::nullopt;
  }
  std::string text;
  if (!read_file(path, text, diags)) return std::nullopt;
  load_options o = opt;
  if (o.format == "auto") o.format = ends_with(path, ".bench") ? "bench" : "settle";
  auto d = o.format == "bench" ? load_bench_text(text, path, o, diags) : load_design_text(text, path, o, diags);
  if (!d) return d;
  d->path = path;
  if (!opt.stim_path.empty() && !apply_stim_file(*d, opt.stim_path, diags)) return std::nullopt;
  return d;
}

}  // namespace settle
