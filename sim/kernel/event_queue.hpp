// The event queue: a timing wheel of sorted slots over a heap of far events.
#pragma once

#include <algorithm>
#include <cstdint>
#include <memory>
#include <span>
#include <vector>

#include "sim/model/netlist.hpp"

namespace settle {

/// A pending gate event. `gen` tells live entries from cancelled ones.
struct queued_event {
  time_fs time;
  gate_id gate;
  std::uint32_t gen;
};

/// A slot of the event queue's wheel: a growable array of entries whose
/// append inlines into the per-event path (std::vector's push_back stays a
/// call there); it keeps its capacity when cleared, and always has room for
/// one more entry, so an append may write first and count after.
class event_slot {
 public:
  event_slot() { grow(); }
  std::size_t size() const { return size_; }
  bool empty() const { return size_ == 0; }
  queued_event* begin() { return data_.get(); }
  queued_event* end() { return data_.get() + size_; }
  const queued_event* begin() const { return data_.get(); }
  const queued_event* end() const { return data_.get() + size_; }
  const queued_event* data() const { return data_.get(); }
  queued_event& operator[](std::size_t i) { return data_[i]; }
  const queued_event& operator[](std::size_t i) const { return data_[i]; }
  const queued_event& front() const { return data_[0]; }
  void clear() { size_ = 0; }
  [[gnu::always_inline]] void push_back(const queued_event& e) { push_back_if(true, e); }
  /// Appends e when `keep`, with no branch on it: e is written past the end
  /// in any case and counted only when kept.
  [[gnu::always_inline]] void push_back_if(bool keep, const queued_event& e) {
    // Field by field: a copy of the whole entry would be assembled on the
    // stack and read back at once, which stalls the store forwarding.
    queued_event& d = data_[size_];
    d.time = e.time, d.gate = e.gate, d.gen = e.gen;
    size_ += keep;
    if (size_ == cap_) [[unlikely]]
      grow();
  }

