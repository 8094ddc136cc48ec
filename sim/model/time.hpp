// Checked and saturating femtosecond arithmetic, and a "never" no sum can reach.
#pragma once

#include <cstdint>
#include <limits>
#include <optional>
#include <string>

#include "sim/model/logic.hpp"

namespace settle {

/// No time at all: "nothing pending", "no next edge". No sum below returns it.
inline constexpr time_fs time_never = std::numeric_limits<time_fs>::max();
/// The last representable instant, 2^64 - 2 fs (about 18,447 s): every sum
/// is clamped to it or refused beyond it, so it never wraps into the past.
inline constexpr time_fs time_last = time_never - 1;

/// a + b when the true sum is at most time_last; nullopt when it passes it.
constexpr std::optional<time_fs> checked_add(time_fs a, time_fs b) {
  if (a > time_last || b > time_last - a) return std::nullopt;
  return a + b;
}

/// a + b, or time_last when the true sum passes it.
constexpr time_fs saturating_add(time_fs a, time_fs b) {
  const auto s = checked_add(a, b);
  return s ? *s : time_last;
}

/// a * b when the true product is at most time_last; nullopt otherwise.
constexpr std::optional<time_fs> checked_mul(time_fs a, time_fs b) {
  if (a == 0 || b == 0) return time_fs{0};
  if (a > time_last / b) return std::nullopt;
  return a * b;
}

/// The last instant at which a run whose longest gate delay is `largest_delay`
/// may process an input change or an event, so that everything it schedules
/// still falls at or before time_last: time_last - largest_delay.
constexpr time_fs last_safe_instant(time_fs largest_delay) {
  return largest_delay >= time_last ? 0 : time_last - largest_delay;
}

/// The words a step's report gives when the run reached the end of
/// representable time (the step's "detail" in JSON).
inline constexpr const char* end_of_time_words = "timeout at the end of representable time";

/// Checks a per-step time limit (`--horizon`): greater than 0 and at most
/// time_last. Returns false with the reason in `why`.
bool horizon_ok(time_fs horizon, std::string& why);

}  // namespace settle
