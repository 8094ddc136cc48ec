// Exact parsing of time literals ("1.5ns") and delay ranges ("40ps..60ps") outside the grammar.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "sim/model/logic.hpp"
#include "sim/model/netlist.hpp"

namespace settle {

/// The unit name for a power of ten of femtoseconds (0 fs, 3 ps, 6 ns, 9 us, 12 ms).
const char* time_unit_name(int exponent);

/// Converts `number` ("1.5", digits with an optional fraction) times 10^exponent
/// fs, exactly on the digit string (never through floating point). Returns
/// false with the reason in `why` when the value is not a whole number of
/// femtoseconds or does not fit in 64 bits. The grammar's time literals and
/// parse_time below both end here, so one value reads and fails alike in a
/// design file and on the command line.
bool time_to_fs(std::string_view number, int exponent, time_fs& out, std::string& why);

/// Parses a time literal with a unit (fs ps ns us ms), decimals allowed:
/// "40ps", "1.5ns". The value must be a whole number of femtoseconds and fit
/// in 64 bits. On failure returns nullopt and sets *err (when err is not null).
std::optional<time_fs> parse_time(std::string_view text, std::string* err = nullptr);

/// The literal parse_time reads back to exactly `t`: format_time's text
/// ("45ps", "45.25ps", "1.5ns", "1fs"), which never rounds, and "0fs" for 0.
std::string time_literal(time_fs t);

/// Parses "T" (fixed), "MIN..MAX" (typ = midpoint, rounded down) or
/// "MIN..TYP..MAX"; requires min <= typ <= max.
std::optional<delay_range> parse_delay_range(std::string_view text, std::string* err = nullptr);

}  // namespace settle
