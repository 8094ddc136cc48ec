// The subcommand table of the settle command line and the helpers every command shares.
#pragma once

#include <cstdio>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "parser/load.hpp"
#include "sim/cli/outputs.hpp"
#include "sim/model/corner.hpp"

namespace CLI {
class App;
class Validator;
}  // namespace CLI

namespace settle {
struct sdf_report;
}

namespace settle::cli {

/// Process exit statuses (a public contract).
enum class exit_status : int { ok = 0, findings = 1, error = 2, interrupted = 130 };

/// A subcommand: `add` creates it under `app` and arranges for its callback to
/// store the outcome in `status`.
struct command {
  const char* name;
  void (*add)(CLI::App& app, exit_status& status);
};

/// Registers a command at static-initialisation time (the command files are
/// linked straight into the executable). Returns a dummy for the registrar.
int register_command(command c);
/// Registered commands in the order of `order` (a command's rank in help).
const std::vector<command>& commands();

#define SETTLE_COMMAND(ident, name, add_fn) \
  static const int settle_command_##ident = ::settle::cli::register_command({name, add_fn})

/// The options every command that reads a design takes: DESIGN, --stim,
/// --format, --dff, --delay.
struct design_options {
  std::string path;
  std::string stim;
  std::string format = "auto";
  std::string dff = "gates";
  std::string delay;  ///< MIN..MAX for imported gates; empty: the default
  std::string top;    ///< Verilog: the top module; empty: the one no other module instantiates
  std::vector<std::string> sdf;  ///< --sdf FILE...: SDF back-annotation, applied in order
};
void add_design_options(CLI::App& cmd, design_options& o);

/// A CLI11 check that accepts only one of `words`, with a message in words.
CLI::Validator one_of(std::vector<std::string> words);

/// The `settle run` command line that replays `corner` of this design (words
/// the shell would change are single-quoted); empty `horizon` and zero
/// `max_events` are left out; `allow_x` adds --allow-x.
std::string replay_command(const design_options& o, const std::string& corner,
                           const std::string& horizon = "", std::uint64_t max_events = 0,
                           bool allow_x = false);

/// --allow-x on run, sweep and margin: a net at x at the end of a step is no finding.
void add_allow_x_flag(CLI::App& cmd, bool& allow_x);

/// Prints diagnostics on stderr: at most `max_errors` errors and
/// `max_warnings` warnings (with their notes), then one line per kind saying
/// how many more were not shown ("settle: N more warnings not shown").
void print_diagnostics(const diagnostics& diags, std::size_t max_errors = 50,
                       std::size_t max_warnings = 20);

/// The files a design's options read, for check_paths: the design file and
/// the --stim file when there is one, and every --sdf file.
std::vector<path_use> design_inputs(const design_options& o);

/// Loads the design; prints diagnostics (file:line:col, caret) on stderr.
/// A design with no gates and no inputs is an error unless `empty_ok`, when
/// it is a warning (`settle check`).
/// The --sdf files are applied in order; `sdf`, when given, receives what
/// they did. Returns nullopt when there was an error (the command then exits 2).
std::optional<design> load(const design_options& o, bool empty_ok = false,
                           sdf_report* sdf = nullptr);

/// True when the timed kernel takes the design; otherwise says why on stderr
/// (the command then exits 2). The commands that run it ask before they do.
bool fits_kernel(const design& d);

/// --corner TEXT parsed; nullopt after saying why on stderr (exit 2).
std::optional<corner> corner_option(const std::string& text);
/// True when corner `c` (from --corner TEXT) exists for design `d` (its
/// numbered corners, a fixed: one's names and ranges); otherwise says why.
bool corner_fits(const design& d, corner& c, const std::string& text);
/// True when colour may be used on this stream (a terminal, NO_COLOR unset).
bool use_colour(int fd);

/// "settle VERSION": what --version prints and the VCD $version and baseline files record.
std::string version_text();

}  // namespace settle::cli
