// `fixed:` corners: explicit delays per gate and per reaction-rule firing, by name.
#include "sim/model/fixed_corner.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <charconv>

#include "sim/model/check.hpp"
#include "sim/model/time_parse.hpp"

namespace settle {
namespace {

constexpr std::string_view rule_prefix = "rule#";

std::vector<std::string_view> split(std::string_view s, char sep) {
  std::vector<std::string_view> parts;
  for (;;) {
    const auto at = s.find(sep);
    parts.push_back(s.substr(0, at));
    if (at == std::string_view::npos) return parts;
    s.remove_prefix(at + 1);
  }
}

std::string times_text(const std::vector<time_fs>& ts) {
  std::string out;
  for (std::size_t i = 0; i < ts.size(); ++i) out += (i ? "/" : "") + time_literal(ts[i]);
  return out;
}

// "35ps..55ps", as a range is written.
std::string range_text(const delay_range& r) {
  return fmt::format("{}..{}", time_literal(r.min), time_literal(r.max));
}

// Empty when `t` lies in the written range `r`; otherwise why not, naming `what`.
std::string outside(time_fs t, const delay_range& r, const std::string& what) {
  if (t >= r.min && t <= r.max) return "";
  if (r.min == r.max)
    return fmt::format("delay {} of {} is not its fixed delay {}", time_literal(t), what,
                       time_literal(r.min));
  return fmt::format("delay {} of {} is outside its range {}", time_literal(t), what,
                     range_text(r));
}

// The gate a `fixed:` entry names: by its own name or an added (port) name of its output.
gate_id gate_named(const netlist& n, std::string_view name, std::string& why) {
  const net_id net = n.find(name);
  if (net == no_id || net == netlist::const0 || net == netlist::const1) {
    why = fmt::format("no gate is named '{}'", name);
    return no_id;
  }
  if (n.driver[net] == no_id) {
    why = fmt::format("'{}' is an input, not a gate", name);
    return no_id;
  }
  return n.driver[net];
}

// Every gate's delays under `f`: typ unless listed. The names are checked
// here; the ranges by the caller that needs them.
bool resolve_gates(const netlist& n, const fixed_delays& f, std::vector<time_fs>& rise,
                   std::vector<time_fs>& fall, std::vector<gate_id>& ids, std::string& why) {
  const auto gates = n.gate_count();
  rise.resize(gates);
  fall.resize(gates);
  for (gate_id g = 0; g < gates; ++g) {
    rise[g] = n.delay[g].rise.typ;
    fall[g] = n.delay[g].fall.typ;
  }
  std::vector<std::uint32_t> listed(gates, 0);  // 1 + the entry listing the gate, or 0
  ids.clear();
  for (std::size_t i = 0; i < f.gates.size(); ++i) {
    const auto& e = f.gates[i];
    const gate_id g = gate_named(n, e.name, why);
    if (g == no_id) return false;
    if (listed[g]) {
      why = fmt::format("gate '{}' is listed twice (as '{}' and '{}')", n.gate_name(g),
                        f.gates[listed[g] - 1].name, e.name);
      return false;
    }
    listed[g] = static_cast<std::uint32_t>(i + 1);
    rise[g] = e.rise;
    fall[g] = e.fall;
    ids.push_back(g);
  }
  return true;
}

const std::vector<time_fs>* listed_firings(const fixed_delays& f, std::uint32_t rule) {
  if (f.resolved) {
    if (rule >= f.rule_firings.size() || f.rule_firings[rule].empty()) return nullptr;
    return &f.rule_firings[rule];
  }
  for (const auto& r : f.rules)
    if (r.number == std::uint64_t{rule} + 1) return &r.firings;
  return nullptr;
}

}  // namespace

namespace detail {

std::shared_ptr<const fixed_delays> parse_fixed(std::string_view text, std::string& why) {
  auto f = std::make_shared<fixed_delays>();
  if (text.empty()) return f;  // typ for everything
  if (text.find_first_of(" \t\r\n") != std::string_view::npos) {
    why = "a fixed: corner is written without spaces (fixed:NAME=T,NAME=R/F,rule#K=T1/T2)";
    return nullptr;
  }
  for (std::string_view entry : split(text, ',')) {
    const auto eq = entry.find('=');
    if (entry.empty() || eq == 0 || eq == std::string_view::npos) {
      why = fmt::format("entry '{}' is not NAME=T, NAME=R/F or rule#K=T1/T2/...", entry);
      return nullptr;
    }
    const std::string_view name = entry.substr(0, eq);
    std::vector<time_fs> times;
    for (std::string_view part : split(entry.substr(eq + 1), '/')) {
      std::string err;
      const auto t = parse_time(part, &err);
      if (!t) {
        why = fmt::format("entry '{}': {}", entry,
                          part.empty() ? std::string("a delay is missing") : err);
        return nullptr;
      }
      times.push_back(*t);
    }
    if (name.starts_with(rule_prefix)) {
      const std::string_view k = name.substr(rule_prefix.size());
      std::uint32_t number = 0;
      const auto [p, ec] = std::from_chars(k.data(), k.data() + k.size(), number);
      if (k.empty() || ec != std::errc{} || p != k.data() + k.size() || number == 0) {
        why = fmt::format("entry '{}': expected a rule number from 1 after 'rule#'", entry);
        return nullptr;
      }
      const bool twice = std::any_of(f->rules.begin(), f->rules.end(),
                                     [&](const auto& r) { return r.number == number; });
      if (twice) {
        why = fmt::format("rule#{} is listed twice", number);
        return nullptr;
      }
      f->rules.push_back({number, std::move(times)});
      continue;
    }
    if (times.size() > 2) {
      why = fmt::format("entry '{}': a gate takes one delay T or two R/F, not {}", entry,
                        times.size());
      return nullptr;
    }
    const bool twice = std::any_of(f->gates.begin(), f->gates.end(),
                                   [&](const auto& g) { return g.name == name; });
    if (twice) {
      why = fmt::format("gate '{}' is listed twice", name);
      return nullptr;
    }
    f->gates.push_back({std::string(name), times.front(), times.back()});
  }
  return f;
}

std::string fixed_name(const fixed_delays& f) {
  std::string out = "fixed:";
  bool first = true;
  auto sep = [&] { return std::exchange(first, false) ? "" : ","; };
  for (const auto& g : f.gates) {
    out += fmt::format("{}{}={}", sep(), g.name, time_literal(g.rise));
    if (g.fall != g.rise) out += "/" + time_literal(g.fall);
  }
  for (const auto& r : f.rules)
    out += fmt::format("{}{}{}={}", sep(), rule_prefix, r.number, times_text(r.firings));
  return out;
}

void fill_fixed(const netlist& n, const fixed_delays& f, delay_table& out) {
  if (f.resolved && f.rise.size() == n.gate_count()) {
    out.rise = f.rise;
    out.fall = f.fall;
    return;
  }
  std::vector<gate_id> ids;
  std::string why;
  const bool named = resolve_gates(n, f, out.rise, out.fall, ids, why);
  SETTLE_CHECK(named, "a fixed: corner names only gates of this netlist (corner_design_error)");
}

time_fs fixed_rule_delay(const fixed_delays& f, const delay_range& written, std::uint32_t rule,
                         std::uint64_t firing) {
  const auto* list = listed_firings(f, rule);
  if (!list) return written.typ;
  return (*list)[std::min<std::uint64_t>(firing, list->size() - 1)];
}

}  // namespace detail

std::string corner_design_error(const design& d, corner& c) {
  if (c.what != corner::kind::fixed) return "";
  const fixed_delays given = c.fixed ? *c.fixed : fixed_delays{};
  auto f = std::make_shared<fixed_delays>(given);
  std::vector<gate_id> ids;
  std::string why;
  if (!resolve_gates(d.nets, given, f->rise, f->fall, ids, why)) return why;
  for (std::size_t i = 0; i < ids.size(); ++i) {
    const gate_delay& w = d.nets.delay[ids[i]];
    const std::string gate = fmt::format("gate '{}'", d.nets.gate_name(ids[i]));
    if (auto e = outside(given.gates[i].rise, w.rise, gate + " (rise)"); !e.empty()) return e;
    if (auto e = outside(given.gates[i].fall, w.fall, gate + " (fall)"); !e.empty()) return e;
  }
  const auto rules = d.stim.rules.size();
  f->rule_firings.assign(rules, {});
  for (const auto& r : given.rules) {
    if (r.number > rules)
      return rules == 0
                 ? fmt::format("there is no rule#{}: this design has no reaction rules", r.number)
                 : fmt::format(
                       "there is no rule#{}: this design has {} reaction rule{}, "
                       "numbered 1..{}",
                       r.number, rules, rules == 1 ? "" : "s", rules);
    const delay_range& w = d.stim.rules[r.number - 1].delay;
    for (std::size_t i = 0; i < r.firings.size(); ++i) {
      const std::string what = fmt::format("rule#{} (list entry {})", r.number, i + 1);
      if (auto e = outside(r.firings[i], w, what); !e.empty()) return e;
    }
    f->rule_firings[r.number - 1] = r.firings;
  }
  f->resolved = true;
  c.fixed = std::move(f);
  return "";
}

corner fixed_corner(const design& d, std::span<const time_fs> rise, std::span<const time_fs> fall,
                    const std::vector<std::vector<time_fs>>& rule_firings) {
  const netlist& n = d.nets;
  SETTLE_CHECK(rise.size() == n.gate_count() && fall.size() == n.gate_count(),
               "fixed_corner takes one rise and one fall delay per gate");
  SETTLE_CHECK(rule_firings.size() == d.stim.rules.size(),
               "fixed_corner takes one list of firing delays per reaction rule");
  auto f = std::make_shared<fixed_delays>();
  for (gate_id g = 0; g < n.gate_count(); ++g) {
    const gate_delay& w = n.delay[g];
    // A gate at its typ on a fixed range needs no entry: unlisted gates take typ.
    const bool typ_fixed = w.rise.min == w.rise.max && w.fall.min == w.fall.max &&
                           rise[g] == w.rise.typ && fall[g] == w.fall.typ;
    if (!typ_fixed) f->gates.push_back({n.gate_name(g), rise[g], fall[g]});
  }
  for (std::size_t k = 0; k < rule_firings.size(); ++k)
    if (!rule_firings[k].empty())
      f->rules.push_back({static_cast<std::uint32_t>(k + 1), rule_firings[k]});
  f->rise.assign(rise.begin(), rise.end());
  f->fall.assign(fall.begin(), fall.end());
  f->rule_firings = rule_firings;
  f->resolved = true;
  corner c;
  c.what = corner::kind::fixed;
  c.fixed = std::move(f);
  return c;
}

std::uint64_t fixed_rule_firings(const corner& c, std::uint32_t rule) {
  if (c.what != corner::kind::fixed || !c.fixed) return 0;
  const auto* list = listed_firings(*c.fixed, rule);
  return list ? list->size() : 0;
}

}  // namespace settle
