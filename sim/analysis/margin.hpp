// Delay margins: the largest scaling of every gate's delay range that keeps each step passing, and
// settle-time margins.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <optional>
#include <string>
#include <vector>

#include "sim/analysis/culprit.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/model/design.hpp"

namespace settle {

struct margin_options {
  std::string spec = "extremes+random:200";  ///< the corners run at every probed spread
  std::uint64_t seed = 1;
  unsigned threads = 0;         ///< 0: the hardware's
  double resolution_pct = 1.0;  ///< bisection stops when the bracket is this narrow
  double ceiling_pct = 100.0;   ///< the largest spread searched (a pass there reports ">= ceiling")
  run_options run;              ///< horizon 0: the design's default horizon at its written delays
  bool culprits = true;         ///< run ddmin on divergences found just above the margin
  std::size_t culprit_tests = 4096;
  /// Called after every probe with (spread, corners, every step passed); may be empty.
  std::function<void(double, std::uint64_t, bool)> progress;
  /// When set and true the search stops at once (interruption); may be null.
  const std::atomic<bool>* stop = nullptr;
  /// Wall-clock budget for the whole search in seconds (0: none).
  double timeout_s = 0;
};

/// Why a step fails at some spread.
struct margin_failure {
  double spread = 0;     ///< w at which it was seen
  std::size_t step = 0;  ///< 1-based
  /// The first expectation of the step that fails in some corner; none when
  /// every expectation holds and the verdict alone is the finding.
  std::optional<std::size_t> expect_index;
  sweep_verdict verdict = sweep_verdict::deterministic;
  std::string witness;        ///< corner name with @w, replayable with `settle run --corner`
  std::string other_witness;  ///< nondeterministic: the witness of the second outcome
  std::string detail;
  std::uint64_t failing =
      0;  ///< corners that fail (expectation) or leave the main outcome (verdict)
  std::uint64_t corners = 0;
  std::optional<culprit_report> culprits;  ///< two settled outcomes at the first divergence
  /// A whole-run property that is violated (its index in stimulus::properties);
  /// `step` is then the step of its first violation at the witness.
  std::optional<std::size_t> property;
};

/// The delay-spread margin of one step.
struct step_margin {
  std::size_t index = 0;  ///< 1-based
  std::string label;
  double margin = 0;                      ///< largest passing spread found (0 when it fails at 0)
  bool at_ceiling = false;                ///< passes at the ceiling: the margin is at least that
  bool fails_at_zero = false;             ///< fails with every gate at its typical delay
  std::optional<margin_failure> failure;  ///< at the smallest failing spread probed
};

/// The delay-spread margin of one whole-run property (`always`, `never`): the
/// largest spread at which it holds in every corner, found by the same
/// bisection as the steps' (a property is an expectation like any other).
struct property_margin {
  std::size_t index = 0;  ///< into stimulus::properties
  double margin = 0;
  bool at_ceiling = false, fails_at_zero = false;
  std::optional<margin_failure> failure;  ///< at the smallest violating spread probed
};

/// The settle-time margin of one `settle within T` budget at the written spread.
struct within_margin {
  std::size_t step = 0;  ///< 1-based
  std::size_t expect_index = 0;
  time_fs budget = 0;
  time_fs worst = 0;  ///< the longest settle time over the corners that settled
  std::string worst_corner;
  std::int64_t margin_fs = 0;   ///< budget - worst (negative: over budget)
  std::uint64_t unsettled = 0;  ///< corners in which the step did not settle
};

struct margin_probe {
  double spread = 0;
  bool pass = false;
};

struct margin_result {
  double margin = 0;  ///< the design's margin: the smallest step or property margin
  bool at_ceiling = false, fails_at_zero = false;
  double resolution = 0.01, ceiling = 1.0;  ///< as fractions of the written spread
  std::optional<margin_failure> failure;    ///< the first failure just above the margin
  std::vector<step_margin> steps;
  std::vector<property_margin> properties;  ///< one per stimulus property
  std::vector<within_margin> within;
  std::vector<margin_probe> probes;  ///< in the order run
  /// The sweep at the written spread (w = 1); its expects' spec pointers
  /// point into the design searched (expectation e of step k is
  /// d.stim.steps[k].expects[e]), which must outlive the result.
  sweep_result written;
  std::uint64_t corners_per_probe = 0;
  std::uint64_t corner_runs = 0;   ///< over all probes
  std::uint64_t culprit_runs = 0;  ///< ddmin's runs
  bool sampled = false;            ///< the spec draws random or gauss corners
  bool exact = false;              ///< the spec is exhaustive without sampled corners
  double wall_s = 0;
  /// The search was stopped (signal or --timeout): margins then come only
  /// from the probes that finished, each still a valid lower bound (0 for a
  /// step no finished probe bracketed), and no culprits are sought.
  sweep_stop stopped = sweep_stop::none;
  /// Plain words on how far the number can be trusted.
  std::string confidence_note() const;
  /// True when every step passes and every property holds at the written spread (w = 1).
  bool passes_as_written() const;
};

/// Finds the margins by bisection over w on a grid of `resolution_pct`. A
/// step's pass/fail is assumed monotone in w (more spread, more ways to fail).
/// Returns nullopt and sets *error when the spec or options are bad.
std::optional<margin_result> find_margin(const design& d, const margin_options& o,
                                         std::string* error);

/// A spread as a percentage with at most two decimals: 0.19 -> "19%".
std::string spread_percent(double w);

}  // namespace settle
