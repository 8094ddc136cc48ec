// The timing-wheel event queue against a plain ordered multiset.
#include <algorithm>
#include <catch2/catch.hpp>
#include <map>
#include <random>
#include <utility>

#include "sim/kernel/simulator.hpp"

using namespace settle;

namespace {

// The instant `front` taken at t holds exactly the reference's entries at t
// (in any order); they leave the reference.
void take_from_reference(std::span<const queued_event> front, time_fs t,
                         std::multimap<time_fs, gate_id>& ref) {
  auto [lo, hi] = ref.equal_range(t);
  std::vector<gate_id> want, got;
  for (auto it = lo; it != hi; ++it) want.push_back(it->second);
  for (const auto& e : front) {
    REQUIRE(e.time == t);
    got.push_back(e.gate);
  }
  std::sort(want.begin(), want.end());
  std::sort(got.begin(), got.end());
  REQUIRE(got == want);
  ref.erase(lo, hi);
}

// Pushes 0 to 3 entries at now + d into the queue and the reference: d is
// mostly within the largest delay, zero `zero_percent` % of the time,
// sometimes far beyond the wheel.
void push_some(event_queue& q, std::multimap<time_fs, gate_id>& ref, std::mt19937_64& rng,
               time_fs now, time_fs largest, unsigned zero_percent, gate_id& next) {
  const int pushes = static_cast<int>(rng() % 4);
  for (int k = 0; k < pushes; ++k) {
    const auto r = rng() % 100;
    const time_fs d = r < zero_percent ? 0
                      : r < 90         ? rng() % (largest + 1)
                                       : rng() % (50 * largest + 1000000);
    q.push({now + d, next, 0});
    ref.emplace(now + d, next);
    ++next;
  }
}

// (largest, smallest) delays: wheels of 64 slots (no smallest delay known, or
// slots up to half of it) and of 4096 (a smallest delay of 1 fs).
constexpr std::pair<time_fs, time_fs> wheel_shapes[] = {
    {0, 0}, {1000, 0}, {60000, 0}, {5000000, 0}, {60000, 20000}, {60000, 1}, {5000000, 1}};

}  // namespace

TEST_CASE("the event queue returns instants in time order, like an ordered multiset",
          "[kernel][queue]") {
  for (const auto& [largest, smallest] : wheel_shapes) {
    std::mt19937_64 rng(largest + smallest + 7);
    event_queue q(largest, smallest);
    std::multimap<time_fs, gate_id> ref;
    time_fs now = 0;
    gate_id next = 0;
    for (int round = 0; round < 20000; ++round) {
      // A peek may move the cursor ahead; later pushes may still be earlier
      // (as input changes are), down to the last instant taken.
      if (!ref.empty() && rng() % 3 == 0) REQUIRE(q.min_time() == ref.begin()->first);
      push_some(q, ref, rng, now, largest, 5, next);
      if (ref.empty()) continue;
      REQUIRE_FALSE(q.empty());
      const time_fs t = q.min_time();
      REQUIRE(t == ref.begin()->first);
      take_from_reference(q.take_front(), t, ref);
      REQUIRE(q.size() == ref.size());
      now = t;
    }
  }
}

// The kernel's own path: take_until(last) takes the earliest instant only when
// it is not after `last`, and leaves the queue as it was otherwise. Checked
// against the same ordered multiset (the reference), with zero-delay pushes
// that land on the sorted cursor slot and far pushes beyond the wheel.
TEST_CASE("take_until takes instants in time order and nothing after its bound",
          "[kernel][queue]") {
  for (const auto& [largest, smallest] : wheel_shapes) {
    std::mt19937_64 rng(largest + smallest + 11);
    event_queue q(largest, smallest);
    std::multimap<time_fs, gate_id> ref;
    time_fs now = 0;
    gate_id next = 0;
    std::size_t named = 0;
    for (int round = 0; round < 20000; ++round) {
      push_some(q, ref, rng, now, largest, 10, next);
      // A bound before, at or after the earliest instant.
      const time_fs last = ref.empty()
                               ? now
                               : ref.begin()->first + (rng() % 3 == 0 ? 0 : rng() % (largest + 2)) -
                                     (rng() % 4 == 0 && ref.begin()->first > now ? 1 : 0);
      const auto front = q.take_until(last);
      if (ref.empty() || ref.begin()->first > last) {
        REQUIRE(front.empty());
        REQUIRE(q.size() == ref.size());
        continue;
      }
      const time_fs t = ref.begin()->first;
      take_from_reference(front, t, ref);
      REQUIRE(q.size() == ref.size());
      now = t;
      // The look-ahead names only queued entries, never a taken one: its
      // count of passed entries stays exact across pushes behind it, sorts
      // of the cursor slot and instants of several entries.
      while (q.lead() < 3) {
        const gate_id g = q.next_ahead();
        if (g == no_id) break;
        CHECK(std::any_of(ref.begin(), ref.end(), [&](const auto& e) { return e.second == g; }));
        ++named;
      }
      CHECK(q.lead() <= ref.size());
    }
    // With a largest delay of 0 every push lands on the instant taken next or
    // far beyond the look-ahead's window: nothing to name.
    INFO("largest delay " << largest);
    CHECK((largest == 0 || named > 1000));
  }
}
