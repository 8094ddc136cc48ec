// Exact conversion of time literals ("1.5ns") to femtoseconds, from the digit string.
#pragma once

#include <string>
#include <string_view>

#include "sim/model/logic.hpp"

namespace settle {

/// The unit name for a power of ten of femtoseconds (0 fs, 3 ps, 6 ns, 9 us, 12 ms).
const char* time_unit_name(int exponent);

/// Converts `number` ("1.5", digits with an optional fraction) times 10^exponent
/// fs. Returns false with the reason in `why` when the value is not a whole
/// number of femtoseconds or does not fit in 64 bits.
bool time_to_fs(std::string_view number, int exponent, time_fs& out, std::string& why);

}  // namespace settle
