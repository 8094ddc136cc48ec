// The stimulus: steps of input changes, each ended by `settle` or `run`, with expectations.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <vector>

#include "sim/model/netlist.hpp"

namespace settle {

struct assignment {
  net_id net = 0;
  logic value = logic::x;
};

/// `clock net period P [high H] [cycles N] [at T]`: rises at its reference
/// time (the time of its line in the step, or T when anchored with `at T`),
/// stays high H (default P/2), repeats every P; N = 0 means forever.
struct clock_spec {
  net_id net = 0;
  time_fs period = 0, high = 0;
  std::uint64_t cycles = 0;
};

/// An expression over nets (reaction conditions, properties): postfix code in
/// the encoding of complex gates (sim/model/netlist.hpp `op`), whose operands index
/// `nets`. Evaluated in ternary logic (Eichelberger 1965).
struct net_expr {
  std::vector<std::uint32_t> code;
  std::vector<net_id> nets;  ///< the distinct nets read, in order of first appearance
  std::string text;          ///< as written
};
/// The expression's value over the net values `values` (indexed by net id).
logic eval_expr(const net_expr& e, const logic* values);

/// `when COND [after RANGE] : ASSIGN {, ASSIGN} [times N]`: each time COND
/// turns true (x is not true), and at its line if COND is true there, the
/// assignments are applied to inputs after a delay drawn from `delay`.
struct reaction_rule {
  net_expr condition;
  delay_range delay;  ///< default 0
  std::vector<assignment> assigns;
  std::uint64_t times = 0;  ///< at most this many firings; 0: unbounded
  source_loc loc;
  std::string text;  ///< the rule as written, without its `times N`
};

/// A whole-run property: `always EXPR`, `never EXPR`, `never NET rises while
/// EXPR`, `never NET falls while EXPR`.
struct property {
  enum class kind : std::uint8_t {
    always,
    never,
    never_rises_while,
    never_falls_while
  } what = kind::never;
  net_expr expr;             ///< always/never: the expression; rises/falls: the while-condition
  net_id net = 0;            ///< rises/falls: the watched net
  std::vector<net_id> nets;  ///< every net involved (reported with a violation)
  source_loc loc;
  std::string text;  ///< the statement as written
};

/// A timing gauge: `gauge NAME = period of NET`, `... = pulse of NET high|low`,
/// `... = latency from NET rises|falls to NET rises|falls`.
struct gauge {
  enum class kind : std::uint8_t { period, pulse_high, pulse_low, latency } what = kind::period;
  std::string name;
  std::vector<net_id> nets;                 ///< period/pulse: one net; latency: from, to
  bool from_rises = true, to_rises = true;  ///< latency: the edges
  source_loc loc;
  std::string text;
};
/// "period", "pulse_high", "pulse_low", "latency" (the JSON `kind`).
const char* gauge_kind_name(gauge::kind k);

/// One timed action inside a step.
struct stim_action {
  enum class kind : std::uint8_t {
    at,
    after,
    clock,
    rule,
    property,
    gauge,  ///< activates stimulus::rules/properties/gauges[index] at this point
  } what = kind::at;
  time_fs time = 0;  ///< absolute for `at` (and an anchored clock), relative for `after`
  std::vector<assignment> assigns;  ///< at/after
  clock_spec clock;                 ///< clock
  bool anchored = false;            ///< clock: `at T` given (time is absolute)
  std::uint32_t index = 0;          ///< rule/property/gauge
  source_loc loc;
  source_loc time_loc;      ///< the time literal of `at` or of a clock's `at`
  std::string source_line;  ///< at/anchored clock: the line, for a run-time diagnostic
};

/// Expectations checked on a step's result.
struct expectation {
  enum class kind : std::uint8_t {
    value,          ///< expect net = v
    stable,         ///< expect stable (the step settled)
    oscillating,    ///< expect oscillating [period A..B]
    within,         ///< settle within T / expect settle within T
    no_glitch,      ///< expect no glitch on NET
    deterministic,  ///< expect deterministic (checked across corners)
    gauge,          ///< expect NAME within A..B: every sample of the gauge in the step inside
    resolves,       ///< expect resolves NET within T: every resolution of NET's element in the step
  } what = kind::value;
  net_id net = 0;           ///< value, no_glitch, resolves (an output of the element)
  std::uint32_t gauge = 0;  ///< gauge: index in stimulus::gauges
  std::string ref;          ///< the name as written (the gauge's name for `gauge`)
  logic want = logic::x;    ///< value
  time_fs lo = 0, hi = 0;   ///< within: hi is the budget; oscillating, gauge: the range
  bool has_range = false;   ///< oscillating with a period range
  source_loc loc;
};

struct step_spec {
  enum class end_kind : std::uint8_t { settle, run } end = end_kind::settle;
  std::string label;                 ///< the step's input changes as written
  std::vector<stim_action> actions;  ///< in source order
  time_fs run_for = 0;               ///< for `run`
  std::vector<expectation> expects;
  source_loc loc;  ///< the `settle` or `run` statement
};

struct stimulus {
  std::vector<step_spec> steps;
  std::vector<net_id> watch;  ///< nets reported besides the outputs
  std::vector<reaction_rule> rules;
  std::vector<property> properties;
  std::vector<gauge> gauges;
  std::string file;  ///< the file the stimulus was read from (run-time diagnostics)
  /// Anything that must be looked at after every instant (rules, properties, gauges).
  bool closed_loop() const { return !rules.empty() || !properties.empty() || !gauges.empty(); }
};

/// How every report titles a step: "step 2: a=1 b=0", or "step 1: (no input
/// change)" when its label is empty.
std::string step_title(std::size_t index, const std::string& label);

/// An expectation in the words of the language: "expect q = 1", "settle within
/// 2ns", "expect oscillating period 9ns..11ns", "expect no glitch on q", ...
std::string expectation_words(const netlist& n, const expectation& e);

}  // namespace settle