 private:
  void grow();
  std::unique_ptr<queued_event[]> data_;
  std::uint32_t size_ = 0, cap_ = 0;
};

/// The event queue: a timing wheel (Ulrich 1969; Varghese and Lauck 1987)
/// of 64 to 4096 slots, each 2^k fs wide, so that the wheel spans at least
/// twice the largest gate delay and, where 4096 slots allow, a slot is no
/// wider than half the smallest; plus a binary heap for the rare event beyond
/// the wheel. Insert is O(1) (an append). A slot is put in time order once,
/// when the cursor or the look-ahead first reaches it: by insertion for a few
/// entries, else by radix passes over the time's bits below the slot width,
/// which take no branch that follows the data; a push into an ordered slot
/// inserts in order. With few, wide slots the cursors cross a slot boundary
/// once every few dozen entries, not every one or two. A bitmap of occupied
/// slots finds the next one with a few word scans. Slots are arrays that keep
/// their capacity, so a run in steady state allocates nothing. Times pushed
/// must be >= the last taken instant; min_time() may look ahead, and a later
/// push before that point turns the cursor back.
class event_queue {
 public:
  /// Sizes the wheel for delays up to `largest_delay` and, where it can, its
  /// slots for delays from `smallest_delay` (0: unknown).
  explicit event_queue(time_fs largest_delay = 0, time_fs smallest_delay = 0);
  void clear();
  void push(const queued_event& e);
  /// push() right after a take, of an entry less than reach() after the
  /// instant taken: the queue's order needs no check then (the entry lies
  /// within the wheel's window, at or after the cursor, and after the
  /// minimum, which the take forgot).
  void push_after_take(const queued_event& e) { push_after_take_if(true, e); }
  /// push_after_take() when `keep`, with no branch on it.
  void push_after_take_if(bool keep, const queued_event& e) { put_if(keep, e); }
  /// push_after_take() takes delays shorter than this: a turn of the wheel
  /// less one slot.
  time_fs reach() const { return static_cast<time_fs>(mask_) << width_bits_; }
  bool empty() const { return in_wheel_ == 0 && far_.empty(); }
  std::size_t size() const { return in_wheel_ + far_.size(); }
  /// The earliest time in the queue (the queue must not be empty). Cached
  /// until the next take_front() or an earlier push.
  time_fs min_time() { return next_valid_ ? next_ : find_min(); }
  /// Removes every entry at min_time() and returns them; the span stays
  /// valid until the next push() or clear().
  std::span<const queued_event> take_front();
  /// take_front() when min_time() <= last, else an empty span (and nothing
  /// taken). Inline while the instant lies on the ordered cursor slot: the
  /// common case costs a few loads and compares.
  std::span<const queued_event> take_until(time_fs last);
  /// The look-ahead, for prefetches: a second cursor that walks the entries
  /// after the ones taken, in the order they will be taken, one per call.
  /// It puts each slot it reaches in order first. Returns the gate of the
  /// next entry it passes, or no_id when none lies within half the wheel
  /// after the cursor. lead() counts the entries it
  /// passed less the entries taken since; when that reaches 0 it starts again
  /// at the cursor. An entry pushed behind it (a delay shorter than the
  /// look-ahead's reach) is taken without having been passed, so lead() may
  /// fall short of the true distance, never exceed it: the look-ahead never
  /// names a taken entry.
  gate_id next_ahead() {
    if (lead_ == 0) {  // nothing passed: start at the cursor
      la_slot_ = cur_, la_pos_ = pos_;
      if (!is_sorted(cur_) && pos_ < wheel_[cur_].size()) [[unlikely]]
        sort_slot(cur_);
    }
    for (;;) {
      const auto& v = wheel_[la_slot_];
      if (la_pos_ < v.size()) {
        ++lead_;
        return v[la_pos_++].gate;
      }
      // The next occupied slot within the window.
      std::size_t d = ((la_slot_ - cur_) & mask_) + 1;
      const std::size_t k = (la_slot_ + 1) & mask_;
      std::uint64_t bits = occupied_[k / 64] >> (k % 64);
      while (!bits) {
        d += 64 - ((cur_ + d) & 63);
        if (d > mask_ / 2) return no_id;
        bits = occupied_[((cur_ + d) & mask_) / 64];
      }
      d += static_cast<std::size_t>(__builtin_ctzll(bits));
      if (d > mask_ / 2) return no_id;
      la_slot_ = (cur_ + d) & mask_;
      la_pos_ = 0;
      // Ordered now, so the look-ahead walks it in taken order.
      if (!is_sorted(la_slot_)) sort_slot(la_slot_);
    }
  }
  std::size_t lead() const { return lead_; }
  /// Calls f on every entry (any order).
  template <class F>
  void for_each(F&& f) const {
    for (std::size_t i = 0; i < wheel_.size(); ++i) {
      const auto& v = wheel_[i];
      for (std::size_t k = i == cursor_slot() ? pos_ : 0; k < v.size(); ++k) f(v[k]);
    }
    for (const auto& e : far_) f(e);
  }

 private:
  static constexpr unsigned min_slot_bits = 6, max_slot_bits = 12;
  // The far heap's order: a min-heap on time.
  static bool later(const queued_event& a, const queued_event& b) { return a.time > b.time; }
  std::size_t cursor_slot() const { return cur_; }
  std::size_t slot_of(time_fs t) const {
    return static_cast<std::size_t>((t >> width_bits_) & mask_);
  }
  void move_cursor(time_fs t) { base_ = (t >> width_bits_) << width_bits_, cur_ = slot_of(t); }
  bool in_wheel(time_fs t) const { return (t >> width_bits_) - (floor_ >> width_bits_) <= mask_; }
  void put(const queued_event& e) { put_if(true, e); }
  void put_if(bool keep, const queued_event& e);
  void order_last(std::size_t s);
  void migrate();
  time_fs find_min();
  bool is_sorted(std::size_t s) const { return (sorted_bits_[s / 64] >> (s % 64)) & 1; }
  void sort_slot(std::size_t s);
  void leave_slot(std::size_t s) {
    wheel_[s].clear();
    occupied_[s / 64] &= ~(std::uint64_t{1} << (s % 64));
    sorted_bits_[s / 64] &= ~(std::uint64_t{1} << (s % 64));
  }
  void next_slot();
  void next_slot_scan();
  bool jump_to_far(time_fs last);

