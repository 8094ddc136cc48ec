// Repeat detection for a settle step: Brent's cycle detection over its instants.
#pragma once

#include <algorithm>
#include <cstdint>
#include <span>

#include "sim/kernel/run.hpp"
#include "sim/kernel/simulator.hpp"

namespace settle::detail {

/// Finds a settle step whose full state (net values, pending events relative
/// to now, and the driver's own state such as clock phases) repeats: then it
/// oscillates, with the time between the two as its period. Brent's cycle
/// detection (Brent 1980) over the instants after every input of the step is
/// in: one snapshot is kept and replaced at power-of-two distances, and the
/// present state is compared with it first by the kernel's incremental hash,
/// then in full.
///
/// Most steps settle within a few instants, so detection starts only after a
/// warm-up of them: a snapshot (and turning the hash on) costs O(nets) while
/// an instant costs a few events, so the warm-up grows with the design (a
/// quarter of its nets, at least 128) to keep detection a small share of a
/// step that settles; in s38417's clocked runs with random delays it was two
/// thirds of the time at a fixed 128.
///
/// One lives for one step, on the stack of the driver's run_step; a template
/// over the kernel, like the driver, so nothing here is a virtual call.
template <class Sim>
class repeat_detector {
 public:
  explicit repeat_detector(Sim& sim)
      : sim_(sim), warmup_(std::max<std::uint64_t>(128, sim.values().size() / 4)) {}
  repeat_detector(const repeat_detector&) = delete;
  repeat_detector& operator=(const repeat_detector&) = delete;

  /// Warm-up instants left before detection is due, less the one that will
  /// make it due: how many the kernel may run in one batch (0: none).
  std::uint64_t warmup_left() const {
    return instants_ + 1 < warmup_ ? warmup_ - 1 - instants_ : 0;
  }
  /// Counts `n` instants the kernel ran in a batch during the warm-up.
  void count(std::uint64_t n) { instants_ += n; }

  /// Counts one instant; true once the warm-up is over and the present state
  /// is to be compared (the first time, the state hash is turned on).
  bool due() {
    if (++instants_ < warmup_) return false;
    if (instants_ == warmup_) sim_.track_state(true);
    return true;
  }

  /// After the instant at `t`, with the driver's state words `extra`: true
  /// when the full state repeats the snapshot, with r.period and r.toggling
  /// set (the nets whose transition counts moved since) and the values-only
  /// repeat cleared. Otherwise notes in r the first time the net values alone
  /// repeat (r.values_repeat_at, r.values_period), takes a new snapshot when
  /// Brent's schedule says so, and returns false.
  bool repeats(time_fs t, std::span<const std::uint64_t> extra, step_result& r) {
    if (have_snap_ && sim_.hash() == snap_.hash) {
      if (r.values_period == 0 && sim_.values() == snap_.values && !sim_.same_state(snap_, extra)) {
        r.values_repeat_at = t;  // the waveform repeats, its full state not (yet)
        r.values_period = t - snap_.time;
      } else if (sim_.same_state(snap_, extra)) {
        r.values_repeat_at = r.values_period = 0;
        r.period = t - snap_.time;
        for (net_id n = 2; n < snap_.toggles.size(); ++n)
          if (sim_.toggle_count(n) != snap_.toggles[n]) r.toggling.push_back(n);
        return true;
      }
    }
    if (!have_snap_ || ++lambda_ == power_) {
      sim_.snapshot(snap_, extra);
      have_snap_ = true;
      if (lambda_ == power_) power_ *= 2;
      lambda_ = 0;
    }
    return false;
  }

  /// At the end of the step: turns the kernel's state hash off again if
  /// detection turned it on.
  void finish() {
    if (instants_ >= warmup_) sim_.track_state(false);
  }

 private:
  Sim& sim_;
  const std::uint64_t warmup_;
  std::uint64_t instants_ = 0;  // of the step, counted once its inputs are all in
  state_snapshot snap_;
  bool have_snap_ = false;
  std::uint64_t power_ = 1, lambda_ = 0;  // Brent: the snapshot's distance and its bound
};

}  // namespace settle::detail
