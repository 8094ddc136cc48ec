// Small helpers the report-writing commands (run, sweep, explore, margin) share.
#include "sim/cli/report_common.hpp"

#include <fmt/color.h>
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <cctype>
#include <cerrno>
#include <charconv>
#include <cmath>
#include <cstdlib>

#include "sim/analysis/sweep.hpp"
#include "sim/model/time.hpp"
#include "sim/model/time_parse.hpp"

namespace settle::cli {

std::string file_stem(const std::string& path) {
  auto slash = path.rfind('/');
  std::string base = slash == std::string::npos ? path : path.substr(slash + 1);
  auto dot = base.rfind('.');
  if (dot != std::string::npos && dot > 0) base.resize(dot);
  return base.empty() ? "top" : base;
}

bool parse_horizon_option(const std::string& text, time_fs& out) {
  if (text.empty()) return true;
  std::string err;
  auto h = parse_time(text, &err);
  if (!h || !horizon_ok(*h, err)) {
    spdlog::error("--horizon: {}", err);
    return false;
  }
  if (*h == 0) {
    spdlog::error(
        "--horizon {}: the time limit of a step must be greater than 0 (leave --horizon out for "
        "the "
        "default of 10,000 x the largest gate delay)",
        text);
    return false;
  }
  out = *h;
  return true;
}

void check_output_path(CLI::Option* opt) {
  opt->check(CLI::Validator(
      [](std::string& v) -> std::string {
        return v.empty() ? "the path is empty; give a file name, or '-' for standard output" : "";
      },
      "PATH"));
}

void check_whole_number(CLI::Option* opt, std::uint64_t lo, std::uint64_t hi, const char* what,
                        const char* hint) {
  opt->check(CLI::Validator(
      [lo, hi, what, hint](std::string& v) -> std::string {
        const auto range = fmt::format("{} must be a whole number from {} to {}{}{}", what, lo, hi,
                                       hi == UINT64_MAX ? " (2^64-1)" : "", hint);
        std::uint64_t n = 0;
        const bool digits = !v.empty() && v.find_first_not_of("0123456789") == std::string::npos;
        if (!digits) return fmt::format("'{}' is not accepted: {}", v, range);
        auto [p, ec] = std::from_chars(v.data(), v.data() + v.size(), n);
        if (ec == std::errc::result_out_of_range)
          return fmt::format("{} is too large: {}", v, range);
        if (ec != std::errc{} || p != v.data() + v.size() || n < lo || n > hi)
          return fmt::format("{} is out of range: {}", v, range);
        return "";
      },
      fmt::format("{}..{}", lo, hi)));
}

void check_number_at_least(CLI::Option* opt, double lo, const char* what) {
  opt->check(CLI::Validator(
      [lo, what](std::string& v) -> std::string {
        char* end = nullptr;
        errno = 0;
        const double x = std::strtod(v.c_str(), &end);
        if (v.empty() || *end || !std::isfinite(x) || errno == ERANGE || !(x >= lo))
          return fmt::format("'{}' is not accepted: {} must be a finite number of at least {:g}", v,
                             what, lo);
        return "";
      },
      fmt::format(">= {:g}", lo)));
}

std::string mark(std::string_view word, bool good, bool colour) {
  std::string text(word);
  if (!good)
    for (auto& c : text) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  if (!colour) return text;
  return fmt::format(
      fmt::fg(good ? fmt::terminal_color::green : fmt::terminal_color::red) | fmt::emphasis::bold,
      "{}", text);
}

double seconds_since(std::chrono::steady_clock::time_point t0) {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

void add_json_option(CLI::App& cmd, std::string& path) {
  check_output_path(
      cmd.add_option("--json", path, "write the results as JSON to PATH ('-' for stdout)"));
}

void add_junit_option(CLI::App& cmd, std::string& path) {
  check_output_path(cmd.add_option("--junit", path, "write a JUnit-style XML report to PATH"));
}

void add_html_option(CLI::App& cmd, std::string& path, const char* what) {
  check_output_path(cmd.add_option(
      "--html", path, fmt::format("write a self-contained HTML report ({}) to PATH", what)));
}

void add_timeout_option(CLI::App& cmd, double& seconds, const char* help) {
  check_number_at_least(cmd.add_option("--timeout", seconds, help), 0, "the timeout in seconds");
}

void add_quiet_flag(CLI::App& cmd, bool& quiet) {
  cmd.add_flag("-q,--quiet", quiet, "print nothing on stdout; errors still go to stderr");
}

void add_max_memory_option(CLI::App& cmd, std::uint64_t& mib) {
  auto* opt = cmd.add_option(
      "--max-memory", mib,
      fmt::format(
          "memory for the per-corner results, in MiB (about 20 bytes per corner and step, 8 per "
          "corner and gauge); a larger sweep is refused before it starts (default {})",
          sweep_default_max_memory_mib));
  check_whole_number(opt, 1, std::uint64_t{1} << 40, "the memory in MiB");
}

void add_corner_options(CLI::App& cmd, std::string& spec, std::uint64_t& seed, unsigned& threads,
                        const char* help) {
  cmd.add_option("--corners", spec, help);
  check_whole_number(
      cmd.add_option("--seed", seed, "seed of the random and gauss corners (default 1)"), 0,
      UINT64_MAX, "the seed");
  check_whole_number(
      cmd.add_option("--threads", threads, "worker threads (default: the hardware's)"), 1, 4096,
      "the thread count", "; leave --threads out to use every hardware thread");
}

void add_run_limit_options(CLI::App& cmd, std::string& horizon, std::uint64_t* max_events,
                           const char* events_help) {
  cmd.add_option("--horizon", horizon,
                 "time limit per step (default 10,000 x the largest written gate delay)");
  if (max_events)
    check_whole_number(cmd.add_option("--max-events", *max_events, events_help), 0, UINT64_MAX,
                       "the event limit");
}

bool fits_memory(const sweep_plan& plan, std::size_t steps, unsigned copies, std::uint64_t mib,
                 std::size_t gauges) {
  const std::uint64_t one = sweep_result_bytes(plan, steps, gauges);
  const std::uint64_t need = one > UINT64_MAX / copies ? UINT64_MAX : one * copies;
  if (need <= (mib << 20)) return true;
  spdlog::error(
      "--corners '{}': {} corners x {} steps need about {:.0f} MiB for their results, more than "
      "--max-memory {} MiB; sample fewer corners (e.g. --corners extremes+random:1000) or raise "
      "--max-memory",
      plan.spec, plan.corners, std::max<std::size_t>(steps, 1),
      static_cast<double>(need) / (1 << 20), mib);
  return false;
}

}  // namespace settle::cli
