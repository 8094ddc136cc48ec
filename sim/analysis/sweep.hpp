// Corner sweeps: one design under many delay corners, grouped into outcomes with a verdict per
// step.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "sim/analysis/stats.hpp"
#include "sim/kernel/interval.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"

namespace settle {

/// The most corners `exhaustive` enumerates (2^20); above it the spec is refused.
inline constexpr std::uint64_t exhaustive_limit = std::uint64_t{1} << 20;
/// The most corners one sweep may hold in total.
inline constexpr std::uint64_t sweep_corner_limit = std::uint64_t{1} << 26;

/// The corners of a sweep, in SPEC order. Corner i's delays follow from
/// (seed, i) alone: corner_at(i) builds its name without enumerating the rest.
struct sweep_plan {
  /// One `+`-separated item of the spec (interval is not a corner).
  struct item {
    corner::kind what = corner::kind::random;
    std::uint64_t first = 0;  ///< global number of its first corner
    std::uint64_t count = 0;
    std::uint64_t offset =
        0;  ///< corner index of its first corner (random/gauss continue across items)
  };
  std::string spec;
  std::uint64_t seed = 1;
  std::vector<item> items;
  std::uint64_t corners = 0;  ///< total, interval excluded (0 when the spec is `interval` alone)
  std::uint64_t sampled = 0;  ///< corners from random:N and gauss:N items
  bool interval = false;      ///< the spec asks for the min-max ambiguity run
  /// The spec is `interval` alone: no corner runs, the interval run judges every step.
  bool interval_only() const { return interval && corners == 0; }

