// Corner names and the counter-based delay draws behind them.
#include "sim/model/corner.hpp"

#include <fmt/format.h>

#include <charconv>
#include <cmath>

#include "sim/model/fixed_corner.hpp"
#include "sim/model/mix.hpp"

namespace settle {
namespace {

// A draw that depends on (seed, corner index, gate, edge, stream) alone: the
// corner's key, mix(mix(seed) ^ index), is worked out once per corner.
constexpr std::uint64_t corner_key(std::uint64_t seed, std::uint64_t index) {
  return mix(mix(seed) ^ index);
}
std::uint64_t draw(std::uint64_t key, gate_id g, int edge, int stream) {
  return mix(key ^ (std::uint64_t{g} << 3 | std::uint64_t(edge) << 1 | stream));
}

// Uniform on [lo, hi] by a 128-bit multiply (no modulo bias worth naming).
time_fs uniform(std::uint64_t h, time_fs lo, time_fs hi) {
  const auto span = static_cast<unsigned __int128>(hi - lo) + 1;
  return lo + static_cast<time_fs>((static_cast<unsigned __int128>(h) * span) >> 64);
}

// Truncated normal: mean typ, sigma (max - min) / 6, clipped to the range.
time_fs gaussian(std::uint64_t h1, std::uint64_t h2, const delay_range& r) {
  if (r.max == r.min) return r.min;
  const double z = std::sqrt(-2.0 * std::log(open_unit(h1))) * std::cos(2 * M_PI * open_unit(h2));
  const double v = static_cast<double>(r.typ) + z * static_cast<double>(r.max - r.min) / 6.0;
  if (v <= static_cast<double>(r.min)) return r.min;
  if (v >= static_cast<double>(r.max)) return r.max;
  return static_cast<time_fs>(std::llround(v));
}

bool parse_u64(std::string_view s, std::uint64_t& out) {
  if (s.empty()) return false;
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), out);
  return ec == std::errc{} && p == s.data() + s.size();
}

// Where variable `var` sits in corner `c`: min, max or typ (extremes#2). Only
// extremes and exhaustive corners move a variable; the caller handles the rest.
time_fs enumerated(const corner& c, std::uint64_t var, const delay_range& r) {
  if (c.what == corner::kind::exhaustive) return (var < 64 && (c.index >> var & 1)) ? r.max : r.min;
  // extremes: 0 all-min, 1 all-max, 2 typ, then per variable: it at max with
  // the others at min, and it at min with the others at max.
  if (c.index == 0) return r.min;
  if (c.index == 1) return r.max;
  if (c.index == 2) return r.typ;
  const auto k = c.index - 3;
  const bool self = k / 2 == var, slow_self = k % 2 == 0;
  return self == slow_self ? r.max : r.min;
}

bool fixed(const delay_range& r) { return r.min == r.max; }

}  // namespace

gate_variables variables_of(const gate_delay& d) {
  gate_variables v;
  v.rise = !fixed(d.rise);
  v.fall = !fixed(d.fall);
  v.shared = v.rise && d.rise == d.fall;
  return v;
}

std::uint32_t gate_variable_count(const netlist& n, gate_id g) {
  std::uint32_t count = 0;
  if (const auto* m = n.meta_of(g); m && m->gates[0] == g)
    count += unsigned(!fixed(m->tau)) + unsigned(!fixed(m->window));
  if (!n.has_arcs(g)) return count + variables_of(n.delay[g]).count();
  for (const auto& a : n.arcs_of(g)) count += variables_of(a).count();
  return count;
}

std::size_t delay_variables(const design& d) {
  std::size_t count = 0;
  for (gate_id g = 0; g < d.nets.gate_count(); ++g) count += gate_variable_count(d.nets, g);
  for (const auto& r : d.stim.rules) count += !fixed(r.delay);
  return count;
}

delay_range scaled(const delay_range& r, double spread) {
  if (spread == 1.0) return r;
  auto at = [&](time_fs end) {
    const double v = static_cast<double>(r.typ) +
                     spread * (static_cast<double>(end) - static_cast<double>(r.typ));
    return v <= 0 ? time_fs{0} : static_cast<time_fs>(std::llround(v));
  };
  return {at(r.min), r.typ, at(r.max)};
}

std::string corner::name() const {
  std::string base;
  switch (what) {
    case kind::min:
      base = "min";
      break;
    case kind::typ:
      base = "typ";
      break;
    case kind::max:
      base = "max";
      break;
    case kind::random:
      base = fmt::format("random:{}#{}", seed, index);
      break;
    case kind::gauss:
      base = fmt::format("gauss:{}#{}", seed, index);
      break;
    case kind::extremes:
      base = fmt::format("extremes#{}", index);
      break;
    case kind::exhaustive:
      base = fmt::format("exhaustive#{}", index);
      break;
    case kind::fixed:
      return detail::fixed_name(fixed ? *fixed : fixed_delays{});  // takes no spread
  }
  if (spread != 1.0) base += fmt::format("@{}", spread);
  return base;
}

