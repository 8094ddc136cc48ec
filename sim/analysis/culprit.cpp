// Race culprits: ddmin over the gates whose delays differ between two witnesses, and the competing
// paths.
#include "sim/analysis/culprit.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <map>

#include "sim/model/time_parse.hpp"

namespace settle {
namespace {

using subset = std::vector<std::uint32_t>;

// Splits c into n parts of nearly equal size, in order.
std::vector<subset> split(const subset& c, std::size_t n) {
  std::vector<subset> parts(n);
  std::size_t at = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t len = (c.size() - at) / (n - i);
    parts[i].assign(c.begin() + static_cast<std::ptrdiff_t>(at),
                    c.begin() + static_cast<std::ptrdiff_t>(at + len));
    at += len;
  }
  return parts;
}

subset minus(const subset& c, const subset& part) {
  subset out;
  std::set_difference(c.begin(), c.end(), part.begin(), part.end(), std::back_inserter(out));
  return out;
}

// Every value change of a run, kept per net for tracing back.
class change_log final : public change_sink {
 public:
  explicit change_log(std::size_t nets) : by_net_(nets) {}
  void on_start(std::span<const logic>) override {}
  void on_changes(std::span<const change> batch) override {
    for (const auto& c : batch) by_net_[c.net].push_back({c.time, c.value});
  }
  void on_finish(time_fs) override {}
  // The last change of `net` at or before `t` (strictly before when `strict`) and not before
  // `from`.
  const std::pair<time_fs, logic>* last(net_id net, time_fs from, time_fs t, bool strict) const {
    const auto& v = by_net_[net];
    auto it = std::upper_bound(v.begin(), v.end(), t,
                               [](time_fs x, const auto& e) { return x < e.first; });
    while (it != v.begin()) {
      --it;
      if (strict && it->first >= t) continue;
      return it->first >= from ? &*it : nullptr;
    }
    return nullptr;
  }

 private:
  std::vector<std::vector<std::pair<time_fs, logic>>> by_net_;
};

// From `net`'s last change in the step back through the last-changing fan-in
// of its driver, while the changes stay inside the step.
std::vector<path_hop> trace_back(const netlist& n, const change_log& log, net_id net, time_fs from,
                                 time_fs to) {
  std::vector<path_hop> path;
  const auto* c = log.last(net, from, to, false);
  while (c && path.size() < 512) {
    path.push_back({net, c->first, c->second});
    const gate_id g = n.driver[net];
    if (g == no_id) break;
    const std::pair<time_fs, logic>* best = nullptr;
    net_id best_net = no_id;
    for (std::uint32_t i = n.fanin_begin[g]; i < n.fanin_begin[g + 1]; ++i) {
      const net_id f = n.fanin[i];
      if (f == netlist::const0 || f == netlist::const1) continue;
      const auto* e = log.last(f, from, c->first, true);
      if (e && (!best || e->first > best->first)) best = e, best_net = f;
    }
    net = best_net;
    c = best;
  }
  std::reverse(path.begin(), path.end());
  return path;
}

std::string outcome_key(const run_result& r, std::size_t step) {
  if (step == 0 || step > r.steps.size()) return "-";
  const auto& s = r.steps[step - 1];
  std::string k(1, static_cast<char>(s.status));
  if (s.status == step_status::oscillating) k += fmt::format("{}", s.period);
  for (logic v : s.values) k += to_char(v);
  return k;
}

}  // namespace

std::vector<std::uint32_t> ddmin(
    const std::vector<std::uint32_t>& items,
    const std::function<bool(const std::vector<std::uint32_t>&)>& fails, std::size_t max_tests,
    std::size_t* tests) {
  subset c = items;
  std::sort(c.begin(), c.end());
  std::map<subset, bool> seen;
  std::size_t used = 0;
  auto test = [&](const subset& s) {
    auto it = seen.find(s);
    if (it != seen.end()) return it->second;
    ++used;
    const bool f = fails(s);
    seen.emplace(s, f);
    return f;
  };
  std::size_t n = 2;
  while (c.size() >= 2 && used < max_tests) {
    const auto parts = split(c, std::min(n, c.size()));
    bool reduced = false;
    // Reduce to a subset ...
    for (const auto& p : parts)
      if (used < max_tests && test(p)) {
        c = p, n = 2, reduced = true;
        break;
      }
    // ... or to a complement (with two parts the complements are the subsets).
    if (!reduced && parts.size() > 2)
      for (const auto& p : parts) {
        if (used >= max_tests) break;
        subset rest = minus(c, p);
        if (test(rest)) {
          c = std::move(rest), n = std::max<std::size_t>(parts.size() - 1, 2), reduced = true;
          break;
        }
      }
    if (reduced) continue;
    if (parts.size() >= c.size()) break;  // single elements tried: 1-minimal
    n = std::min(c.size(), parts.size() * 2);
  }
  if (tests) *tests = used;
  // Keep the caller's order.
  subset out;
  for (auto i : items)
    if (std::binary_search(c.begin(), c.end(), i)) out.push_back(i);
  return out;
}

