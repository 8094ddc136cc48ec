// The timing-wheel event queue against a plain ordered multiset.
#include <catch2/catch.hpp>

#include <map>
#include <random>

#include "sim/simulator.hpp"

using namespace settle;

TEST_CASE("the event queue returns instants in time order, like an ordered multiset", "[kernel][queue]") {
  for (time_fs largest : {time_fs{0}, time_fs{1000}, time_fs{60000}, time_fs{5000000}}) {
    std::mt19937_64 rng(largest + 7);
    event_queue q(largest);
    std::multimap<time_fs, gate_id> ref;
    time_fs now = 0;
    gate_id next = 0;
    for (int round = 0; round < 20000; ++round) {
      // A peek may move the cursor ahead; later pushes may still be earlier
      // (as input changes are), down to the last instant taken.
      if (!ref.empty() && rng() % 3 == 0) REQUIRE(q.min_time() == ref.begin()->first);
      const int pushes = static_cast<int>(rng() % 4);
      for (int k = 0; k < pushes; ++k) {
        // Mostly within the largest delay, sometimes zero, sometimes far beyond.
        const auto r = rng() % 100;
        const time_fs d = r < 5 ? 0 : r < 90 ? rng() % (largest + 1) : rng() % (50 * largest + 1000000);
        q.push({now + d, next, 0});
        ref.emplace(now + d, next);
        ++next;
      }
      if (ref.empty()) continue;
      REQUIRE_FALSE(q.empty());
      const time_fs t = q.min_time();
      REQUIRE(t == ref.begin()->first);
      const auto front = q.take_front();
      auto [lo, hi] = ref.equal_range(t);
      std::vector<gate_id> want, got;
      for (auto it = lo; it != hi; ++it) want.push_back(it->second);
      for (auto& e : front) {
        REQUIRE(e.time == t);
        got.push_back(e.gate);
      }
      std::sort(want.begin(), want.end());
      std::sort(got.begin(), got.end());
      REQUIRE(got == want);
      ref.erase(lo, hi);
      REQUIRE(q.size() == ref.size());
      now = t;
    }
  }
}

// The kernel's own path: take_until(last) takes the earliest instant only when
// it is not after `last`, and leaves the queue as it was otherwise. Checked
// against the same ordered multiset (the reference), with zero-delay pushes
// that land on the sorted cursor slot and far pushes beyond the wheel.
TEST_CASE("take_until takes instants in time order and nothing after its bound", "[kernel][queue]") {
  for (time_fs largest : {time_fs{0}, time_fs{1000}, time_fs{60000}, time_fs{5000000}}) {
    std::mt19937_64 rng(largest + 11);
    event_queue q(largest);
    std::multimap<time_fs, gate_id> ref;
    time_fs now = 0;
    gate_id next = 0;
    for (int round = 0; round < 20000; ++round) {
      const int pushes = static_cast<int>(rng() % 4);
      for (int k = 0; k < pushes; ++k) {
        const auto r = rng() % 100;
        const time_fs d = r < 10 ? 0 : r < 90 ? rng() % (largest + 1) : rng() % (50 * largest + 1000000);
        q.push({now + d, next, 0});
        ref.emplace(now + d, next);
        ++next;
      }
      // A bound before, at or after the earliest instant.
      const time_fs last = ref.empty() ? now : ref.begin()->first + (rng() % 3 == 0 ? 0 : rng() % (largest + 2)) -
                                                  (rng() % 4 == 0 && ref.begin()->first > now ? 1 : 0);
      const auto front = q.take_until(last);
      if (ref.empty() || ref.begin()->first > last) {
        REQUIRE(front.empty());
        REQUIRE(q.size() == ref.size());
        continue;
      }
      const time_fs t = ref.begin()->first;
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
      REQUIRE(q.size() == ref.size());
      now = t;
    }
  }
}