std::optional<corner> parse_corner(std::string_view text, std::string* error) {
  corner c;
  auto fail = [&](std::string why) -> std::optional<corner> {
    if (error) *error = fmt::format("bad corner '{}': {}", text, why);
    return std::nullopt;
  };
  std::string_view s = text;
  // Before the spread: a gate name may hold '@' (an ISCAS name can), and the
  // delays are given, so there is nothing to scale.
  if (s.starts_with("fixed:")) {
    std::string why;
    c.what = corner::kind::fixed;
    c.fixed = detail::parse_fixed(s.substr(6), why);
    if (!c.fixed) return fail(why);
    return c;
  }
  if (auto at = s.find('@'); at != std::string_view::npos) {
    std::string w(s.substr(at + 1));
    char* end = nullptr;
    c.spread = std::strtod(w.c_str(), &end);
    if (w.empty() || *end || !(c.spread >= 0) || !std::isfinite(c.spread))
      return fail("the spread after '@' must be a number >= 0");
    s = s.substr(0, at);
  }
  if (s == "min")
    c.what = corner::kind::min;
  else if (s == "typ")
    c.what = corner::kind::typ;
  else if (s == "max")
    c.what = corner::kind::max;
  else if (s.starts_with("random:") || s.starts_with("gauss:")) {
    c.what = s[0] == 'r' ? corner::kind::random : corner::kind::gauss;
    s.remove_prefix(s.find(':') + 1);
    auto hash = s.find('#');
    if (!parse_u64(s.substr(0, hash), c.seed))
      return fail(
          "expected a seed, a whole number from 0 to 18446744073709551615 (2^64-1), e.g. random:7 "
          "or "
          "random:7#3");
    if (hash != std::string_view::npos && !parse_u64(s.substr(hash + 1), c.index))
      return fail("expected a corner number after '#'");
  } else if (s.starts_with("extremes#") || s.starts_with("exhaustive#")) {
    c.what = s[1] == 'x' && s[2] == 't' ? corner::kind::extremes : corner::kind::exhaustive;
    if (!parse_u64(s.substr(s.find('#') + 1), c.index))
      return fail("expected a corner number after '#'");
  } else {
    return fail(
        "expected min, typ, max, random:SEED[#i], gauss:SEED[#i], extremes#k, exhaustive#k or "
        "fixed:NAME=T,...");
  }
  return c;
}

std::string corner_range_error(const corner& c, std::size_t variables) {
  const auto g = static_cast<std::uint64_t>(variables);
  if (c.what == corner::kind::extremes) {
    const std::uint64_t count = 3 + 2 * g;  // all-min, all-max, typ, then two per variable
    if (c.index < count) return "";
    return fmt::format("this design has {} extremes corners, numbered 0..{}", count, count - 1);
  }
  if (c.what == corner::kind::exhaustive) {
    if (g >= 64) return "";  // every 64-bit number names one
    const std::uint64_t count = std::uint64_t{1} << g;
    if (c.index < count) return "";
    return fmt::format(
        "this design's {} delay variable{} give {} exhaustive corners, numbered 0..{}", g,
        g == 1 ? "" : "s", count, count - 1);
  }
  return "";
}

time_fs rule_delay(const delay_table& t, const delay_range& range, std::uint32_t rule,
                   std::uint64_t firing) {
  const corner& c = t.which;
  const delay_range r = scaled(range, c.spread);
  // A stream of its own: the rule's draws never meet a gate's.
  const std::uint64_t key = mix(corner_key(c.seed, c.index) ^ mix(0x72756c65ull + rule));
  switch (c.what) {
    case corner::kind::min:
      return r.min;
    case corner::kind::typ:
      return r.typ;
    case corner::kind::max:
      return r.max;
    case corner::kind::random:
      return uniform(mix(key ^ (firing << 1)), r.min, r.max);
    case corner::kind::gauss:
      return gaussian(mix(key ^ (firing << 1)), mix(key ^ (firing << 1 | 1)), r);
    case corner::kind::fixed:
      return c.fixed ? detail::fixed_rule_delay(*c.fixed, range, rule, firing) : range.typ;
    case corner::kind::extremes:
    case corner::kind::exhaustive: {
      if (fixed(r)) return r.min;
      // A table filled from the netlist alone numbers rules after the gates in order.
      const std::uint64_t var = rule < t.rule_var.size() ? t.rule_var[rule] : t.gate_vars + rule;
      return enumerated(c, var, r);
    }
  }
  return r.typ;
}

