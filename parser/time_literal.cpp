// Exact time literal arithmetic on the digit string (never through floating point).
#include "parser/time_literal.hpp"

#include <cstdint>

namespace settle {

const char* time_unit_name(int exponent) {
  switch (exponent) {
    case 0:
      return "fs";
    case 3:
      return "ps";
    case 6:
      return "ns";
    case 9:
      return "us";
    default:
      return "ms";
  }
}

bool time_to_fs(std::string_view number, int exponent, time_fs& out, std::string& why) {
  const std::string written = std::string(number) + time_unit_name(exponent);
  auto dot = number.find('.');
  std::string_view whole = number.substr(0, dot);
  std::string_view frac =
      dot == std::string_view::npos ? std::string_view{} : number.substr(dot + 1);
  while (!frac.empty() && frac.back() == '0') frac.remove_suffix(1);
  if (frac.size() > static_cast<std::size_t>(exponent)) {
    why = "time " + written + " is not a whole number of femtoseconds";
    return false;
  }
  time_fs v = 0;
  auto push = [&](unsigned d) {
    if (v > (UINT64_MAX - d) / 10) return false;
    v = v * 10 + d;
    return true;
  };
  bool ok = true;
  for (char c : whole) ok = ok && push(static_cast<unsigned>(c - '0'));
  for (char c : frac) ok = ok && push(static_cast<unsigned>(c - '0'));
  for (auto i = frac.size(); i < static_cast<std::size_t>(exponent); ++i) ok = ok && push(0);
  if (!ok) {
    why = "time " + written + " does not fit in 64 bits of femtoseconds";
    return false;
  }
  out = v;
  return true;
}

}  // namespace settle