  /// The i-th corner of the sweep (0 <= i < corners).
  corner corner_at(std::uint64_t i) const;
  /// True when corner i comes from a random or gauss item.
  bool is_sampled(std::uint64_t i) const;
};

/// Parses SPEC (`extremes`, `exhaustive`, `random:N`, `gauss:N`, `interval`,
/// joined by `+`) for a design of `variables` delay variables (delay_variables,
/// sim/model/corner.hpp). `extremes` gives 3 + 2v
/// corners `extremes#k`; `exhaustive` 2^v corners `exhaustive#k` (refused
/// above 2^20); `random:N` corners `random:S#i`; `gauss:N` corners
/// `gauss:S#i`. A second random (or gauss) item continues the numbering of
/// the first, so no corner repeats. `interval` alone is a plan of 0 corners
/// whose steps the min-max run judges. On error returns nullopt and sets *error.
std::optional<sweep_plan> plan_sweep(std::string_view spec, std::uint64_t seed,
                                     std::size_t variables, std::string* error);

/// The default --max-memory of sweep and margin, in MiB (explore's is the same).
inline constexpr std::uint64_t sweep_default_max_memory_mib = 2048;

/// Bytes a sweep of `plan` holds for its per-corner results over `steps`
/// steps and `gauges` gauges: an outcome id and a settle time per corner and
/// step while the corners run, then the settle times each outcome keeps for
/// the report, about 20 bytes per corner and step in all, plus one mean (8
/// bytes) per corner and gauge for the gauges' exact medians. Known before
/// any corner runs, so an oversized sweep is refused up front (--max-memory)
/// instead of running out of memory part-way.
std::uint64_t sweep_result_bytes(const sweep_plan& plan, std::size_t steps, std::size_t gauges = 0);

/// A step's verdict across all corners.
enum class sweep_verdict : std::uint8_t {
  deterministic,     ///< one settled outcome
  nondeterministic,  ///< more than one settled outcome: a critical race
  oscillating,       ///< every corner oscillates
  /// Some corners settle, others oscillate, time out or deadlock (or a mix of those); also
  /// where some corners deadlock and the others do anything else.
  mixed,
  timeout,  ///< every corner timed out (or hit the event limit)
  /// `interval` alone: the min-max run left a reported net at x (or did not
  /// settle), so it proves nothing either way about this step.
  inconclusive,
  deadlock,  ///< every corner deadlocks: quiet with a reaction rule still owed
};
/// "deterministic", "nondeterministic", "oscillating", "mixed", "timeout", "inconclusive",
/// "deadlock".
const char* verdict_name(sweep_verdict v);

/// Minimum, lower median (the ((n-1)/2)-th of n sorted values) and maximum.
struct time_summary {
  time_fs min = 0, median = 0, max = 0;
};

/// Corners of one step that ended the same way.
struct sweep_outcome {
  step_status status = step_status::settled;
  bool end_of_time =
      false;  ///< a timeout at the end of representable time (step_result::end_of_time)
  std::vector<logic> values;  ///< per reported net
  time_fs period = 0;         ///< oscillating only
  std::uint64_t count = 0;
  double share = 0;                ///< count / corners
  proportion_interval share_ci95;  ///< Wilson score interval
  std::uint64_t witness = 0;       ///< the lowest-numbered corner with this outcome
  std::string witness_name;
  /// Over its corners: settle times (settled, running: the last change;
  /// deadlock: when it went quiet); oscillating: the time from the step's
  /// start to the instant the repeat was detected; timeout and event_limit:
  /// the last value change, minus the start.
  time_summary settle;
  std::uint64_t slowest = 0;  ///< the lowest-numbered corner whose settle time is settle.max
  std::vector<time_fs> settle_times;  ///< its corners' settle times, ascending (for histograms)
  /// deadlock only: the rules owed at the witness corner (replayed once the corners ran).
  std::vector<owed_rule> owed;
  /// Reported nets at x at the end that the step does not expect at x
  /// (step_result::unknown; empty when oscillating or under --allow-x). A finding.
  std::vector<net_id> unknown;
  /// timeout only, at the witness corner (replayed once the corners ran, for
  /// the first 32 distinct timeout witnesses; `reached` stays 0 beyond): the
  /// time from the step's start to where it stopped, the value changes it
  /// applied, and when its net values (not its full state) had repeated
  /// (step_result::values_repeat_at, values_period; 0: they had not).
  time_fs reached = 0;
  std::uint64_t events = 0;
  time_fs values_repeat_at = 0, values_period = 0;
};

/// An expectation of a step judged over every corner.
struct sweep_expect {
  const expectation* spec = nullptr;
  std::uint64_t failing = 0;  ///< corners in which it fails
  std::uint64_t witness = 0;  ///< the first failing corner (when failing > 0)
  std::string witness_name;
  std::string detail;  ///< why it fails at the witness (or why the interval run does not prove it)
  /// `interval` alone: judged by the min-max run, not by corners. It holds
  /// then only when the run proves it (`proven`); failing stays 0.
  bool by_interval = false;
  bool proven = false;
  bool pass() const { return by_interval ? proven : failing == 0; }
};

struct sweep_step {
  std::size_t index = 0;  ///< 1-based
  std::string label;
  bool run_step = false;  ///< ended by `run` (a sample in time, not a settled state)
  sweep_verdict verdict = sweep_verdict::deterministic;
  bool first_divergence = false;
  std::size_t inherits = 0;  ///< index of the first divergent step before this one; 0 = none
  std::vector<sweep_outcome> outcomes;  ///< by count descending, then witness
  std::vector<sweep_expect> expects;
  /// 3/N when the N random and gauss corners all gave one outcome (rule of three).
  std::optional<double> unseen_outcome_bound;
  std::optional<interval_step> interval;  ///< when the spec has `interval`
  /// No finding: deterministic (or an expected oscillation, or a `run` step
  /// that settles or keeps running without `expect deterministic`) and every
  /// expectation holds in every corner. With `interval` alone: proven, and
  /// every expectation proven by the min-max run.
  bool pass = true;
};

/// The race a step's culprit search explains: the witness corners of its two
/// most common settled outcomes (outcomes are ordered by count), or nullopt
/// when fewer than two outcomes settled. sweep and margin both ask here.
std::optional<std::pair<std::uint64_t, std::uint64_t>> race_witnesses(const sweep_step& s);

/// A whole-run property judged over every corner.
struct sweep_property {
  std::uint32_t index = 0;      ///< into stimulus::properties
  std::uint64_t violating = 0;  ///< corners in which it is violated
  std::uint64_t witness = 0;    ///< the lowest-numbered violating corner (when violating > 0)
  std::string witness_name;
  time_fs first_violation = 0;  ///< at the witness
  std::size_t step = 0;         ///< at the witness, 1-based
  bool holds() const { return violating == 0; }
};

/// A timing gauge's distribution over corners. Each corner contributes its
/// samples' min, mean and max; the sweep keeps the extremes with their
/// corners (mergeable across threads: the smaller value, then the lower
/// corner) and every corner's mean for an exact median.
struct sweep_gauge {
  std::uint32_t index = 0;    ///< into stimulus::gauges
  std::uint64_t corners = 0;  ///< corners with at least one sample
  std::uint64_t samples = 0;  ///< over all corners
  time_fs min = 0, max = 0;   ///< the smallest and largest sample of any corner
  double median = 0;          ///< the lower median of the corners' mean samples (fs)
  std::uint64_t witness_min = 0, witness_max = 0;  ///< the lowest-numbered corners showing min, max
  std::string witness_min_name, witness_max_name;
};

/// Why a sweep stopped before running every corner.
enum class sweep_stop : std::uint8_t { none, interrupted, timeout };

/// A metastable element over the corners: how its resolutions went, and for
/// each `expect resolves` budget of it the share of corners in which one took
/// longer, beside the model's expected share (a drawn tie exceeds a budget T
/// with probability e^(-(T - D)/tau); any other resolution is as it ran).
struct sweep_element {
  std::uint32_t index = 0;                    ///< into netlist::meta
  std::uint64_t resolutions = 0, inside = 0;  ///< over all corners; inside the window
  std::uint64_t drawn = 0;                    ///< ties drawn from the corners' streams
  time_fs longest = 0;                        ///< the longest resolution of any corner
  std::uint64_t witness = 0;                  ///< the lowest-numbered corner showing it
  std::string witness_name;
  struct budget {
    time_fs within = 0;
    std::uint64_t exceeded = 0;  ///< corners with a resolution longer than `within`
    double share = 0;
    proportion_interval share_ci95;
    double model_share = 0;
  };
  std::vector<budget> budgets;  ///< in increasing order
};

struct sweep_result {
  std::uint64_t corners = 0;  ///< corners run to the end (all of the plan unless stopped)
  std::uint64_t planned = 0;  ///< corners in the plan
  sweep_stop stopped = sweep_stop::none;  ///< the steps then cover the finished corners only
  unsigned threads = 1;
  std::uint64_t events = 0;  ///< value changes, summed over corners
  double wall_s = 0;
  std::vector<net_id> reported;  ///< outputs, then watched nets
  std::vector<sweep_step> steps;
  /// The stimulus could not go on in some corner (an `at` earlier than the
  /// time that corner reached): the lowest such corner's diagnostic. An
  /// error of the input (exit 2), whatever the other corners did.
  std::optional<diagnostic> error;
  std::uint64_t error_corner = UINT64_MAX;
  std::vector<sweep_property> properties;  ///< one per stimulus property, in order
  std::vector<sweep_gauge> gauges;         ///< one per stimulus gauge, in order
  std::vector<sweep_element> elements;     ///< one per metastable element, in netlist order
  /// Every step passes and every property holds in every corner, and the sweep ran to the end.
  bool pass() const;
};

struct sweep_options {
  unsigned threads = 0;  ///< 0: std::thread::hardware_concurrency()
  run_options run;
  /// Called on the calling thread about every `progress_every_s` with
  /// (corners done, total) while the workers run; may be empty.
  std::function<void(std::uint64_t, std::uint64_t)> progress;
  double progress_every_s = 0.25;
  /// Polled by the workers (between instants and between corners): when it
  /// becomes true the sweep stops within a few milliseconds, drops the corners
  /// it was running and groups the finished ones. May be null. The command
  /// line passes settle::cli::interrupt_flag() (SIGINT/SIGTERM).
  const std::atomic<bool>* stop = nullptr;
  /// Wall-clock budget in seconds (0: none); past it the sweep stops the same
  /// way and reports sweep_stop::timeout.
  double timeout_s = 0;
};

/// Runs every corner of `plan` over `d` on a pool of worker threads (dynamic
/// scheduling through an atomic counter; one run_context and delay table per
/// worker; results stored per corner), then groups outcomes per step. The
/// result is the same whatever the thread count, apart from wall_s and threads.
sweep_result run_sweep(const design& d, const sweep_plan& plan, const sweep_options& opt);

}  // namespace settle
