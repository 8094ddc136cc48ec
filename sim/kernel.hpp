// The discrete-event kernel and the stimulus driver built on it.
#pragma once

#include <atomic>
#include <cstdint>
#include <memory>
#include <span>
#include <string>
#include <vector>

#include "sim/corner.hpp"
#include "sim/design.hpp"

namespace settle {

/// One value change on a net.
struct change {
  time_fs time;
  net_id net;
  logic value;
};

/// Receives the value changes of a run, in time order, in batches.
class change_sink {
 public:
  virtual ~change_sink() = default;
  /// Values of every net before anything happens at time 0.
  virtual void on_start(std::span<const logic> initial) = 0;
  virtual void on_changes(std::span<const change> batch) = 0;
  /// The run ended at `end`.
  virtual void on_finish(time_fs end) = 0;
};

enum class step_status : std::uint8_t {
  settled,      ///< no pending event
  oscillating,  ///< a repeated full state proved periodic behaviour
  timeout,      ///< neither quiet nor a repeat before the horizon
  running,      ///< a `run` step that ended with events still pending
  event_limit,  ///< stopped by --max-events
};
const char* status_name(step_status s);

struct expect_result {
  const expectation* spec = nullptr;
  bool pass = false;
  logic got = logic::x;   ///< value expectations
  std::string detail;     ///< a short human reason when it fails
};

struct step_result {
  std::size_t index = 0;  ///< 1-based
  std::string label;
  time_fs start = 0, end = 0;
  step_status status = step_status::settled;
  time_fs settle = 0;     ///< last value change minus start
  time_fs period = 0;     ///< oscillating only
  /// A timeout because the step could not go on without passing the end of
  /// representable time (sim/time.hpp); `end` is the last instant it could process.
  bool end_of_time = false;
  std::vector<net_id> toggling;          ///< oscillating only
  std::vector<logic> values;             ///< per reported net, at the end
  std::vector<logic> start_values;       ///< per reported net, at the start
  std::vector<std::uint32_t> transitions;///< per reported net, within the step
  std::vector<expect_result> expects;
  bool pass() const;  ///< no finding in this step
};

struct run_options {
  time_fs horizon = 0;          ///< 0: 10,000 x the largest gate max delay
  std::uint64_t max_events = 0; ///< 0: unlimited
  /// When set and true, the run stops at the next instant as if the event
  /// limit were reached (interruption, wall-clock timeout); may be null.
  const std::atomic<bool>* stop = nullptr;
};

struct run_result {
  std::string corner;
  std::vector<net_id> reported;  ///< outputs, then watched nets
  std::vector<step_result> steps;
  std::uint64_t events = 0;      ///< value changes applied
  time_fs end = 0;
  bool pass() const;
};

class simulator;

/// Per-run state that survives between runs of one netlist: a worker keeps
/// one, so a corner costs a delay table and a state reset, nothing else.
class run_context {
 public:
  explicit run_context(const netlist& n);
  ~run_context();
  run_context(const run_context&) = delete;
  run_context& operator=(const run_context&) = delete;
  simulator& sim() { return *sim_; }

 private:
  std::unique_ptr<simulator> sim_;
};

/// Runs the design's stimulus under one delay table. `trace` may be null.
run_result run_stimulus(const design& d, const delay_table& delays, const run_options& opt,
                        change_sink* trace = nullptr);
/// The same, reusing `ctx`'s buffers (ctx must have been made for d.nets).
run_result run_stimulus(run_context& ctx, const design& d, const delay_table& delays, const run_options& opt,
                        change_sink* trace = nullptr);

}  // namespace settle
