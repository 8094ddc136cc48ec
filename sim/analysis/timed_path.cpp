// Timed feasibility of an untimed path: a system of difference constraints
// x_v - x_u <= w over the instants' times, feasible exactly when its
// constraint graph has no negative cycle (Bellman-Ford; Cormen, Leiserson,
// Rivest and Stein, Introduction to Algorithms, 3rd ed., section 24.4).
#include "sim/analysis/timed_path.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <deque>
#include <map>
#include <optional>
#include <set>

#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"

namespace settle {
namespace {

using node = std::size_t;

class difference_system {
 public:
  explicit difference_system(std::size_t nodes) : nodes_(nodes) {}
  node add_node() { return nodes_++; }
  /// x_v - x_u <= w
  void at_most(node u, node v, std::int64_t w) { edges_.push_back({u, v, w}); }
  /// lo <= x_v - x_u <= hi
  void between(node u, node v, std::int64_t lo, std::int64_t hi) {
    at_most(u, v, hi);
    at_most(v, u, -lo);
  }
  /// A solution with x_0 = 0, or nullopt when the constraints contradict.
  std::optional<std::vector<std::int64_t>> solve() const {
    std::vector<std::int64_t> x(nodes_, 0);  // a virtual source at distance 0 from every node
    for (std::size_t round = 0; round <= nodes_; ++round) {
      bool relaxed = false;
      for (const auto& e : edges_)
        if (x[e.u] + e.w < x[e.v]) x[e.v] = x[e.u] + e.w, relaxed = true;
      if (!relaxed) {
        const std::int64_t origin = x[0];
        for (auto& t : x) t -= origin;
        return x;
      }
    }
    return std::nullopt;  // still relaxing after |V| rounds: a negative cycle
  }

 private:
  struct edge {
    node u, v;
    std::int64_t w;
  };
  std::size_t nodes_;
  std::vector<edge> edges_;
};

// An excitation of a gate on one edge, from the instant it began: fired at
// `to`, or over (disabled, or pending at the end) at `to` without firing.
struct excitation {
  gate_id gate;
  bool rise;
  node from, to;
  bool fired;
};
// One scheduled firing of a rule, triggered at `from`: applied at `to`, or
// still pending at `to` (the end).
struct rule_firing {
  std::uint32_t rule;
  std::uint64_t number;
  node from, to;
  bool fired;
};

const delay_range& edge_range(const netlist& n, gate_id g, bool rise) {
  return rise ? n.delay[g].rise : n.delay[g].fall;
}

// How a step's input changes lie in time: one instant, at an absolute time,
// after the previous step's end, or with the step's start (no time written).
struct step_timing {
  bool absolute = false, decided = true;
  time_fs time = 0;
};

step_timing timing_of(const step_spec& s) {
  step_timing t;
  bool seen = false;
  for (const auto& a : s.actions) {
    if (a.what != stim_action::kind::at && a.what != stim_action::kind::after) continue;
    const bool absolute = a.what == stim_action::kind::at;
    if (seen && (absolute != t.absolute || a.time != t.time)) t.decided = false;
    t.absolute = absolute, t.time = a.time, seen = true;
  }
  return t;
}

// Collects the run's value changes, in groups of one instant.
class change_groups : public change_sink {
 public:
  std::vector<std::pair<time_fs, std::set<net_id>>> groups;
  void on_start(std::span<const logic> initial) override {
    values_.assign(initial.begin(), initial.end());
  }
  void on_changes(std::span<const change> batch) override {
    for (const auto& c : batch) {
      const logic before = values_[c.net];
      values_[c.net] = c.value;
      if (before == logic::x || c.value == logic::x) continue;
      if (groups.empty() || groups.back().first != c.time) groups.push_back({c.time, {}});
      groups.back().second.insert(c.net);
    }
  }
  void on_finish(time_fs) override {}

 private:
  std::vector<logic> values_;
};

class path_timer {
 public:
  path_timer(const design& d, const timed_problem& p) : d_(d), n_(d.nets), p_(p) {}

  /// Whether the system with every firing's delay free has a solution
  /// (false too when the path is outside the check's model).
  bool loosely_feasible() {
    std::string why;
    if (p_.instants.empty() || !lay_out(why)) return false;
    return relaxed().solve().has_value();
  }

