// The command table and the helpers every settle command shares (loading, replay commands, colour).
#include "sim/cli/command.hpp"

#include <fcntl.h>
#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <sys/stat.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <algorithm>
#include <cerrno>
#include <cstdlib>
#include <cstring>

#include "parser/sdf.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/time_parse.hpp"

namespace settle::cli {
namespace {

std::vector<command>& table() {
  static std::vector<command> t;
  return t;
}

// A command's rank in help: the core commands first, in the order users meet them.
int rank(std::string_view name) {
  static constexpr std::string_view order[] = {"check", "run", "sweep", "explore"};
  for (int i = 0; i < 4; ++i)
    if (order[i] == name) return i;
  return 4;
}

}  // namespace

void print_diagnostics(const diagnostics& diags, std::size_t max_errors, std::size_t max_warnings) {
  // A generated netlist can hold 100,000 unread nets: show the first few of
  // each kind, then one line with how many more there were.
  std::size_t errors = 0, warnings = 0;
  std::string out;
  bool shown = false;  // a note follows the item it belongs to
  for (const auto& item : diags.items) {
    if (item.severity != diagnostic::level::note) {
      const bool error = item.severity == diagnostic::level::error;
      shown = ++(error ? errors : warnings) <= (error ? max_errors : max_warnings);
    }
    if (shown) out += format_diagnostic(item);
    if (out.size() > 1 << 16) std::fputs(out.c_str(), stderr), out.clear();
  }
  if (errors > max_errors)
    out += fmt::format("settle: {} more errors not shown\n", errors - max_errors);
  if (warnings > max_warnings)
    out += fmt::format("settle: {} more warnings not shown\n", warnings - max_warnings);
  std::fputs(out.c_str(), stderr);
}

int register_command(command c) {
  auto& t = table();
  t.push_back(c);
  std::stable_sort(t.begin(), t.end(), [](const command& a, const command& b) {
    const int ra = rank(a.name), rb = rank(b.name);
    return ra != rb ? ra < rb : std::string_view(a.name) < std::string_view(b.name);
  });
  return static_cast<int>(t.size());
}

const std::vector<command>& commands() { return table(); }

CLI::Validator one_of(std::vector<std::string> words) {
  std::string list;
  for (const auto& w : words) list += (list.empty() ? "" : ", ") + w;
  return CLI::Validator(
      [words, list](std::string& v) -> std::string {
        if (std::find(words.begin(), words.end(), v) != words.end()) return "";
        return fmt::format("'{}' is not one of {}", v, list);
      },
      list);
}

CLI::Validator file_name(const char* what) {
  return CLI::Validator(
      [what](std::string& v) -> std::string {
        return v.empty() ? fmt::format("the {} path is empty", what) : "";
      },
      "FILE");
}

void add_design_options(CLI::App& cmd, design_options& o) {
  cmd.add_option("DESIGN", o.path,
                 "design file (.settle, .bench for ISCAS netlists, .v for structural Verilog)")
      ->required()
      ->check(file_name("design file"));
  cmd.add_option("--stim", o.stim, "file with one stimulus { } block replacing the design's own")
      ->check(file_name("--stim file"));
  cmd.add_option("--format", o.format,
                 "input format: auto (by extension), settle, bench or verilog")
      ->check(one_of({"auto", "settle", "bench", "verilog"}));
  cmd.add_option("--top", o.top,
                 "Verilog: the top module (default: the one no other module instantiates)");
  cmd.add_option("--dff", o.dff, "imported flip-flops: gates (six NAND gates) or primitive")
      ->check(one_of({"gates", "primitive"}));
  cmd.add_option("--delay", o.delay, "delay of imported gates: MIN..MAX (e.g. 40ps..60ps)");
  cmd.add_option(
         "--sdf", o.sdf,
         "SDF (IEEE 1497) file of delays to back-annotate; repeat to apply several in order")
      ->check(file_name("--sdf file"));
}

std::vector<path_use> design_inputs(const design_options& o) {
  std::vector<path_use> uses{{path_use::kind::input, "design file", o.path, ""}};
  if (!o.stim.empty()) uses.push_back({path_use::kind::input, "--stim file", o.stim, ""});
  for (const auto& f : o.sdf) uses.push_back({path_use::kind::input, "--sdf file", f, ""});
  return uses;
}

std::optional<design> load(const design_options& o, bool empty_ok, sdf_report* sdf) {
  load_options lo;
  lo.stim_path = o.stim;
  lo.format = o.format;
  lo.dff = o.dff;
  lo.top = o.top;
  if (!o.delay.empty()) {
    std::string err;
    auto r = parse_delay_range(o.delay, &err);
    if (!r) {
      spdlog::error("--delay {}: {}", o.delay, err);
      return std::nullopt;
    }
    lo.bench_delay = *r;
  }
  diagnostics diags;
  auto d = load_design(o.path, lo, diags);
  sdf_report report;
  if (d && !diags.has_errors())
    for (const auto& path : o.sdf) {
      auto f = read_sdf(path, diags);
      if (!f || !annotate_sdf(d->nets, *f, diags, report)) break;
    }
  print_diagnostics(diags);
  if (!d || diags.has_errors()) {
    if (diags.items.empty()) spdlog::error("cannot load '{}'", o.path);
    return std::nullopt;
  }
  if (sdf) *sdf = std::move(report);
  if (d->nets.gate_count() == 0 && d->nets.inputs.empty()) {
    if (!empty_ok) {
      spdlog::error(
          "{}: the design is empty (no gates and no inputs): there is nothing to simulate", o.path);
      return std::nullopt;
    }
    spdlog::warn("{}: the design is empty (no gates and no inputs)", o.path);
  }
  return d;
}

std::optional<corner> corner_option(const std::string& text) {
  std::string err;
  auto c = parse_corner(text, &err);
  if (!c) spdlog::error("--corner {}: {}", text, err);
  return c;
}

bool corner_fits(const design& d, corner& c, const std::string& text) {
  // A numbered corner must exist; a fixed: one names gates and rules of this design.
  std::string why = corner_range_error(c, delay_variables(d));
  if (why.empty()) why = corner_design_error(d, c);
  if (!why.empty()) spdlog::error("--corner {}: {}", text, why);
  return why.empty();
}

bool fits_kernel(const design& d) {
  const auto why = kernel_size_error(d.nets);
  if (why) spdlog::error("{}: {}", d.path, *why);
  return !why;
}

std::string replay_command(const design_options& o, const std::string& corner,
                           const std::string& horizon, std::uint64_t max_events, bool allow_x) {
  auto word = [](const std::string& w) {
    const bool plain = !w.empty() && w[0] != '#' &&
                       w.find_first_not_of(
                           "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz"
                           "0123456789_./:#@=+,-") == std::string::npos;
    if (plain) return w;
    std::string q = "'";
    for (char c : w) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
    return q + "'";
  };
  std::string cmd = "settle run " + word(o.path);
  if (!o.stim.empty()) cmd += " --stim " + word(o.stim);
  if (o.format != "auto") cmd += " --format " + o.format;
  if (o.dff != "gates") cmd += " --dff " + o.dff;
  if (!o.top.empty()) cmd += " --top " + word(o.top);
  if (!o.delay.empty()) cmd += " --delay " + word(o.delay);
  for (const auto& f : o.sdf) cmd += " --sdf " + word(f);
  cmd += " --corner " + word(corner);
  if (!horizon.empty()) cmd += " --horizon " + word(horizon);
  if (max_events) cmd += fmt::format(" --max-events {}", max_events);
  if (allow_x) cmd += " --allow-x";
  return cmd;
}

void add_allow_x_flag(CLI::App& cmd, bool& allow_x) {
  cmd.add_flag("--allow-x", allow_x,
               "do not count an output or watched net left at x at the end of a step as a finding");
}

std::string version_text() { return std::string("settle ") + SETTLE_VERSION; }

bool use_colour(int fd) {
  const char* no = std::getenv("NO_COLOR");
  if (no && *no) return false;  // no-color.org: any non-empty value disables colour
  const char* term = std::getenv("TERM");
  if (term && std::strcmp(term, "dumb") == 0) return false;
  return ::isatty(fd) == 1;
}

}  // namespace settle::cli
