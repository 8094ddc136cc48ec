// Three-valued logic levels (0, 1, x) and time in femtoseconds.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>

namespace settle {

/// A logic level. The numeric values are part of the kernel's table layout.
enum class logic : std::uint8_t { zero = 0, one = 1, x = 2 };

/// Simulation time: an unsigned count of femtoseconds.
using time_fs = std::uint64_t;

/// '0', '1' or 'x'.
constexpr char to_char(logic v) { return v == logic::zero ? '0' : v == logic::one ? '1' : 'x'; }

/// Least upper bound in the information order 0, 1 below x (Eichelberger 1965).
constexpr logic lub(logic a, logic b) { return a == b ? a : logic::x; }

constexpr logic from_bool(bool b) { return b ? logic::one : logic::zero; }

/// Formats a femtosecond count with the largest unit that keeps it exact
/// enough to read: "0", "35ps", "1.5ns", "12.345678ns".
std::string format_time(time_fs t);

}  // namespace settle
