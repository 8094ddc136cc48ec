// Race culprits: the gates whose delays decide a non-deterministic step, found by delta debugging.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "sim/model/design.hpp"

namespace settle {

/// Delta debugging's minimising algorithm ddmin (Zeller and Hildebrandt 2002,
/// "Simplifying and Isolating Failure-Inducing Input", IEEE TSE 28(2):183-200).
/// `fails(subset)` is true when a subset of `items` still shows the effect;
/// fails(items) must hold. Returns a 1-minimal failing subset (removing any
/// single element makes it pass), in the order of `items`. Stops splitting
/// after `max_tests` calls of `fails` and returns the smallest failing subset
/// found so far; *tests receives the number of calls (may be null).
std::vector<std::uint32_t> ddmin(
    const std::vector<std::uint32_t>& items,
    const std::function<bool(const std::vector<std::uint32_t>&)>& fails,
    std::size_t max_tests = 4096, std::size_t* tests = nullptr);

/// One gate of a race with its delays in the two witness corners.
struct culprit_gate {
  gate_id gate = 0;
  time_fs rise[2] = {0, 0};  ///< in corner A, corner B
  time_fs fall[2] = {0, 0};
};

/// One link of a competing path: a net and when its deciding change arrived.
struct path_hop {
  net_id net = 0;
  time_fs time = 0;
  logic value = logic::x;
};

struct culprit_report {
  std::size_t step = 0;   ///< 1-based
  std::string corner[2];  ///< witness names of outcome A and B
  /// Per outcome: the reported net the path ends at (the first whose final
  /// value differs between the outcomes and that changed in that run).
  net_id decided[2] = {no_id, no_id};
  std::vector<culprit_gate> gates;
  /// For each outcome, the chain of nets along which the change that decided
  /// decided[i] arrived (each hop the last-changing fan-in of the next gate),
  /// from where it entered the step to decided[i].
  std::vector<path_hop> path[2];
  std::size_t differing = 0;  ///< gates whose delays differ between A and B
  std::size_t tests = 0;      ///< runs spent by ddmin
  bool minimal = true;        ///< false when the test budget ran out
};

/// Finds the gates of `d` whose delays, moved from table A's values to table
/// B's, turn step `step`'s outcome (status and reported values) from A's into
/// B's. Each test is one run_stimulus with a mixed delay table. When A and B
/// give the same outcome at that step the report has no gates.
culprit_report find_culprits(const design& d, const run_options& opt, std::size_t step,
                             const corner& a, const corner& b, std::size_t max_tests = 4096);
/// The same with explicit delay tables; `names` label the two corners.
culprit_report find_culprits(const design& d, const run_options& opt, std::size_t step,
                             const delay_table& a, const delay_table& b, const std::string names[2],
                             std::size_t max_tests = 4096);

/// Readable lines, each prefixed with `indent`.
std::string culprit_text(const netlist& n, const culprit_report& r, const std::string& indent);

}  // namespace settle
