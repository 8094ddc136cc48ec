// The event queue: growth, far events, slot ordering and the cursor scan.
#include "sim/kernel/event_queue.hpp"

#include <algorithm>
#include <limits>
#include <memory>

namespace settle {

void event_slot::grow() {
  const std::uint32_t cap = cap_ ? 2 * cap_ : 8;
  auto bigger = std::make_unique<queued_event[]>(cap);
  std::copy(begin(), end(), bigger.get());
  data_ = std::move(bigger);
  cap_ = cap;
}

event_queue::event_queue(time_fs largest_delay, time_fs smallest_delay) {
  // The wheel spans at least twice the largest delay, in the fewest slots
  // (64 to 4096) no wider than half the smallest delay, so a push lands
  // beyond the slot under the cursor and the next (which the look-ahead may
  // have ordered already). Wide slots put a boundary every few dozen entries
  // rather than every one or two.
  unsigned slot_bits = min_slot_bits;
  for (;; ++slot_bits) {
    width_bits_ = 0;
    while ((time_fs{1} << (width_bits_ + slot_bits)) < 2 * largest_delay && width_bits_ < 40)
      ++width_bits_;
    if (slot_bits == max_slot_bits || smallest_delay == 0 ||
        (time_fs{2} << width_bits_) <= smallest_delay)
      break;
  }
  wheel_.resize(std::size_t{1} << slot_bits);
  mask_ = wheel_.size() - 1;
}

void event_queue::clear() {
  for (std::size_t w = 0; w < occupied_.size(); ++w)
    for (auto bits = occupied_[w]; bits; bits &= bits - 1)
      wheel_[w * 64 + __builtin_ctzll(bits)].clear();
  occupied_.fill(0);
  sorted_bits_.fill(0);
  far_.clear();
  base_ = floor_ = 0;
  cur_ = 0;
  pos_ = in_wheel_ = lead_ = 0;
  next_valid_ = false;
}

// Pulls the far events that now fall within the wheel onto it.
void event_queue::migrate() {
  while (!far_.empty() && in_wheel(far_.front().time)) {
    std::pop_heap(far_.begin(), far_.end(), later);
    put(far_.back());
    far_.pop_back();
  }
}

// Moves the entry just appended to ordered slot s (the cursor's from pos_
// on) into its place.
void event_queue::order_last(std::size_t s) {
  auto& v = wheel_[s];
  const queued_event e = v.end()[-1];
  auto* const at = std::upper_bound(
      v.begin() + (s == cur_ ? pos_ : 0), v.end() - 1, e,
      [](const queued_event& a, const queued_event& b) { return a.time < b.time; });
  std::copy_backward(at, v.end() - 1, v.end());
  *at = e;
}

namespace {

// Orders a[0, n) by the low `bits` bits of the time, stably, by Passes
// counting passes of at most 6 bits (LSD radix sort), with tmp as the second
// buffer: one histogram pass for all digits, then a scatter per digit. No
// branch follows the data.
template <unsigned Passes>
void radix_order(queued_event* a, queued_event* tmp, std::size_t n, unsigned bits) {
  const unsigned digit = (bits + Passes - 1) / Passes;
  std::uint32_t count[Passes][65] = {};
  time_fs mask[Passes];
  for (unsigned p = 0; p < Passes; ++p)
    mask[p] = (time_fs{1} << std::min(digit, bits - p * digit)) - 1;
  for (std::size_t i = 0; i < n; ++i) {
    const time_fs t = a[i].time;
    for (unsigned p = 0; p < Passes; ++p) ++count[p][((t >> (p * digit)) & mask[p]) + 1];
  }
  queued_event* src = a;
  queued_event* dst = tmp;
  for (unsigned p = 0; p < Passes; ++p) {
    std::uint32_t* const c = count[p];
    for (std::size_t b = 1; b <= mask[p]; ++b) c[b] += c[b - 1];
    for (std::size_t i = 0; i < n; ++i) dst[c[(src[i].time >> (p * digit)) & mask[p]]++] = src[i];
    std::swap(src, dst);
  }
  if (src != a) std::copy(src, src + n, a);
}

}  // namespace

// Orders slot s (the cursor's from pos_ on) by time. Its entries share the
// time's bits above the slot width, so the bits below order them: a few
// entries by insertion, more by radix passes.
void event_queue::sort_slot(std::size_t s) {
  auto& v = wheel_[s];
  const std::size_t from = s == cur_ ? pos_ : 0;
  sorted_bits_[s / 64] |= std::uint64_t{1} << (s % 64);
  queued_event* const first = v.begin() + from;
  const std::size_t n = v.size() - from;
  if (n <= 12) {
    for (auto i = first + 1; i < v.end(); ++i)
      for (auto j = i; j > first && j->time < (j - 1)->time; --j) std::iter_swap(j, j - 1);
    return;
  }
  if (scratch_.size() < n) scratch_.resize(n);
  switch ((width_bits_ + 5) / 6) {  // passes of at most 6 bits (the width is at most 40)
    case 0:
      return;
    case 1:
      return radix_order<1>(first, scratch_.data(), n, width_bits_);
    case 2:
      return radix_order<2>(first, scratch_.data(), n, width_bits_);
    case 3:
      return radix_order<3>(first, scratch_.data(), n, width_bits_);
    case 4:
      return radix_order<4>(first, scratch_.data(), n, width_bits_);
    case 5:
      return radix_order<5>(first, scratch_.data(), n, width_bits_);
    case 6:
      return radix_order<6>(first, scratch_.data(), n, width_bits_);
    default:
      return radix_order<7>(first, scratch_.data(), n, width_bits_);
  }
}

// The next occupied slot after the cursor's becomes the cursor's (the wheel
// holds an entry).
void event_queue::next_slot() {
  leave_slot(cur_);
  pos_ = 0;
  next_slot_scan();
}

// Moves the cursor to the next occupied slot, found through the bitmap.
void event_queue::next_slot_scan() {
  const std::size_t s = cur_;
  std::size_t step = 1;
  for (;; ++step) {
    const std::size_t k = (s + step) & mask_;
    const std::uint64_t bits = occupied_[k / 64] >> (k % 64);
    if (bits) {
      step += __builtin_ctzll(bits);
      break;
    }
    step += 63 - k % 64;  // skip the rest of this word
  }
  base_ += step << width_bits_;
  cur_ = (s + step) & mask_;
}

// take_until() when the wheel ran dry: moves it to the earliest far event
// and pulls the far events now within its window onto it, unless that event
// lies after `last` (then it is only remembered as the minimum).
bool event_queue::jump_to_far(time_fs last) {
  const time_fs t = far_.front().time;
  if (t > last) {
    next_valid_ = true;
    next_ = t;
    return false;
  }
  leave_slot(cur_);
  move_cursor(t);
  pos_ = 0;
  lead_ = 0;
  floor_ = t;
  migrate();
  return true;
}

time_fs event_queue::find_min() {
  for (;;) {
    auto& cur = wheel_[cursor_slot()];
    if (pos_ < cur.size()) {
      if (!is_sorted(cur_)) sort_slot(cur_);
      next_valid_ = true;
      return next_ = cur[pos_].time;
    }
    // Nothing on the wheel: the earliest far event, without moving (a peek).
    if (in_wheel_ == 0) {
      next_valid_ = true;
      return next_ = far_.front().time;
    }
    next_slot();
  }
}

std::span<const queued_event> event_queue::take_front() {
  return take_until(std::numeric_limits<time_fs>::max());
}

}  // namespace settle