  timed_check decide() {
    timed_check out;
    if (p_.instants.empty()) return undecided("the path is empty");
    if (!lay_out(out.why)) {
      out.exact = false;
      return out;
    }
    const auto loose = relaxed().solve();
    if (!loose) {
      out.exact = !approximate_;
      out.why = approximate_ ? "no delays within the written ranges give this order of firings "
                               "under the check's model (see the docs for what it does not cover)"
                             : "no delays within the written ranges give this order of firings";
      return out;
    }
    // A gate's firings on one edge share one delay in a corner: fix it at what
    // the first firing took and solve again.
    std::map<std::pair<gate_id, bool>, std::int64_t> shared;
    for (const auto& e : excitations_)
      if (e.fired) shared.emplace(std::pair{e.gate, e.rise}, (*loose)[e.to] - (*loose)[e.from]);
    difference_system tight = base_;
    for (const auto& e : excitations_) bound(tight, e, &shared);
    for (const auto& f : firings_) bound(tight, f);
    const auto x = tight.solve();
    if (!x)
      return undecided(
          "the path needs different delays for one gate's changes on one edge, which one corner "
          "cannot give; the check did not decide");
    out.feasible = true;
    const corner c = corner_of(*x, shared);
    out.corner = c.name();
    out.confirmed = replay(c, *x, out.why);
    return out;
  }

 private:
  timed_check undecided(std::string why) const {
    timed_check t;
    t.exact = false;
    t.why = std::move(why);
    return t;
  }

  static node node_of(std::size_t instant) { return instant + 1; }  // node 0 is time 0

  difference_system relaxed() const {
    difference_system s = base_;
    for (const auto& e : excitations_) bound(s, e, nullptr);
    for (const auto& f : firings_) bound(s, f);
    return s;
  }

  // The constraints every corner must meet to follow the path, and the
  // excitations and firings whose delays the corner chooses.
  bool lay_out(std::string& why) {
    const std::size_t count = p_.instants.size();
    base_ = difference_system(count + 1);
    approximate_ = p_.approximate_start;
    const time_fs horizon = default_horizon(n_);
    std::vector<std::optional<excitation>> open(n_.gate_count());
    std::vector<std::deque<std::pair<node, std::uint64_t>>> queued(d_.stim.rules.size());
    std::vector<std::uint64_t> scheduled(d_.stim.rules.size(), 0);
    node prev_end = 0, boundary = 0;
    bool step_run = false;
    time_fs run_for = 0;
    for (std::size_t i = 0; i < count; ++i) {
      const path_instant& in = p_.instants[i];
      const node at = node_of(i);
      if (in.boundary) {
        if (i > 0) {
          for (const auto& e : open)
            if (e) {
              why = "a step before the finding ends with a gate still excited (an oscillation)";
              return false;
            }
          for (const auto& q : queued)
            if (!q.empty()) {
              why = "a step before the finding ends with an environment firing pending";
              return false;
            }
          if (step_run) {
            const node end = base_.add_node();
            base_.between(boundary, end, static_cast<std::int64_t>(run_for),
                          static_cast<std::int64_t>(run_for));
            prev_end = end;
          }
        }
        const step_spec& spec = d_.stim.steps[in.step];
        const step_timing t = timing_of(spec);
        if (!t.decided) {
          why = fmt::format("step {} changes its inputs at more than one time", in.step + 1);
          return false;
        }
        if (t.absolute) {
          base_.between(0, at, static_cast<std::int64_t>(t.time),
                        static_cast<std::int64_t>(t.time));
          base_.at_most(at, prev_end, 0);  // not before the time already reached
        } else {
          base_.between(prev_end, at, static_cast<std::int64_t>(t.time),
                        static_cast<std::int64_t>(t.time));
        }
        boundary = at;
        prev_end = at;
        step_run = spec.end == step_spec::end_kind::run;
        run_for = spec.run_for;
      } else {
        base_.at_most(at, node_of(i - 1), -1);  // one instant after another
        base_.at_most(boundary, at, static_cast<std::int64_t>(step_run ? run_for : horizon));
        if (!in.changed.empty()) prev_end = at;
      }
      for (gate_id g : in.fired) {
        if (!open[g]) {
          why = fmt::format("gate '{}' fires without being excited", n_.gate_name(g));
          return false;
        }
        open[g]->to = at;
        open[g]->fired = true;
        excitations_.push_back(*open[g]);
        open[g].reset();
      }
      for (gate_id g = 0; g < n_.gate_count(); ++g) {
        if (open[g] && !in.excited[g]) {
          open[g]->to = at;  // disabled before its delay passed
          excitations_.push_back(*open[g]);
          open[g].reset();
        } else if (!open[g] && in.excited[g]) {
          open[g] = excitation{g, in.value[g] == 0, at, at, false};
        }
      }
      for (std::uint32_t r : in.rules_fired) {
        if (queued[r].empty()) {
          why = "an environment firing applies that was never triggered";
          return false;
        }
        firings_.push_back({r, queued[r].front().second, queued[r].front().first, at, true});
        queued[r].pop_front();
      }
      for (std::uint32_t r : in.rules_triggered) queued[r].push_back({at, scheduled[r]++});
    }
    const node last = node_of(count - 1);
    for (auto& e : open)
      if (e) e->to = last, excitations_.push_back(*e);  // still pending at the finding
    for (std::uint32_t r = 0; r < queued.size(); ++r)
      for (const auto& [from, number] : queued[r])
        firings_.push_back({r, number, from, last, false});
    // Transport gates, and arcs (the check times a gate by its envelope), are
    // outside the constraints' model: the replay still judges a feasible path.
    if (!n_.arcs.empty()) approximate_ = true;
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      if (n_.delay[g].transport) approximate_ = true;
    for (const auto& e : excitations_)
      if (edge_range(n_, e.gate, e.rise).min == 0) approximate_ = true;
    for (const auto& f : firings_)
      if (d_.stim.rules[f.rule].delay.min == 0) approximate_ = true;
    firing_count_ = scheduled;
    return true;
  }

