// Margin baselines: a versioned JSON file of margins per design and step, and the comparison a CI
// job runs.
#pragma once

#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "sim/analysis/margin.hpp"

namespace settle {

/// The format this build writes. Readers accept every version from 1 to this.
inline constexpr int baseline_format_version = 1;

struct baseline_step {
  std::size_t index = 0;
  std::string label;
  double margin_pct = 0;
  bool at_least = false;  ///< passed at the search ceiling: the margin is at least margin_pct
};

struct baseline_within {
  std::size_t step = 0;
  std::size_t ordinal = 0;  ///< the n-th `settle within` of the step (0-based)
  time_fs budget = 0;
  std::int64_t margin_fs = 0;
  std::uint64_t unsettled = 0;
  double margin_pct() const {
    return budget ? 100.0 * static_cast<double>(margin_fs) / static_cast<double>(budget) : 0;
  }
};

/// The margins of one design (and stimulus file) under one search setting.
struct baseline_entry {
  std::string design, stim;  ///< paths as given on the command line
  std::string spec;
  std::uint64_t seed = 1;
  double resolution_pct = 1, ceiling_pct = 100;
  double margin_pct = 0;
  bool at_least = false;
  std::vector<baseline_step> steps;
  std::vector<baseline_within> within;
};

struct baseline_file {
  int format_version = baseline_format_version;
  std::string written_by;  ///< "settle 0.1.0"
  std::vector<baseline_entry> designs;
};

/// Reads a baseline (any format_version from 1 to baseline_format_version;
/// fields it does not know are ignored). On error returns nullopt and sets *error.
std::optional<baseline_file> parse_baseline(std::string_view text, std::string* error);
/// The file's JSON text (format_version first).
std::string baseline_text(const baseline_file& f);

/// The entry for a margin search of `d`.
baseline_entry baseline_of(const design& d, const std::string& design_path,
                           const std::string& stim_path, const margin_options& o,
                           const margin_result& r);
/// Replaces the entry with the same design and stimulus (removing any further
/// duplicates of it), or appends it.
void merge_entry(baseline_file& f, baseline_entry e);
/// The entry for (design, stim), or null.
const baseline_entry* find_entry(const baseline_file& f, const std::string& design_path,
                                 const std::string& stim_path);

/// One margin that moved between a baseline and now.
struct baseline_change {
  std::string what;  ///< "design", "step 2 (after 2ns a = 1)", "settle within 2ns of step 3"
  double before_pct = 0, after_pct = 0;
  bool regression = false;  ///< fell by more than the tolerance
  bool before_at_least = false,
       after_at_least = false;  ///< the figure is a lower bound (passed at a ceiling)
};

struct baseline_comparison {
  std::vector<baseline_change> changes;  ///< every margin that moved, regressions first
  std::vector<std::string> notes;        ///< steps added or removed, settings that differ
  /// Some old figure lay above this run's ceiling and was compared only up to it.
  bool capped = false;
  bool regressed() const;
};

/// Compares `now` against `before`: a margin regresses when it fell by more
/// than `tolerance_pct` percentage points (settle-time margins as a
/// percentage of their budget), or a budget no longer settles in every corner.
/// A margin at a search ceiling is a lower bound: an old lower bound regresses
/// only when the new exact figure is below it minus the tolerance, and a new
/// one only when it is below the old figure, taken at most at this run's
/// ceiling, minus the tolerance, so a margin at this run's ceiling never
/// regresses; it gets a note when the old figure lies above that ceiling.
baseline_comparison compare_baseline(const baseline_entry& before, const baseline_entry& now,
                                     double tolerance_pct);

}  // namespace settle