culprit_report find_culprits(const design& d, const run_options& opt, std::size_t step,
                             const delay_table& a, const delay_table& b, const std::string names[2],
                             std::size_t max_tests) {
  culprit_report rep;
  rep.step = step;
  rep.corner[0] = names[0];
  rep.corner[1] = names[1];
  const netlist& n = d.nets;
  run_context ctx(n);
  change_log log_a(n.net_count()), log_b(n.net_count());
  const run_result ra = run_stimulus(ctx, d, a, opt, &log_a);
  const run_result rb = run_stimulus(ctx, d, b, opt, &log_b);
  const std::string key_a = outcome_key(ra, step), key_b = outcome_key(rb, step);
  if (key_a == key_b || step > ra.steps.size() || step > rb.steps.size()) return rep;

  // The competing paths: per outcome, from a differing reported net that moved in that run.
  const auto& sa = ra.steps[step - 1];
  const auto& sb = rb.steps[step - 1];
  const change_log* logs[2] = {&log_a, &log_b};
  const step_result* steps[2] = {&sa, &sb};
  for (int side = 0; side < 2; ++side) {
    const step_result& s = *steps[side];
    net_id pick = no_id;
    for (std::size_t i = 0; i < ra.reported.size() && i < sa.values.size() && i < sb.values.size();
         ++i) {
      if (sa.values[i] == sb.values[i]) continue;
      if (pick == no_id) pick = ra.reported[i];
      if (logs[side]->last(ra.reported[i], s.start, s.end, false)) {
        pick = ra.reported[i];
        break;
      }
    }
    rep.decided[side] = pick;
    if (pick != no_id) rep.path[side] = trace_back(n, *logs[side], pick, s.start, s.end);
  }

  // A gate moves with its arcs, when it has them.
  auto arc_range = [&](gate_id g) {
    const std::size_t first = n.has_arcs(g) ? n.arc_at[g] : 0;
    return std::pair{first, first + n.arcs_of(g).size()};
  };
  std::vector<std::uint32_t> differing;
  for (gate_id g = 0; g < n.gate_count(); ++g) {
    bool differs = a.rise[g] != b.rise[g] || a.fall[g] != b.fall[g];
    for (auto [k, end] = arc_range(g); k < end; ++k)
      differs = differs || a.arc_rise[k] != b.arc_rise[k] || a.arc_fall[k] != b.arc_fall[k];
    if (differs) differing.push_back(g);
  }
  rep.differing = differing.size();
  delay_table mixed;
  auto flips = [&](const std::vector<std::uint32_t>& moved) {
    mixed = a;
    for (auto g : moved) {
      mixed.rise[g] = b.rise[g], mixed.fall[g] = b.fall[g];
      for (auto [k, end] = arc_range(g); k < end; ++k)
        mixed.arc_rise[k] = b.arc_rise[k], mixed.arc_fall[k] = b.arc_fall[k];
    }
    return outcome_key(run_stimulus(ctx, d, mixed, opt), step) == key_b;
  };
  const auto gates = ddmin(differing, flips, max_tests, &rep.tests);
  rep.minimal = rep.tests < max_tests;
  for (auto g : gates) {
    culprit_gate c;
    c.gate = g;
    c.rise[0] = a.rise[g], c.rise[1] = b.rise[g];
    c.fall[0] = a.fall[g], c.fall[1] = b.fall[g];
    rep.gates.push_back(c);
  }
  return rep;
}

culprit_report find_culprits(const design& d, const run_options& opt, std::size_t step,
                             const corner& a, const corner& b, std::size_t max_tests) {
  delay_table ta, tb;
  fill_delays(d, a, ta);
  fill_delays(d, b, tb);
  const std::string names[2] = {a.name(), b.name()};
  return find_culprits(d, opt, step, ta, tb, names, max_tests);
}

std::string culprit_text(const netlist& n, const culprit_report& r, const std::string& indent) {
  std::string out;
  if (r.gates.empty()) return out;
  out += fmt::format(
      "{}race culprits (ddmin over {} gates, {} runs{}): moving these from {} to {} flips the "
      "outcome\n",
      indent, r.differing, r.tests, r.minimal ? "" : ", budget spent, may not be minimal",
      r.corner[0], r.corner[1]);
  for (const auto& c : r.gates) {
    std::string d = fmt::format("{} -> {}", format_time(c.rise[0]), format_time(c.rise[1]));
    if (c.rise[0] != c.fall[0] || c.rise[1] != c.fall[1])
      d = fmt::format("rise {} -> {}, fall {} -> {}", format_time(c.rise[0]),
                      format_time(c.rise[1]), format_time(c.fall[0]), format_time(c.fall[1]));
    out += fmt::format("{}  {:<20} {:<5} {}\n", indent, n.gate_name(c.gate),
                       kind_name(n.kind[c.gate]), d);
  }
  for (int side = 0; side < 2; ++side) {
    if (r.path[side].empty()) continue;
    std::string chain;
    for (const auto& h : r.path[side])
      chain += fmt::format("{}{} {}@{}", chain.empty() ? "" : " -> ", n.net_name[h.net],
                           to_char(h.value), format_time(h.time));
    out += fmt::format("{}path at {}: {}\n", indent, r.corner[side], chain);
  }
  return out;
}

}  // namespace settle
