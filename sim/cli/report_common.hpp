// Small helpers the report-writing commands (run, sweep, explore, margin) share.
#pragma once

#include <chrono>
#include <string>

#include "sim/stimulus.hpp"
#include "sim/logic.hpp"

namespace settle::cli {

/// One level as the one-character string the JSON reports use ("0", "1", "x").
std::string logic_text(logic v);

/// The JSON word of an expectation kind: "value", "stable", "oscillating",
/// "within", "no_glitch" or "deterministic".
const char* expect_kind_word(expectation::kind k);

/// The design file's name without folder and extension ("top" when that is
/// empty): the scope name of a VCD dump.
std::string file_stem(const std::string& path);

/// Parses the --horizon option into `out` when `text` is not empty; on a bad
/// time prints "--horizon: why" on stderr and returns false (exit 2).
bool parse_horizon_option(const std::string& text, time_fs& out);

/// Seconds of wall-clock time since `t0`.
double seconds_since(std::chrono::steady_clock::time_point t0);

}  // namespace settle::cli
