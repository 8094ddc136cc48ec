// The event-driven kernel: per-run state over a shared, immutable netlist.
#pragma once

#include <algorithm>
#include <array>
#include <cstdint>
#include <limits>
#include <memory>
#include <span>
#include <utility>
#include <vector>

#include "sim/kernel/event_queue.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "sim/model/netlist.hpp"

namespace settle {

/// The state needed to recognise a repeated full state: net values and the
/// pending events relative to now (plus whatever the driver adds).
struct state_snapshot {
  time_fs time = 0;
  std::uint64_t hash = 0;
  std::vector<logic> values;
  std::vector<std::pair<std::uint64_t, std::uint64_t>>
      pending;                         ///< (relative time, gate<<2|value), sorted
  std::vector<std::uint64_t> extra;    ///< driver state (clocks)
  std::vector<std::uint32_t> toggles;  ///< per-net transition counts at the snapshot
};

class simulator {
 public:
  /// Requires n.gate_count() <= gate_limit() (see kernel_size_error in run.hpp).
  explicit simulator(const netlist& n);
  /// The most gates the kernel takes: a fan-out entry holds a gate's number in 30 bits.
  static constexpr std::size_t gate_limit();

  /// Starts a run with `delays`: init values, nothing pending, time 0, and
  /// every gate due for evaluation at the first instant.
  void reset(const delay_table& delays);
  /// Value changes go to `sink` (may be null) in batches.
  void set_trace(change_sink* sink) {
    sink_ = sink;
    set_watchers();
  }

  /// The time of the next live gate event; UINT64_MAX when none.
  time_fs next_event_time();
  /// Processes the instant t (>= now): applies `inputs` and every gate event
  /// due at t together, then evaluates the gates they feed and schedules.
  void process_instant(time_fs t, std::span<const assignment> inputs);
  /// True when no gate event is pending and no first evaluation is owed.
  bool quiet() const { return live_ == 0 && !eval_all_; }
  /// Processes instants without input changes while the next event is at or
  /// before `last`: at most `max_instants` of them (0: no limit), and none
  /// after events() reaches `max_events` (0: no limit). Returns how many.
  std::uint64_t run_quiet(time_fs last, std::uint64_t max_instants, std::uint64_t max_events);

  time_fs now() const { return now_; }
  time_fs last_change() const { return last_change_; }
  /// The longest rise or fall delay of the delay table given to reset().
  time_fs largest_delay() const { return largest_delay_; }
  std::uint64_t events() const { return events_; }
  const std::vector<logic>& values() const { return val_; }
  /// Transitions of `net` since reset().
  std::uint32_t toggle_count(net_id net) const {
    const gate_id g = n_.driver[net];
    return toggles_[net] + (g != no_id ? gate_[g].toggles : 0);
  }
  /// The state hash, kept only while tracking (repeat detection is on): the
  /// per-event path skips it otherwise. Turning tracking on computes it afresh.
  void track_state(bool on);
  std::uint64_t hash() const { return hash_; }

  void snapshot(state_snapshot& s, std::span<const std::uint64_t> extra) const;
  /// True when the present state equals `s` (values, pending relative to now, extra).
  bool same_state(const state_snapshot& s, std::span<const std::uint64_t> extra) const;

  /// Sends buffered changes to the sink and tells it the run ended at `end`.
  void finish(time_fs end);

  /// The resolutions of metastable elements since reset(), in the order they
  /// were decided (a mutex's when its grant rose).
  const std::vector<resolution>& resolutions() const { return resolutions_; }
  /// How many of resolutions() are final: a synchronizing flip-flop's entry
  /// may still be revised by a D change within half its window after the edge.
  std::size_t final_resolutions() const;
  /// Forgets the first k resolutions (k <= final_resolutions()), so that a
  /// long run can count them as it goes and keep memory flat.
  void drop_resolutions(std::size_t k);

 private:
  static constexpr logic none = static_cast<logic>(3);

