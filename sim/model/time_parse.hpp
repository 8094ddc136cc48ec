// Exact parsing of time literals ("1.5ns") and delay ranges ("40ps..60ps") outside the grammar.
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "sim/model/logic.hpp"
#include "sim/model/netlist.hpp"

namespace settle {

/// Parses a time literal with a unit (fs ps ns us ms), decimals allowed:
/// "40ps", "1.5ns". The value must be a whole number of femtoseconds and fit
/// in 64 bits. On failure returns nullopt and sets *err (when err is not null).
std::optional<time_fs> parse_time(std::string_view text, std::string* err = nullptr);

/// Parses "T" (fixed), "MIN..MAX" (typ = midpoint, rounded down) or
/// "MIN..TYP..MAX"; requires min <= typ <= max.
std::optional<delay_range> parse_delay_range(std::string_view text, std::string* err = nullptr);

}  // namespace settle
