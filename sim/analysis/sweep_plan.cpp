// Corner spec parsing and enumeration for sweeps: extremes, exhaustive, random:N, gauss:N,
// interval.
#include <fmt/format.h>

#include <algorithm>
#include <charconv>
#include <utility>

#include "sim/analysis/sweep.hpp"
#include "sim/model/check.hpp"

namespace settle {
namespace {

bool parse_count(std::string_view s, std::uint64_t& out) {
  if (s.empty()) return false;
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), out);
  return ec == std::errc{} && p == s.data() + s.size();
}

std::string_view trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

}  // namespace

corner sweep_plan::corner_at(std::uint64_t i) const {
  SETTLE_CHECK(i < corners, "a corner number within the plan");
  for (const auto& it : items) {
    if (i < it.first || i >= it.first + it.count) continue;
    corner c;
    c.what = it.what;
    c.index = it.offset + (i - it.first);
    if (it.what == corner::kind::random || it.what == corner::kind::gauss) c.seed = seed;
    return c;
  }
  return corner{};  // not reached: the items cover every corner number
}

std::uint64_t sweep_result_bytes(const sweep_plan& plan, std::size_t steps, std::size_t gauges) {
  // outcome_of (4) + settle_of (8) + the outcome's kept settle time (8) per
  // corner and step, one gauge mean (8) per corner and gauge, and one
  // finished flag per corner. corners <= 2^26, so the product overflows only
  // past 2^37 steps; saturate anyway.
  constexpr std::uint64_t per_cell = sizeof(std::uint32_t) + 2 * sizeof(time_fs);
  const std::uint64_t s = std::max<std::uint64_t>(steps, 1);
  if (s > UINT64_MAX / 64 / per_cell || gauges > UINT64_MAX / 64 / sizeof(double))
    return UINT64_MAX;
  const std::uint64_t per_corner = s * per_cell + gauges * sizeof(double) + 1;
  if (plan.corners && per_corner > UINT64_MAX / plan.corners) return UINT64_MAX;
  return plan.corners * per_corner;
}

bool sweep_plan::is_sampled(std::uint64_t i) const {
  for (const auto& it : items)
    if (i >= it.first && i < it.first + it.count)
      return it.what == corner::kind::random || it.what == corner::kind::gauss;
  return false;
}

std::optional<sweep_plan> plan_sweep(std::string_view spec, std::uint64_t seed,
                                     std::size_t variables, std::string* error) {
  auto fail = [&](std::string why) -> std::optional<sweep_plan> {
    if (error) *error = std::move(why);
    return std::nullopt;
  };
  sweep_plan plan;
  plan.spec = std::string(spec);
  plan.seed = seed;
  std::uint64_t next_random = 0, next_gauss = 0;
  bool seen_extremes = false, seen_exhaustive = false, seen_interval = false;
  std::string_view rest = spec;
  for (;;) {
    const auto plus = rest.find('+');
    const std::string_view tok = trim(rest.substr(0, plus));
    sweep_plan::item it;
    // A part given twice would count the same corners twice and narrow every
    // interval with no new information; random:N and gauss:N parts draw new corners.
    bool& seen = tok == "extremes"     ? seen_extremes
                 : tok == "exhaustive" ? seen_exhaustive
                                       : seen_interval;
    if ((tok == "extremes" || tok == "exhaustive" || tok == "interval") &&
        std::exchange(seen, true))
      return fail(fmt::format(
          "--corners '{}': '{}' appears twice; each of extremes, exhaustive and interval may be "
          "given once",
          spec, tok));
    if (tok.empty()) {
      return fail(fmt::format(
          "--corners '{}': empty item; expected extremes, exhaustive, random:N, gauss:N or "
          "interval joined by '+'",
          spec));
    } else if (tok == "interval") {
      plan.interval = true;
    } else if (tok == "extremes") {
      it.what = corner::kind::extremes;
      it.count = 3 + 2 * static_cast<std::uint64_t>(variables);
    } else if (tok == "exhaustive") {
      if (variables >= 64 || (std::uint64_t{1} << variables) > exhaustive_limit)
        return fail(fmt::format(
            "--corners exhaustive: {} delay variables need 2^{} corners, more than the limit "
            "of 2^20 ({}); sample instead, e.g. --corners extremes+random:10000",
            variables, variables, exhaustive_limit));
      it.what = corner::kind::exhaustive;
      it.count = std::uint64_t{1} << variables;
    } else if (tok.starts_with("random:") || tok.starts_with("gauss:")) {
      const bool random = tok[0] == 'r';
      it.what = random ? corner::kind::random : corner::kind::gauss;
      const std::string_view n = tok.substr(tok.find(':') + 1);
      if (!parse_count(n, it.count) || it.count == 0)
        return fail(fmt::format(
            "--corners '{}': expected a corner count of at least 1 after '{}', e.g. {}1000", spec,
            random ? "random:" : "gauss:", random ? "random:" : "gauss:"));
      std::uint64_t& next = random ? next_random : next_gauss;
      it.offset = next;
      next += it.count;
    } else {
      return fail(fmt::format(
          "--corners '{}': unknown item '{}'; expected extremes, exhaustive, random:N, gauss:N "
          "or interval joined by '+'",
          spec, tok));
    }
    if (it.count) {
      if (it.count > sweep_corner_limit || plan.corners + it.count > sweep_corner_limit)
        return fail(fmt::format("--corners '{}': more than {} corners in one sweep", spec,
                                sweep_corner_limit));
      it.first = plan.corners;
      plan.corners += it.count;
      if (it.what == corner::kind::random || it.what == corner::kind::gauss)
        plan.sampled += it.count;
      plan.items.push_back(it);
    }
    if (plus == std::string_view::npos) break;
    rest = rest.substr(plus + 1);
  }
  // `interval` alone is allowed: the min-max run then judges every step.
  if (plan.corners == 0 && !plan.interval)
    return fail(fmt::format(
        "--corners '{}': no corners to run; add extremes, exhaustive, random:N, gauss:N or "
        "interval",
        spec));
  return plan;
}

}  // namespace settle