  // An excitation's delay: the firing takes it exactly, a cancelled or
  // pending one lasts less. With `shared`, a gate's edge has one delay.
  void bound(difference_system& s, const excitation& e,
             const std::map<std::pair<gate_id, bool>, std::int64_t>* shared) const {
    const delay_range& r = edge_range(n_, e.gate, e.rise);
    std::int64_t lo = static_cast<std::int64_t>(r.min), hi = static_cast<std::int64_t>(r.max);
    if (shared)
      if (auto it = shared->find({e.gate, e.rise}); it != shared->end()) lo = hi = it->second;
    if (e.fired)
      s.between(e.from, e.to, lo, hi);
    else
      s.at_most(e.from, e.to, hi - 1);
  }

  void bound(difference_system& s, const rule_firing& f) const {
    const delay_range& r = d_.stim.rules[f.rule].delay;
    if (f.fired)
      s.between(f.from, f.to, static_cast<std::int64_t>(r.min), static_cast<std::int64_t>(r.max));
    else
      s.at_most(f.from, f.to, static_cast<std::int64_t>(r.max) - 1);
  }

  corner corner_of(const std::vector<std::int64_t>& x,
                   const std::map<std::pair<gate_id, bool>, std::int64_t>& shared) const {
    std::vector<time_fs> rise(n_.gate_count()), fall(n_.gate_count());
    for (gate_id g = 0; g < n_.gate_count(); ++g) {
      // An edge the path never fires lasts as long as it may: every
      // excitation of it that ends without firing then stays unfired.
      auto pick = [&](bool is_rise) {
        const auto it = shared.find({g, is_rise});
        return it != shared.end() ? static_cast<time_fs>(it->second)
                                  : edge_range(n_, g, is_rise).max;
      };
      rise[g] = pick(true);
      fall[g] = pick(false);
    }
    std::vector<std::vector<time_fs>> rules(d_.stim.rules.size());
    for (std::uint32_t r = 0; r < rules.size(); ++r)
      rules[r].assign(firing_count_[r], d_.stim.rules[r].delay.max);
    for (const auto& f : firings_)
      if (f.fired) rules[f.rule][f.number] = static_cast<time_fs>(x[f.to] - x[f.from]);
    return fixed_corner(d_, rise, fall, rules);
  }

