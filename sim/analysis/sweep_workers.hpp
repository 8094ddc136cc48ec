// The sweep's workers: what they record of each corner, and the pool that runs them. Internal to
// sweep.cpp and sweep_workers.cpp.
#pragma once

#include <atomic>
#include <chrono>
#include <cmath>
#include <cstdint>
#include <exception>
#include <limits>
#include <mutex>
#include <optional>
#include <string>
#include <unordered_map>
#include <vector>

#include "sim/analysis/sweep.hpp"

namespace settle::detail {

/// What one worker learns about one expectation of one step.
struct expect_acc {
  std::uint64_t failing = 0;
  std::uint64_t first = UINT64_MAX;
  std::string detail;
};

/// Outcome numbering shared by the workers. Ids are internal: the final order
/// comes from counts and witnesses, so it does not depend on which worker saw
/// an outcome first.
class outcome_registry {
 public:
  explicit outcome_registry(std::size_t steps) : ids_(steps), keys_(steps) {}
  std::uint32_t id(std::size_t step, const std::string& key) {
    std::lock_guard lock(mutex_);
    auto [it, fresh] = ids_[step].try_emplace(key, static_cast<std::uint32_t>(keys_[step].size()));
    if (fresh) keys_[step].push_back(key);
    return it->second;
  }
  const std::vector<std::string>& keys(std::size_t step) const { return keys_[step]; }

 private:
  std::mutex mutex_;
  std::vector<std::unordered_map<std::string, std::uint32_t>> ids_;
  std::vector<std::vector<std::string>> keys_;
};

/// What one worker learns about one property: its violating corners and the lowest of them.
struct property_acc {
  std::uint64_t violating = 0;
  std::uint64_t first = UINT64_MAX;
  time_fs at = 0;
  std::size_t step = 0;
};

/// What one worker learns about one gauge: the extremes with their corners (a
/// smaller value wins, then a lower corner, so merging is order-free).
struct gauge_acc {
  std::uint64_t corners = 0, samples = 0;
  time_fs min = std::numeric_limits<time_fs>::max(), max = 0;
  std::uint64_t min_at = UINT64_MAX, max_at = UINT64_MAX;
  void add(time_fs lo, std::uint64_t lo_at, time_fs hi, std::uint64_t hi_at) {
    if (lo < min || (lo == min && lo_at < min_at)) min = lo, min_at = lo_at;
    if (max_at == UINT64_MAX || hi > max || (hi == max && hi_at < max_at)) max = hi, max_at = hi_at;
  }
};

/// What one worker learns about one metastable element. The model's shares
/// add up in fixed point, so the sum does not depend on the order of corners.
struct element_acc {
  std::uint64_t resolutions = 0, inside = 0, drawn = 0;
  time_fs longest = 0;
  std::uint64_t longest_at = UINT64_MAX;
  std::vector<std::uint64_t> exceeded, model;  // [budget]
  static constexpr double model_unit = 0x1.0p30;
  void add_longest(time_fs t, std::uint64_t at) {
    if (longest_at == UINT64_MAX || t > longest || (t == longest && at < longest_at))
      longest = t, longest_at = at;
  }
};

/// The `expect resolves` budgets of each metastable element, sorted, distinct.
std::vector<std::vector<time_fs>> element_budgets(const design& d);

/// What one worker learns over all its corners.
struct worker_state {
  std::uint64_t events = 0;
  std::vector<property_acc> properties;  // [property]
  std::vector<gauge_acc> gauges;         // [gauge]
  std::vector<element_acc> elements;     // [netlist::meta]
  std::vector<net_id> reported;
  bool have_reported = false;
  std::vector<std::vector<expect_acc>> expects;                       // [step][expectation]
  std::vector<std::unordered_map<std::string, std::uint32_t>> cache;  // [step] key -> id
  std::exception_ptr error;
  // The lowest-numbered corner whose stimulus could not go on (run_result::error).
  std::uint64_t stim_error_corner = UINT64_MAX;
  std::optional<diagnostic> stim_error;
};

/// Every corner's results, each entry written only by the worker that ran
/// its corner, so no lock guards them.
struct corner_table {
  corner_table(std::uint64_t corners, std::size_t steps, std::size_t gauges)
      : steps(steps),
        gauges(gauges),
        outcome_of(corners * steps),
        settle_of(corners * steps),
        finished(corners, 0),
        gauge_mean_of(corners * gauges, std::nan("")) {}
  std::size_t steps, gauges;
  std::vector<std::uint32_t> outcome_of;  // [corner * steps + step]
  std::vector<time_fs> settle_of;         // [corner * steps + step]
  std::vector<std::uint8_t> finished;     // [corner]: 1 once its results are stored
  std::vector<double> gauge_mean_of;      // [corner * gauges + gauge]: NaN without samples
};

/// What the workers share: the work, where its results go, and the counters.
struct shared_run {
  const design& d;
  const sweep_plan& plan;
  const run_options& opt;
  corner_table& table;
  const std::atomic<bool>& halt;  // stop taking corners, drop the one running
  outcome_registry& registry;
  std::atomic<std::uint64_t>& next;
  std::atomic<std::uint64_t>& done;
};

/// Step k's spec, or null for the one implicit step of a stimulus without steps.
inline const step_spec* spec_of(const design& d, std::size_t step) {
  return step < d.stim.steps.size() ? &d.stim.steps[step] : nullptr;
}

/// An outcome's key (as the workers register it) back into its status,
/// end_of_time, period and values.
void decode_key(const std::string& k, sweep_outcome& o);

/// Threads for a sweep: as asked (0: the hardware's), at most one per corner, at least one.
unsigned pool_size(const sweep_options& opt, const sweep_plan& plan);

/// Runs one worker per entry of `workers` on its own thread. Meanwhile this
/// thread reports progress and raises `halt` (which the workers and their
/// kernels poll) on the caller's stop flag or once the wall-clock budget is
/// spent. Returns why it halted them; none when they ran out of corners.
sweep_stop run_pool(shared_run& shared, std::vector<worker_state>& workers,
                    const sweep_options& opt, std::atomic<bool>& halt,
                    std::chrono::steady_clock::time_point started);

/// What the workers learned besides the corner table: an exception of one is
/// rethrown here; their events add up; the reported nets, and the diagnostic
/// of the lowest-numbered corner whose stimulus could not go on.
void merge_workers(const std::vector<worker_state>& workers, sweep_result& res);

}  // namespace settle::detail
