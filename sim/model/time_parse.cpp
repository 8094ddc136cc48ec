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

// a = a * 10 + d with overflow detection.
bool push_digit(std::uint64_t& a, unsigned d) {
  if (a > (UINT64_MAX - d) / 10) return false;
  a = a * 10 + d;
  return true;
}

}  // namespace

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
  if (whole.empty()) return fail(err, fmt::format("'{}' is not a time (e.g. 40ps, 1.5ns)", shown));
  while (i < s.size() && s[i] == ' ') ++i;
  std::string_view unit = s.substr(i);
  while (!unit.empty() && unit.back() == ' ') unit.remove_suffix(1);
  if (unit.empty())
    return fail(err, fmt::format("'{}': a time needs a unit (fs ps ns us ms)", shown));
  const int e = unit_exponent(unit);
  if (e < 0)
    return fail(err, fmt::format("'{}': unknown time unit '{}' (fs ps ns us ms)", shown, unit));

  // value = (whole . frac) * 10^e, computed in integers.
  std::uint64_t v = 0;
  bool ok = true;
  for (char c : whole) ok = ok && push_digit(v, static_cast<unsigned>(c - '0'));
  for (std::size_t k = 0; k < frac.size(); ++k) {
    const unsigned d = static_cast<unsigned>(frac[k] - '0');
    if (static_cast<int>(k) < e) {
      ok = ok && push_digit(v, d);
    } else if (d != 0) {
      return fail(err, fmt::format("'{}' is not a whole number of femtoseconds", shown));
    }
  }
  for (int k = static_cast<int>(frac.size()); k < e; ++k) ok = ok && push_digit(v, 0);
  if (!ok) return fail(err, fmt::format("'{}' does not fit in 64 bits of femtoseconds", shown));
  return v;
}

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