  // Runs the corner and compares: the path's instants must be the run's
  // first instants, and the run must show the finding.
  bool replay(const corner& c, const std::vector<std::int64_t>& x, std::string& why) const {
    delay_table table;
    fill_delays(d_, c, table);
    change_groups seen;
    const run_result r = run_stimulus(d_, table, run_options{}, &seen);
    std::vector<std::pair<time_fs, std::set<net_id>>> want;
    for (std::size_t i = 0; i < p_.instants.size(); ++i) {
      const auto& in = p_.instants[i];
      if (in.changed.empty()) continue;
      const auto t = static_cast<time_fs>(x[node_of(i)]);
      if (want.empty() || want.back().first != t) want.push_back({t, {}});
      want.back().second.insert(in.changed.begin(), in.changed.end());
    }
    if (seen.groups.size() < want.size() ||
        !std::equal(want.begin(), want.end(), seen.groups.begin())) {
      why =
          "a run at this corner did not follow the path (the constraints' model differs from "
          "the kernel's here)";
      return false;
    }
    switch (p_.what) {
      case timed_problem::kind::deadlock:
        if (r.steps.size() > p_.step && r.steps[p_.step].status == step_status::deadlock)
          return true;
        why = "a run at this corner followed the path but did not end the step in deadlock";
        return false;
      case timed_problem::kind::property:
        if (p_.property < r.properties.size() && !r.properties[p_.property].holds) return true;
        why = "a run at this corner followed the path but kept the property";
        return false;
      case timed_problem::kind::hazard:
        return true;  // the run's instants are the path's: the gate was disabled as the path says
    }
    return false;
  }

  const design& d_;
  const netlist& n_;
  const timed_problem& p_;
  difference_system base_{1};
  std::vector<excitation> excitations_;
  std::vector<rule_firing> firings_;
  std::vector<std::uint64_t> firing_count_;
  bool approximate_ = false;
};

}  // namespace

timed_check check_timed(const design& d, const timed_problem& p) {
  return path_timer(d, p).decide();
}

bool may_be_timed(const design& d, const timed_problem& p) {
  return path_timer(d, p).loosely_feasible();
}

namespace {

// Every net's value as the run goes, and what it was at a chosen time.
class value_log : public change_sink {
 public:
  void on_start(std::span<const logic> initial) override {
    start_.assign(initial.begin(), initial.end());
    changes_.clear();
  }
  void on_changes(std::span<const change> batch) override {
    changes_.insert(changes_.end(), batch.begin(), batch.end());
  }
  void on_finish(time_fs) override {}
  std::vector<logic> at(time_fs t) const {
    std::vector<logic> v = start_;
    for (const auto& c : changes_) {
      if (c.time > t) break;
      v[c.net] = c.value;
    }
    return v;
  }

 private:
  std::vector<logic> start_;
  std::vector<change> changes_;
};

}  // namespace

std::string sample_corners(const design& d, const timed_problem& p,
                           std::span<const std::uint8_t> gates, std::span<const logic> inputs,
                           std::uint64_t corners) {
  const netlist& n = d.nets;
  const std::uint64_t extremes = 3 + 2 * delay_variables(d);
  delay_table table;
  value_log log;
  run_context ctx(n);
  for (std::uint64_t i = 0; i < corners; ++i) {
    corner c;
    if (i < extremes) {
      c.what = corner::kind::extremes, c.index = i;
    } else {
      c.what = corner::kind::random, c.seed = 1, c.index = i - extremes;
    }
    fill_delays(d, c, table);
    const run_result r = run_stimulus(ctx, d, table, run_options{}, &log);
    if (r.steps.size() <= p.step) continue;
    const step_result& s = r.steps[p.step];
    if (p.what == timed_problem::kind::property) {
      if (p.property < r.properties.size() && !r.properties[p.property].holds &&
          r.properties[p.property].step == p.step + 1)
        return c.name();
      continue;
    }
    if (s.status != step_status::deadlock) continue;
    const std::vector<logic> v = log.at(s.end);
    bool same = true;
    for (gate_id g = 0; g < n.gate_count() && same; ++g)
      same = v[n.gate_out[g]] == from_bool(gates[g]);
    for (std::size_t i = 0; i < n.inputs.size() && same; ++i) same = v[n.inputs[i]] == inputs[i];
    if (same) return c.name();
  }
  return "";
}

}  // namespace settle
