// The command table and the helpers every settle command shares (loading, atomic output, colour).
#include "sim/cli/command.hpp"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstdlib>
#include <cstring>

#include <CLI/CLI.hpp>
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include "sim/time_parse.hpp"

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
  if (errors > max_errors) out += fmt::format("settle: {} more errors not shown\n", errors - max_errors);
  if (warnings > max_warnings) out += fmt::format("settle: {} more warnings not shown\n", warnings - max_warnings);
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

void add_design_options(CLI::App& cmd, design_options& o) {
  cmd.add_option("DESIGN", o.path, "design file (.settle, .bench for ISCAS netlists, .v for structural Verilog)")
      ->required();
  cmd.add_option("--stim", o.stim, "file with one stimulus { } block replacing the design's own");
  cmd.add_option("--format", o.format, "input format: auto (by extension), settle, bench or verilog")
      ->check(CLI::IsMember({"auto", "settle", "bench", "verilog"}));
  cmd.add_option("--top", o.top, "Verilog: the top module (default: the one no other module instantiates)");
  cmd.add_option("--dff", o.dff, "imported flip-flops: gates (six NAND gates) or primitive")
      ->check(CLI::IsMember({"gates", "primitive"}));
  cmd.add_option("--delay", o.delay, "delay of imported gates: MIN..MAX (e.g. 40ps..60ps)");
}

std::optional<design> load(const design_options& o) {
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
  print_diagnostics(diags);
  if (!d || diags.has_errors()) {
    if (diags.items.empty()) spdlog::error("cannot load '{}'", o.path);
    return std::nullopt;
  }
  return d;
}

bool atomic_file::open() {
  if (path_ == "-") {
    file_ = stdout;
    return true;
  }
  target_ = path_;
  struct stat st {};
  if (::lstat(path_.c_str(), &st) == 0 && S_ISLNK(st.st_mode)) {
    // Replace what the link points at, not the link.
    if (char* real = ::realpath(path_.c_str(), nullptr)) target_ = real, std::free(real);
  }
  if (::stat(target_.c_str(), &st) == 0 && !S_ISREG(st.st_mode)) {
    if (S_ISDIR(st.st_mode)) {
      spdlog::error("cannot write '{}': it is a directory", path_);
      return false;
    }
    file_ = std::fopen(target_.c_str(), "w");  // a device or FIFO: no temporary, no rename
    if (!file_) {
      spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
      return false;
    }
    direct_ = true;
    return true;
  }
  const auto slash = target_.rfind('/');
  const std::string dir = slash == std::string::npos ? "." : slash == 0 ? "/" : target_.substr(0, slash);
  const std::string base = slash == std::string::npos ? target_ : target_.substr(slash + 1);
  // The temporary's name stays within NAME_MAX however long the target's is.
  std::string templ = fmt::format("{}/.{}.tmp.XXXXXX", dir, base.substr(0, 200));
  const int fd = ::mkstemp(templ.data());
  if (fd < 0) {
    spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
    return false;
  }
  // mkstemp creates 0600; give the file the permissions a plain create would.
  const mode_t mask = ::umask(0);
  ::umask(mask);
  ::fchmod(fd, 0666 & ~mask);
  file_ = ::fdopen(fd, "w");
  if (!file_) {
    ::close(fd);
    ::unlink(templ.c_str());
    spdlog::error("cannot write '{}': {}", path_, std::strerror(errno));
    return false;
  }
  temp_ = templ;
  return true;
}

bool atomic_file::commit() {
  if (!file_) return false;
  if (file_ == stdout) {
    file_ = nullptr;
    if (std::fflush(stdout) == 0 && !std::ferror(stdout)) return true;
    spdlog::error("cannot write '-' (standard output): {}", std::strerror(errno));
    return false;
  }
  const bool flushed = std::fflush(file_) == 0 && !std::ferror(file_);
  const int err = errno;
  const bool closed = std::fclose(file_) == 0;
  file_ = nullptr;
  if (direct_) {
    direct_ = false;
    if (flushed && closed) return true;
    spdlog::error("cannot write '{}': {}", path_, std::strerror(flushed ? errno : err));
    return false;
  }
  if (!flushed || !closed || ::rename(temp_.c_str(), target_.c_str()) != 0) {
    spdlog::error("cannot write '{}': {}", path_, std::strerror(flushed && closed ? errno : err));
    ::unlink(temp_.c_str());
    temp_.clear();
    return false;
  }
  temp_.clear();
  return true;
}

void atomic_file::discard() {
  if (file_ && file_ != stdout) std::fclose(file_);
  file_ = nullptr;
  direct_ = false;
  if (!temp_.empty()) ::unlink(temp_.c_str());
  temp_.clear();
}

bool write_output(const std::string& path, std::string_view text) {
  atomic_file f(path);
  if (!f.open()) return false;
  if (std::fwrite(text.data(), 1, text.size(), f.get()) != text.size()) {
    spdlog::error("cannot write '{}': {}", path, std::strerror(errno));
    return false;
  }
  return f.commit();
}

std::string replay_command(const design_options& o, const std::string& corner, const std::string& horizon,
                           std::uint64_t max_events) {
  auto word = [](const std::string& w) {
    const bool plain = !w.empty() && w[0] != '#' &&
                       w.find_first_not_of("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz"
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
  cmd += " --corner " + word(corner);
  if (!horizon.empty()) cmd += " --horizon " + word(horizon);
  if (max_events) cmd += fmt::format(" --max-events {}", max_events);
  return cmd;
}

bool use_colour(int fd) {
  const char* no = std::getenv("NO_COLOR");
  if (no && *no) return false;  // no-color.org: any non-empty value disables colour
  const char* term = std::getenv("TERM");
  if (term && std::strcmp(term, "dumb") == 0) return false;
  return ::isatty(fd) == 1;
}

}  // namespace settle::cli
