// The event-driven kernel: per-run state over a shared, immutable netlist.
#pragma once

#include <array>
#include <cstdint>
#include <span>
#include <utility>
#include <vector>

#include "sim/corner.hpp"
#include "sim/kernel.hpp"
#include "sim/netlist.hpp"

namespace settle {

/// A pending gate event. `gen` tells live entries from cancelled ones.
struct queued_event {
  time_fs time;
  gate_id gate;
  std::uint32_t gen;
};

/// The event queue: a timing wheel (Ulrich 1969; Varghese and Lauck 1987)
/// of 4096 slots, each 2^k fs wide with k chosen so the wheel spans at least
/// twice the largest gate delay, plus a binary heap for the rare event beyond
/// the wheel. Insert is O(1); the slot under the cursor is sorted when the
/// cursor reaches it (a handful of entries), and a bitmap of occupied slots
/// finds the next one with a few word scans. Slots are vectors that keep their
/// capacity, so a run in steady state allocates nothing, and the live part of
/// the wheel stays in cache. Times pushed must be >= the last taken instant;
/// min_time() may look ahead, and a later push before that point turns the
/// cursor back.
class event_queue {
 public:
  /// Sizes the slots for delays up to `largest_delay`.
  explicit event_queue(time_fs largest_delay = 0);
  void clear();
  void push(const queued_event& e);
  bool empty() const { return size_ == 0; }
  std::size_t size() const { return size_; }
  /// The earliest time in the queue (the queue must not be empty).
  time_fs min_time();
  /// Moves every entry at min_time() into `out` (cleared first).
  void take_front(std::vector<queued_event>& out);
  /// Calls f on every entry (any order).
  template <class F>
  void for_each(F&& f) const {
    for (std::size_t i = 0; i < slots; ++i) {
      const auto& v = wheel_[i];
      for (std::size_t k = i == cursor_slot() ? pos_ : 0; k < v.size(); ++k) f(v[k]);
    }
    for (const auto& e : far_) f(e);
  }

 private:
  static constexpr std::size_t slot_bits = 12, slots = std::size_t{1} << slot_bits;
  std::size_t cursor_slot() const { return static_cast<std::size_t>((base_ >> width_bits_) & (slots - 1)); }
  bool in_wheel(time_fs t) const { return (t >> width_bits_) - (floor_ >> width_bits_) < slots; }
  void put(const queued_event& e);
  void migrate();

  std::vector<std::vector<queued_event>> wheel_;
  std::array<std::uint64_t, slots / 64> occupied_{};
  std::vector<queued_event> far_;  // a min-heap on time
  unsigned width_bits_ = 0;
  time_fs base_ = 0;               // start of the slot under the cursor
  time_fs floor_ = 0;              // the last instant taken: no push is earlier
  std::size_t pos_ = 0;            // next entry of the (sorted) cursor slot
  std::size_t size_ = 0, in_wheel_ = 0;
  bool sorted_ = false;
};

/// The state needed to recognise a repeated full state: net values and the
/// pending events relative to now (plus whatever the driver adds).
struct state_snapshot {
  time_fs time = 0;
  std::uint64_t hash = 0;
  std::vector<logic> values;
  std::vector<std::pair<std::uint64_t, std::uint64_t>> pending;  ///< (relative time, gate<<2|value), sorted
  std::vector<std::uint64_t> extra;    ///< driver state (clocks)
  std::vector<std::uint32_t> toggles;  ///< per-net transition counts at the snapshot
};

class simulator {
 public:
  explicit simulator(const netlist& n);

  /// Starts a run with `delays`: init values, nothing pending, time 0, and
  /// every gate due for evaluation at the first instant.
  void reset(const delay_table& delays);
  /// Value changes go to `sink` (may be null) in batches.
  void set_trace(change_sink* sink) { sink_ = sink; }

  /// The time of the next live gate event; UINT64_MAX when none.
  time_fs next_event_time();
  /// Processes the instant t (>= now): applies `inputs` and every gate event
  /// due at t together, then evaluates the gates they feed and schedules.
  void process_instant(time_fs t, std::span<const assignment> inputs);
  /// True when no gate event is pending and no first evaluation is owed.
  bool quiet() const { return live_ == 0 && !eval_all_; }

  time_fs now() const { return now_; }
  time_fs last_change() const { return last_change_; }
  std::uint64_t events() const { return events_; }
  const std::vector<logic>& values() const { return val_; }
  const std::vector<std::uint32_t>& toggles() const { return toggles_; }
  std::uint64_t hash() const { return hash_; }

  void snapshot(state_snapshot& s, std::span<const std::uint64_t> extra) const;
  /// True when the present state equals `s` (values, pending relative to now, extra).
  bool same_state(const state_snapshot& s, std::span<const std::uint64_t> extra) const;

  /// Sends buffered changes to the sink and tells it the run ended at `end`.
  void finish(time_fs end);

 private:
  static constexpr logic none = static_cast<logic>(3);

  void build_fast_paths();
  logic eval_fast(gate_id g);
  void schedule(gate_id g, logic v, time_fs t);
  void apply(net_id net, logic v, time_fs t);
  void evaluate(gate_id g, time_fs t);
  time_fs delay_of(gate_id g, logic from, logic to) const;
  void gather_pending(std::vector<std::pair<std::uint64_t, std::uint64_t>>& out) const;
  void flush_trace();

  const netlist& n_;
  const delay_table* delays_ = nullptr;
  change_sink* sink_ = nullptr;

  std::vector<logic> val_;
  std::vector<std::uint32_t> toggles_;
  std::vector<logic> pend_val_;       // inertial gates: pending value or none
  std::vector<std::uint32_t> gen_;    // inertial gates: generation of the live entry
  std::vector<std::uint32_t> slot_;   // transport gates: index into tq_, else no_id

  struct transport_event {
    time_fs time;
    logic value;
    std::uint32_t id;
  };
  std::vector<std::vector<transport_event>> tq_;
  std::uint32_t next_id_ = 0;

  event_queue queue_;
  std::vector<queued_event> front_;

  // Per-gate evaluation shortcut: inputs and output inline, table row by kind.
  struct gate_fast {
    enum : std::uint8_t { general, one, two, c2, edge };
    net_id in0 = 0, in1 = 0, out = 0;
    std::uint8_t mode = general, kind = 0;
  };
  std::vector<gate_fast> fast_;
  std::vector<logic> clock_seen_;  // flip-flop primitives: CK at their last evaluation
  struct {
    logic one[gate_kind_count][3];
    logic two[gate_kind_count][9];
    logic c2[27];  // (a, b, present)
  } tables_{};
  std::vector<gate_id> dirty_;
  std::vector<std::uint32_t> mark_;
  std::uint32_t stamp_ = 0;
  std::vector<change> trace_;

  time_fs now_ = 0, last_change_ = 0;
  std::uint64_t events_ = 0, hash_ = 0;
  std::size_t live_ = 0;
  bool eval_all_ = true;
};

}  // namespace settle
