// The stimulus: steps of input changes, each ended by `settle` or `run`, with expectations.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "sim/netlist.hpp"

namespace settle {

struct assignment {
  net_id net = 0;
  logic value = logic::x;
};

/// `clock net period P [high H] [cycles N]`: rises at the reference time,
/// stays high H (default P/2), repeats every P; N = 0 means forever.
struct clock_spec {
  net_id net = 0;
  time_fs period = 0, high = 0;
  std::uint64_t cycles = 0;
};

/// One timed action inside a step.
struct stim_action {
  enum class kind : std::uint8_t { at, after, clock } what = kind::at;
  time_fs time = 0;                ///< absolute for `at`, relative for `after`
  std::vector<assignment> assigns; ///< at/after
  clock_spec clock;                ///< clock
  source_loc loc;
};

/// Expectations checked on a step's result.
struct expectation {
  enum class kind : std::uint8_t {
    value,         ///< expect net = v
    stable,        ///< expect stable (the step settled)
    oscillating,   ///< expect oscillating [period A..B]
    within,        ///< settle within T / expect settle within T
    no_glitch,     ///< expect no glitch on NET
    deterministic, ///< expect deterministic (checked across corners)
  } what = kind::value;
  net_id net = 0;                 ///< value, no_glitch
  std::string ref;                ///< the name as written
  logic want = logic::x;          ///< value
  time_fs lo = 0, hi = 0;         ///< within: hi is the budget; oscillating: period range
  bool has_range = false;         ///< oscillating with a period range
  source_loc loc;
};

struct step_spec {
  enum class end_kind : std::uint8_t { settle, run } end = end_kind::settle;
  std::string label;                 ///< the step's input changes as written
  std::vector<stim_action> actions;  ///< in source order
  time_fs run_for = 0;               ///< for `run`
  std::vector<expectation> expects;
  source_loc loc;                    ///< the `settle` or `run` statement
};

struct stimulus {
  std::vector<step_spec> steps;
  std::vector<net_id> watch;   ///< nets reported besides the outputs
};

/// An expectation in the words of the language: "expect q = 1", "settle within
/// 2ns", "expect oscillating period 9ns..11ns", "expect no glitch on q", ...
std::string expectation_words(const netlist& n, const expectation& e);

}  // namespace settle
