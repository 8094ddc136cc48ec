// Formatting of femtosecond times for people.
#include "sim/model/logic.hpp"

#include <fmt/format.h>

namespace settle {

std::string format_time(time_fs t) {
  if (t == 0) return "0";
  // The largest unit that is at most the value and shows it exactly with at
  // most three decimals; below 1ps, or when no unit is exact, femtoseconds.
  struct unit {
    time_fs fs;
    const char* name;
  };
  static constexpr unit units[] = {{1'000'000'000'000ULL, "ms"},
                                   {1'000'000'000ULL, "us"},
                                   {1'000'000ULL, "ns"},
                                   {1'000ULL, "ps"}};
  for (const auto& u : units) {
    const time_fs step = u.fs / 1000;
    if (t < u.fs || t % step != 0) continue;
    const time_fs whole = t / u.fs;
    auto frac = static_cast<unsigned>((t % u.fs) / step);
    if (frac == 0) return fmt::format("{}{}", whole, u.name);
    int digits = 3;
    while (frac % 10 == 0) frac /= 10, --digits;
    return fmt::format("{}.{:0{}}{}", whole, frac, digits, u.name);
  }
  return fmt::format("{}fs", t);
}

}  // namespace settle
