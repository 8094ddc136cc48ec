// The counter-based streams' mixer: every draw of a corner, a tie or a random
// event stream is a function of its counters, so runs replay exactly.
#pragma once

#include <cstdint>

namespace settle {

/// splitmix64's finaliser: a strong 64-bit mixer (Steele, Lea and Flood 2014).
constexpr std::uint64_t mix(std::uint64_t z) {
  z += 0x9e3779b97f4a7c15ull;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
  return z ^ (z >> 31);
}

/// A double strictly inside (0, 1) from the top 53 bits of h.
constexpr double open_unit(std::uint64_t h) {
  return (static_cast<double>(h >> 11) + 0.5) * 0x1.0p-53;
}

}  // namespace settle