  void build_fast_paths();
  logic eval_fast(gate_id g, logic present);
  // Plain: within run_quiet's loop, with neither trace nor state hash, and
  // every delay within the queue's reach (see run_loop).
  template <bool Plain>
  void schedule(gate_id g, logic v, time_fs t);
  template <bool Plain = false>
  void evaluate(gate_id g, time_fs t);
  template <bool Plain = false>
  void change_value(net_id net, logic v, time_fs t);
  template <bool Plain>
  std::uint64_t run_loop(time_fs last, std::uint64_t n, std::uint64_t instant_cap,
                         std::uint64_t event_cap);
  struct gate_rec;
  // A fan-out entry: the gate reading a net, shifted left by two, and which
  // of its first two inputs the net is (bit 0: the first, bit 1: the second).
  using fan_entry = std::uint32_t;
  static constexpr gate_id reader(fan_entry e) { return e >> 2; }
  void pass_value(fan_entry e, logic v);
  template <bool Plain = false>
  std::span<const fan_entry> change_output(gate_id g, gate_rec& r, logic v, time_fs t);
  void mark(std::span<const fan_entry> fan, logic v);
  void apply_input(net_id net, logic v, time_fs t);
  void apply_output(gate_id g, gate_rec& r, logic v, time_fs t);
  void apply_front(std::span<const queued_event> front, time_fs t);
  void prefetch_ahead();
  template <bool Plain>
  time_fs delay_of(gate_id g, logic from, logic to) const;
  time_fs arc_delay_of(gate_id g, logic from, logic to) const;
  void gather_pending(std::vector<std::pair<std::uint64_t, std::uint64_t>>& out) const;
  void flush_trace();

  const netlist& n_;
  change_sink* sink_ = nullptr;

  std::vector<logic> val_;
  std::vector<std::uint32_t> toggles_;

  // What the per-event path needs of a gate, in one 32-byte record: the
  // present values of its inputs and output (copies of val_, which every
  // change of a net writes into the records of the gates it feeds), its
  // evaluation (a table row or another method), this run's delays, where its
  // output's fan-out starts in fo_ and how long it is, the inertial gate's
  // pending value and the generation of its live entry, and its output's
  // transition count. So an event reads its own record, its fan-out list and
  // the records of the gates it feeds, and nothing else at random. A gate of
  // one or two inputs, or a two-input C-element, evaluates by one lookup: row
  // `op` of lut_, at 9 x v0 + 3 x v1 + vout (a one-input gate reads its input
  // as its second too; only the C-element's rows depend on vout).
  struct alignas(32) gate_rec {                         // aligned: none straddles two cache lines
    enum : std::uint8_t { general = 254, edge = 255 };  // else: a row of lut_
    static constexpr std::uint8_t many = 255;           // fan-out count in fo_start_
    net_id out = 0;
    std::uint32_t gen = 0;  // inertial: generation of the live queue entry
    std::uint32_t delay[2] =
        {};                     // this run's rise and fall delays when they fit 32 bits (see wide_)
    std::uint32_t fo = 0;       // fo_start_[gate]
    std::uint32_t toggles = 0;  // transitions of out since reset (toggle_count)
    std::uint8_t op = general;
    std::uint8_t nfo = 0;  // fan-out count, or `many`
    bool transport = false;
    logic pend = none;  // inertial: the pending value, or none
    logic v0 = logic::x, v1 = logic::x, vout = logic::x;
    std::uint8_t shorter = 0;  // the index in delay of the shorter; arc_bit: the gate has arcs
  };
  static constexpr std::uint8_t arc_bit = 2;  // in gate_rec::shorter, read only off the table paths
  static_assert(sizeof(gate_rec) == 32);
  // The first two inputs of each gate (a one-input gate's input twice).
  struct input_pair {
    net_id in0, in1;
  };
  std::vector<input_pair> ins_;
  std::span<const fan_entry> fanout_of(gate_id g, const gate_rec& r) const;
  std::vector<gate_rec> gate_;
  // The fan-out of each gate's output, in gate order (neighbouring gates'
  // lists share cache lines), and of each net, in net order (for inputs).
  std::vector<fan_entry> fo_, net_fo_;
  std::vector<std::uint32_t> fo_start_;
  std::vector<std::uint8_t> queued_;  // in dirty_ for evaluation this instant
  struct edge_delays {
    time_fs rise, fall;
  };
  // A delay of 2^32 fs (4.3 us) or more anywhere puts every delay here instead.
  std::vector<edge_delays> wide_delay_;
  bool wide_ = false;
  bool within_reach_ = false;
  time_fs largest_delay_ =
      0;  // of this run's delay table  // every delay of this run shorter than queue_.reach()
  std::vector<logic> clock_seen_;    // flip-flop primitives: CK at their last evaluation
  std::vector<std::uint32_t> slot_;  // transport gates: index into tq_, else no_id

