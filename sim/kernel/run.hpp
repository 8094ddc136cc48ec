// The discrete-event kernel and the stimulus driver built on it.
#pragma once

#include <atomic>
#include <cstdint>
#include <memory>
#include <optional>
#include <span>
#include <string>
#include <vector>

#include "sim/model/corner.hpp"
#include "sim/model/design.hpp"
#include "sim/model/diagnostic.hpp"

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

/// How a metastable element resolved one event (netlist::meta): a mutex's
/// grant, or what a synchronizing flip-flop took at a clock edge.
struct resolution {
  gate_id gate = 0;   ///< the grant, or the flip-flop's output
  time_fs first = 0;  ///< mutex: its request (or the release letting it through); syncff: the edge
  time_fs at = 0;  ///< when the output resolved: first + D, plus tau x ln(window / gap) inside it
  /// mutex: how long after `first` the other request came (Δ, >= 0); syncff:
  /// how long before the edge D last changed (δ, < 0 after it). Meaningful
  /// when `near`: within reach of the element (a competing request, or a D
  /// change inside the window or at the edge).
  std::int64_t gap = 0;
  bool near = false;
  time_fs delay = 0;       ///< D of this resolution (the time is delay plus tau x ln(...))
  bool drawn = false;      ///< a tie (gap 0): the winner and gap came from the corner's stream
  logic value = logic::x;  ///< the grant (1) or the value captured
  time_fs time() const { return at - first; }
};

enum class step_status : std::uint8_t {
  settled,      ///< no pending event
  oscillating,  ///< a repeated full state proved periodic behaviour
  timeout,      ///< neither quiet nor a repeat before the horizon
  running,      ///< a `run` step that ended with events still pending
  event_limit,  ///< stopped by --max-events
  deadlock,     ///< quiet (no gate event, no pending firing) while a reaction rule is owed
};
const char* status_name(step_status s);

struct expect_result {
  const expectation* spec = nullptr;
  bool pass = false;
  logic got = logic::x;  ///< value expectations
  std::string detail;    ///< a short human reason when it fails
};

/// A `times N` rule that had not fired N times when its step deadlocked.
struct owed_rule {
  std::uint32_t rule = 0;  ///< index in stimulus::rules (its text is there)
  std::uint64_t fired = 0, times = 0;
  logic condition = logic::x;  ///< the condition's value at the end of the step
};

struct step_result {
  std::size_t index = 0;  ///< 1-based
  std::string label;
  time_fs start = 0, end = 0;
  step_status status = step_status::settled;
  time_fs settle = 0;  ///< last value change minus start
  time_fs period = 0;  ///< oscillating only
  /// A timeout because the step could not go on without passing the end of
  /// representable time (sim/model/time.hpp); `end` is the last instant it could process.
  bool end_of_time = false;
  std::vector<net_id> toggling;            ///< oscillating only
  std::vector<logic> values;               ///< per reported net, at the end
  std::vector<logic> start_values;         ///< per reported net, at the start
  std::vector<std::uint32_t> transitions;  ///< per reported net, within the step
  std::vector<expect_result> expects;
  std::vector<owed_rule> owed;  ///< deadlock only
  /// Resolutions of metastable elements decided within the step, in order.
  std::vector<resolution> resolutions;
  /// Reported nets at x at the end of the step that the step does not expect
  /// at x (`expect NET = x`); empty for an oscillating step and under
  /// run_options::allow_x. A finding.
  std::vector<net_id> unknown;
  bool pass() const;         ///< no finding in this step
  std::uint64_t events = 0;  ///< value changes applied within the step
  /// A settle step whose net values at an instant equalled those at an
  /// earlier instant (repeat detection's snapshot) while the full state,
  /// pending events included, did not: the first such instant and the time
  /// between the two. 0 when it never happened (or the step oscillates).
  time_fs values_repeat_at = 0, values_period = 0;
};

/// A whole-run property's verdict: holds, or its first violation.
struct property_result {
  std::uint32_t property = 0;  ///< index in stimulus::properties
  bool holds = true;
  time_fs first_violation = 0;
  std::size_t step = 0;                          ///< 1-based step of the first violation
  std::vector<std::pair<net_id, logic>> values;  ///< the nets involved, at the violation
};

/// A gauge's samples over the run.
struct gauge_result {
  std::uint32_t gauge = 0;  ///< index in stimulus::gauges
  std::uint64_t count = 0;
  time_fs min = 0, max = 0;  ///< 0 when count is 0
  double mean = 0;           ///< fs; 0 when count is 0
};

/// The time limit of a step when run_options::horizon is 0: 10,000 x the
/// largest gate max delay of `n`, at least 1 ns, at most the last instant.
time_fs default_horizon(const netlist& n);

struct run_options {
  time_fs horizon = 0;           ///< 0: default_horizon(the design's nets)
  std::uint64_t max_events = 0;  ///< 0: unlimited
  bool allow_x = false;          ///< --allow-x: a net at x at the end of a step is no finding
  /// When set and true, the run stops at the next instant as if the event
  /// limit were reached (interruption, wall-clock timeout); may be null.
  const std::atomic<bool>* stop = nullptr;
};

struct run_result {
  std::string corner;
  std::vector<net_id> reported;  ///< outputs, then watched nets
  std::vector<step_result> steps;
  std::uint64_t events = 0;  ///< value changes applied
  time_fs end = 0;
  std::vector<property_result> properties;  ///< one per stimulus property, in order
  std::vector<gauge_result> gauges;         ///< one per stimulus gauge, in order
  /// Set when the stimulus cannot go on (an `at` earlier than the time
  /// reached): an error of the input (exit 2), not a finding; the run stops there.
  std::optional<diagnostic> error;
  bool pass() const;  ///< every step passes and every property holds
};

/// The nets of `reported` whose `values` are x, less those `spec` expects
/// at x (`expect NET = x`; spec may be null): what step_result::unknown lists.
std::vector<net_id> unknown_at_end(const step_spec* spec, std::span<const net_id> reported,
                                   std::span<const logic> values);

/// Transitions of reported net `i` in step `s` beyond the one change the step
/// needed (0 or 1). An input's changes are the environment's own (stimulus and
/// reaction rules), each as asked for: they are never glitches unless they
/// pass through x.
std::uint32_t glitches(const netlist& n, const run_result& r, const step_result& s, std::size_t i);

class simulator;

/// Why the timed kernel cannot take `n` ("N gates: the kernel takes at most
/// M"), or nullopt when it can. A run_context requires that it can: check
/// before making one (the command line reports it as an error, exit 2).
std::optional<std::string> kernel_size_error(const netlist& n);

/// Per-run state that survives between runs of one netlist: a worker keeps
/// one, so a corner costs a delay table and a state reset, nothing else.
class run_context {
 public:
  /// Requires !kernel_size_error(n).
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
run_result run_stimulus(run_context& ctx, const design& d, const delay_table& delays,
                        const run_options& opt, change_sink* trace = nullptr);

}  // namespace settle
