// Small helpers the report-writing commands (run, sweep, explore, margin) share.
#pragma once

#include <chrono>
#include <string>
#include <string_view>

#include "sim/model/logic.hpp"
#include "sim/model/netlist.hpp"
#include "sim/model/stimulus.hpp"
#include "waves/json.hpp"

namespace CLI {
class App;
class Option;
}  // namespace CLI
namespace settle {
struct sweep_plan;
}

namespace settle::cli {

/// The design file's name without folder and extension ("top" when that is
/// empty): the scope name of a VCD dump.
std::string file_stem(const std::string& path);

/// Parses the --horizon option into `out` when `text` is not empty; on a bad
/// time, or a horizon of 0, prints "--horizon: why" on stderr and returns
/// false (exit 2).
bool parse_horizon_option(const std::string& text, time_fs& out);

/// Refuses an empty value of an output path option (`--json ''`), in words.
void check_output_path(CLI::Option* opt);
/// Accepts only a whole number from `lo` to `hi` written in decimal digits
/// (no sign, nothing above 2^64-1, never clamped); `what` names the quantity
/// in the message ("the seed", "the thread count"), `hint` is added after it.
void check_whole_number(CLI::Option* opt, std::uint64_t lo, std::uint64_t hi, const char* what,
                        const char* hint = "");
/// Accepts only a finite number of at least `lo` (a decimal or exponent form).
void check_number_at_least(CLI::Option* opt, double lo, const char* what);

/// The one way text reports mark a verdict: a finding in capitals ("FAIL",
/// "NONDETERMINISTIC", "TIMEOUT", "FINDINGS"), anything else as written in
/// lower case ("pass", "deterministic"); with `colour` (use_colour: a
/// terminal and NO_COLOR unset) a finding is bold red, the rest bold green.
std::string mark(std::string_view word, bool good, bool colour);

/// What the `unknown` line says after the names: why it is a finding and the two ways to accept it.
inline constexpr const char* unknown_words =
    "at x at the end of the step (accept it with 'expect NET = x' or --allow-x)";
/// Seconds of wall-clock time since `t0`.
double seconds_since(std::chrono::steady_clock::time_point t0);

/// --json PATH: "write the results as JSON to PATH ('-' for stdout)".
void add_json_option(CLI::App& cmd, std::string& path);
/// --junit PATH: "write a JUnit-style XML report to PATH".
void add_junit_option(CLI::App& cmd, std::string& path);
/// --html PATH: "write a self-contained HTML report (`what`) to PATH".
void add_html_option(CLI::App& cmd, std::string& path, const char* what);
/// --timeout SECONDS (0 or more); `help` says what stops when it runs out.
void add_timeout_option(CLI::App& cmd, double& seconds, const char* help);
/// -q,--quiet: "print nothing on stdout; errors still go to stderr".
void add_quiet_flag(CLI::App& cmd, bool& quiet);
/// --max-memory MIB on sweep and margin: the per-corner results a sweep may hold.
void add_max_memory_option(CLI::App& cmd, std::uint64_t& mib);
/// The corner options of sweep and margin, one wording and one check each:
/// --corners SPEC (`help` says what the corners are for and the default),
/// --seed N (0 to 2^64-1) and --threads N (1 to 4096).
void add_corner_options(CLI::App& cmd, std::string& spec, std::uint64_t& seed, unsigned& threads,
                        const char* help);
/// The run limits of run, sweep and margin: --horizon TIME (parsed later by
/// parse_horizon_option) and, when `max_events` is not null, --max-events N
/// (`events_help` says what stops).
void add_run_limit_options(CLI::App& cmd, std::string& horizon, std::uint64_t* max_events = nullptr,
                           const char* events_help = "");

/// True when `copies` sweeps of `plan` over `steps` steps and `gauges` gauges
/// fit in `mib` MiB of per-corner results (sweep_result_bytes); otherwise
/// prints why on stderr (the caller exits 2 before any corner runs).
bool fits_memory(const sweep_plan& plan, std::size_t steps, unsigned copies, std::uint64_t mib,
                 std::size_t gauges = 0);

}  // namespace settle::cli