  struct transport_event {
    time_fs time;
    logic value;
    std::uint32_t id;
  };
  std::vector<std::vector<transport_event>> tq_;
  std::uint32_t next_id_ = 0;

  event_queue queue_;
  std::vector<queued_event> repush_;  // transport gates' next transactions, queued after the front

  // Rows: the two-input form of each kind, then the one-input form, then the
  // two-input C-element.
  static constexpr int lut_rows = 2 * gate_kind_count + 1;
  std::array<logic, lut_rows * 27> lut_{};
  // What an inertial gate of a lut_ row does when evaluated, by selects (see
  // plan_of): at row << 8 | v0 << 6 | v1 << 4 | vout << 2 | pend.
  std::array<std::uint8_t, lut_rows * 256> step_{};
  static std::uint8_t plan_of(logic present, logic pend, logic v);
  void take_step(gate_id g, gate_rec& r, unsigned step, time_fs t);
  std::vector<gate_id> dirty_;
  std::vector<change> trace_;

  time_fs now_ = 0, last_change_ = 0;
  std::uint64_t events_ = 0, hash_ = 0;
  std::size_t live_ = 0;
  bool eval_all_ = true, tracking_ = false;
  static constexpr std::size_t prefetch_above = std::size_t{1} << 20;  // bytes of gate records
  bool prefetch_ = true;
  // Entries looked ahead: 6 against 3 gave 1.02x at 10^5 gates and 1.23x at
  // 10^6 (8 no better), once an event took fewer cycles.
  static constexpr std::size_t prefetch_depth = 6;
  gate_id near_ = 0, mid_ = 0, far_ = 0;  // the last three the look-ahead passed, oldest first
  // Pin-to-pin delays: when the netlist has arcs, every net's last change
  // time (kept off the plain path, which such a design never takes) and this
  // run's delay of each arc.
  bool arcs_ = false;
  // Whether a change must be hashed, timed for arcs or traced (change_value).
  bool watched_ = false;
  void set_watchers() { watched_ = tracking_ || arcs_ || meta_ || sink_; }
  std::vector<time_fs> changed_at_, arc_rise_, arc_fall_;
  time_fs stamp(net_id net) const {  // the last change of net; 0 when it never changed
    const time_fs t = changed_at_[net];
    return t == std::numeric_limits<time_fs>::max() ? 0 : t;
  }

  // Metastable elements (netlist::meta, the model of meta_element): changes
  // are timed as for arcs; per gate what evaluate_meta decided last.
  bool meta_ = false;
  bool stamped_ = false;                   // arcs_ || meta_: changes are timed (changed_at_)
  void note_grant(net_id net, time_fs t);  // a mutex grant about to rise: its resolution
  struct meta_gate {
    time_fs due = 0;                    // the absolute time of the pending change
    resolution why;                     // mutex: how the pending grant was decided
    time_fs edge = 0;                   // syncff: the last rising edge of CK
    std::uint32_t logged = 0;           // syncff: index in resolutions_ of that edge's entry, + 1
    logic d_seen = logic::x;            // syncff: D at the last evaluation
    logic d_before_instant = logic::x;  // syncff: D before the instant `instant`
    time_fs instant = std::numeric_limits<time_fs>::max();
    bool revisable = false;  // syncff: a D change just after the edge may still count
  };
  std::vector<meta_gate> meta_gate_;
  std::vector<time_fs> meta_tau_, meta_window_;
  std::uint64_t run_key_ = 0;
  std::vector<resolution> resolutions_;
  void evaluate_meta(gate_id g, time_fs t);
  time_fs edge_delay(gate_id g, logic from, logic to) const;  // delay_of, out of line
  logic decide_mutex(gate_id g, time_fs t, time_fs& due, resolution& why);
  logic decide_syncff(gate_id g, time_fs t, time_fs& due);
  time_fs resolve_extra(std::uint32_t element, double half_or_window, double gap) const;
  bool draw_bit(std::uint32_t element, time_fs t, double& unit) const;
};

constexpr std::size_t simulator::gate_limit() { return reader(~fan_entry{0}); }

}  // namespace settle