  std::vector<event_slot> wheel_;
  // Slots holding entries, and slots in time order (the first wheel_.size() bits).
  std::array<std::uint64_t, (std::size_t{1} << max_slot_bits) / 64> occupied_{}, sorted_bits_{};
  std::vector<queued_event> scratch_;  // sort_slot's radix passes
  std::vector<queued_event> far_;      // a min-heap on time
  unsigned width_bits_ = 0;
  time_fs base_ = 0;                      // start of the slot under the cursor
  std::size_t cur_ = 0;                   // the slot under the cursor: slot_of(base_)
  time_fs floor_ = 0;                     // the last instant taken: no push is earlier
  std::size_t pos_ = 0;                   // next entry of the (sorted) cursor slot
  std::size_t in_wheel_ = 0;              // entries on the wheel (the rest are in far_)
  time_fs next_ = 0;                      // min_time() while next_valid_
  std::size_t mask_ = 0;                  // the slot count less one
  std::size_t la_slot_ = 0, la_pos_ = 0;  // the look-ahead's next entry (while lead_ > 0)
  std::size_t lead_ = 0;                  // entries it passed less those taken since
  bool next_valid_ = false;
};

// The queue's insert is on the per-event path: defined here so it inlines.
[[gnu::always_inline]] inline void event_queue::put_if(bool keep, const queued_event& e) {
  const auto slot = slot_of(e.time);
  wheel_[slot].push_back_if(keep, e);
  occupied_[slot / 64] |= std::uint64_t{keep} << (slot % 64);
  in_wheel_ += keep;
  // One branch on both (rarely taken; & evaluates both): a branch on keep
  // would follow the data.
  if (keep & is_sorted(slot)) [[unlikely]]
    order_last(slot);
}

[[gnu::always_inline]] inline void event_queue::push(const queued_event& e) {
  if (next_valid_ && e.time < next_) next_valid_ = false;
  if (!in_wheel(e.time)) {
    far_.push_back(e);
    std::push_heap(far_.begin(), far_.end(), later);
    return;
  }
  if (e.time < base_) {
    // The cursor looked ahead over empty slots and an earlier instant (an
    // input change) scheduled before it. Every wheel entry lies within the
    // window of floor_, so turning the cursor back keeps the circular order.
    move_cursor(e.time);
    pos_ = 0;
    lead_ = 0;
  }
  put(e);
}

// The per-instant path of run_quiet: inline, and in the common case (the next
// instant on the cursor slot, or on an occupied slot within the same bitmap
// word) a few dozen instructions with no call.
[[gnu::always_inline]] inline std::span<const queued_event> event_queue::take_until(time_fs last) {
  for (;;) {
    auto& v = wheel_[cur_];
    const std::size_t n = v.size();
    if (pos_ < n) {
      if (!is_sorted(cur_)) [[unlikely]]
        sort_slot(cur_);
      const time_fs t = v[pos_].time;
      if (t > last) {
        next_valid_ = true;
        next_ = t;
        return {};
      }
      // Far events now within the wheel's window lie beyond t's slot, so they
      // never land on the cursor's.
      const time_fs before = floor_;
      floor_ = t;
      if (!far_.empty() && (t >> width_bits_) != (before >> width_bits_)) [[unlikely]]
        migrate();
      const std::size_t from = pos_;
      std::size_t end = from + 1;
      while (end < n && v[end].time == t) ++end;
      pos_ = end;
      in_wheel_ -= end - from;
      lead_ = lead_ > end - from ? lead_ - (end - from) : 0;
      next_valid_ = false;
      return {v.data() + from, end - from};
    }
    if (in_wheel_ == 0) [[unlikely]] {
      if (far_.empty() || !jump_to_far(last)) return {};
      continue;
    }
    // The cursor slot is used up: on to the next occupied one.
    leave_slot(cur_);
    pos_ = 0;
    const std::size_t k = (cur_ + 1) & mask_;
    if (const std::uint64_t bits = occupied_[k / 64] >> (k % 64); bits) [[likely]] {
      const std::size_t step = 1 + static_cast<std::size_t>(__builtin_ctzll(bits));
      base_ += step << width_bits_;
      cur_ = (cur_ + step) & mask_;
    } else {
      next_slot_scan();
    }
  }
}

}  // namespace settle
