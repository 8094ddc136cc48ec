// Exact parsing of time literals and delay ranges for command-line options.
#include "sim/model/time_parse.hpp"

#include <fmt/format.h>

#include <cstdint>
#include <vector>

namespace settle {
namespace {

std::nullopt_t fail(std::string* err, std::string msg) {
  if (err) *err = std::move(msg);
  return std::nullopt;
}

bool is_digit(char c) { return c >= '0' && c <= '9'; }

// 10^e femtoseconds per unit (SI prefixes: femto 1e-15 ... milli 1e-3).
int unit_exponent(std::string_view u) {
  if (u == "fs") return 0;
  if (u == "ps") return 3;
  if (u == "ns") return 6;
  if (u == "us") return 9;
  if (u == "ms") return 12;
  return -1;
}

}  // namespace

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

std::optional<time_fs> parse_time(std::string_view s, std::string* err) {
  const std::string shown(s);
  std::size_t i = 0;
  while (i < s.size() && s[i] == ' ') ++i;
  const std::size_t int_begin = i;
  while (i < s.size() && is_digit(s[i])) ++i;
  std::string_view whole = s.substr(int_begin, i - int_begin);
  std::string_view frac;
  if (i < s.size() && s[i] == '.') {
    const std::size_t b = ++i;
    while (i < s.size() && is_digit(s[i])) ++i;
    frac = s.substr(b, i - b);
    if (frac.empty()) return fail(err, fmt::format("'{}': expected digits after '.'", shown));
  }
  const std::size_t number_end = i;
  if (whole.empty()) return fail(err, fmt::format("'{}' is not a time (e.g. 40ps, 1.5ns)", shown));
  while (i < s.size() && s[i] == ' ') ++i;
  std::string_view unit = s.substr(i);
  while (!unit.empty() && unit.back() == ' ') unit.remove_suffix(1);
  if (unit.empty())
    return fail(err, fmt::format("'{}': a time needs a unit (fs ps ns us ms)", shown));
  const int e = unit_exponent(unit);
  if (e < 0)
    return fail(err, fmt::format("'{}': unknown time unit '{}' (fs ps ns us ms)", shown, unit));

  // The digits exactly as written ("1.5"), scaled by the unit in integers.
  const std::string_view number = s.substr(int_begin, number_end - int_begin);
  time_fs v = 0;
  std::string why;
  if (!time_to_fs(number, e, v, why)) return fail(err, std::move(why));
  return v;
}

std::string time_literal(time_fs t) { return t == 0 ? std::string("0fs") : format_time(t); }

std::optional<delay_range> parse_delay_range(std::string_view s, std::string* err) {
  std::vector<std::string_view> parts;
  for (;;) {
    const auto pos = s.find("..");
    if (pos == std::string_view::npos) {
      parts.push_back(s);
      break;
    }
    parts.push_back(s.substr(0, pos));
    s.remove_prefix(pos + 2);
  }
  if (parts.size() > 3) return fail(err, "a delay is T, MIN..MAX or MIN..TYP..MAX");
  std::vector<time_fs> t;
  for (auto p : parts) {
    auto v = parse_time(p, err);
    if (!v) return std::nullopt;
    t.push_back(*v);
  }
  if (t.front() > t.back()) return fail(err, "a delay range needs MIN <= MAX");
  delay_range r{t.front(), t.front() + (t.back() - t.front()) / 2, t.back()};
  if (t.size() == 3) r.typ = t[1];
  if (r.typ < r.min || r.typ > r.max) return fail(err, "a delay range needs MIN <= TYP <= MAX");
  return r;
}

}  // namespace settle