void fill_delays(const netlist& n, const corner& c, delay_table& out) {
  const auto gates = n.gate_count();
  out.which = c;
  out.rule_var.clear();
  const std::uint64_t key = corner_key(c.seed, c.index);
  out.gate_vars = 0;
  out.arc_rise.resize(n.arcs.size());
  out.arc_fall.resize(n.arcs.size());
  out.run_key = mix(key ^ 0x6d657461ull);
  out.tau.resize(n.meta.size());
  out.window.resize(n.meta.size());
  if (c.what == corner::kind::fixed) {
    for (std::size_t e = 0; e < n.meta.size(); ++e)
      out.tau[e] = n.meta[e].tau.typ, out.window[e] = n.meta[e].window.typ;
    detail::fill_fixed(n, c.fixed ? *c.fixed : fixed_delays{}, out);
    // A fixed: corner names gates: every arc of a gate takes the gate's delays.
    for (gate_id g = 0; g < gates; ++g)
      for (std::size_t k = 0; k < n.arcs_of(g).size(); ++k)
        out.arc_rise[n.arc_at[g] + k] = out.rise[g], out.arc_fall[n.arc_at[g] + k] = out.fall[g];
    return;
  }
  out.rise.resize(gates);
  out.fall.resize(gates);
  const bool enumerating = c.what == corner::kind::extremes || c.what == corner::kind::exhaustive;
  std::uint64_t var = 0;  // the next corner variable's number
  // One delay record's rise and fall at this corner; `stream` keys its draws.
  auto delays_of = [&](const gate_delay& d, std::uint64_t stream, gate_id g, time_fs& rise_out,
                       time_fs& fall_out) {
    const delay_range rise = scaled(d.rise, c.spread);
    const delay_range fall = scaled(d.fall, c.spread);
    if (enumerating) {
      const gate_variables v = variables_of(d);
      const std::uint64_t rise_var = var;
      if (v.rise) ++var;
      const std::uint64_t fall_var = v.shared ? rise_var : var;
      if (v.fall && !v.shared) ++var;
      rise_out = v.rise ? enumerated(c, rise_var, rise) : rise.min;
      fall_out = v.fall ? enumerated(c, fall_var, fall) : fall.min;
      return;
    }
    // Draws are keyed by (gate, edge), not by variable: a random corner's
    // name means the same delays whatever the other gates are.
    auto pick = [&](const delay_range& r, int edge) -> time_fs {
      switch (c.what) {
        case corner::kind::min:
          return r.min;
        case corner::kind::max:
          return r.max;
        case corner::kind::random:
          return uniform(draw(stream, g, edge, 0), r.min, r.max);
        case corner::kind::gauss:
          return gaussian(draw(stream, g, edge, 0), draw(stream, g, edge, 1), r);
        default:
          return r.typ;
      }
    };
    rise_out = pick(rise, 0);
    fall_out = pick(fall, 1);
  };
  // A metastable element's tau and window: corner variables of its first
  // gate, before its delays, each drawn from a stream of its own.
  auto meta_of = [&](gate_id g) {
    const auto* m = n.meta_of(g);
    if (!m || m->gates[0] != g) return;
    const auto e = n.meta_at[g];
    auto one = [&](const delay_range& range, std::uint64_t salt, time_fs& v) {
      const delay_range r = scaled(range, c.spread);
      if (enumerating) {
        v = fixed(r) ? r.min : enumerated(c, var++, r);
        return;
      }
      gate_delay d;  // delays_of scales it
      d.rise = d.fall = range;
      time_fs unused = 0;
      delays_of(d, mix(key ^ salt), g, v, unused);
    };
    one(m->tau, 0x746175ull, out.tau[e]);
    one(m->window, 0x77696e64ull, out.window[e]);
  };
  for (gate_id g = 0; g < gates; ++g) {
    meta_of(g);
    if (!n.has_arcs(g)) {
      delays_of(n.delay[g], key, g, out.rise[g], out.fall[g]);
      continue;
    }
    // Each arc draws from a stream of its own; the gate keeps the largest.
    out.rise[g] = out.fall[g] = 0;
    const auto arcs = n.arcs_of(g);
    for (std::size_t k = 0; k < arcs.size(); ++k) {
      const std::size_t a = n.arc_at[g] + k;
      delays_of(arcs[k], mix(key ^ (0x61726300ull + k)), g, out.arc_rise[a], out.arc_fall[a]);
      out.rise[g] = std::max(out.rise[g], out.arc_rise[a]);
      out.fall[g] = std::max(out.fall[g], out.arc_fall[a]);
    }
  }
  out.gate_vars = var;
}

void fill_delays(const design& d, const corner& c, delay_table& out) {
  fill_delays(d.nets, c, out);
  if (c.what != corner::kind::extremes && c.what != corner::kind::exhaustive) return;
  std::uint64_t var = out.gate_vars;
  out.rule_var.resize(d.stim.rules.size());
  for (std::size_t i = 0; i < d.stim.rules.size(); ++i)
    out.rule_var[i] = fixed(d.stim.rules[i].delay) ? delay_table::none_var : var++;
}

}  // namespace settle
