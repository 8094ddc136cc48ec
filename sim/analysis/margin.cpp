// Delay margins by bisection over the spread w, shared between steps; settle-time margins at w = 1.
#include "sim/analysis/margin.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <map>

#include "sim/model/time.hpp"

namespace settle {
namespace {

// What one probe (a sweep at spread w) says about every step.
struct probe_outcome {
  std::vector<bool> pass;               // per step
  std::vector<margin_failure> failure;  // per step (meaningful where !pass)
  std::vector<std::optional<std::pair<corner, corner>>>
      race;  // per step: witnesses of two settled outcomes
  std::vector<bool> first_divergence;
  sweep_result sweep;
};

corner at_spread(const sweep_plan& plan, std::uint64_t i, double w) {
  corner c = plan.corner_at(i);
  c.spread = w;
  return c;
}

margin_failure describe(const sweep_plan& plan, const sweep_step& s, double w) {
  margin_failure f;
  f.spread = w;
  f.step = s.index;
  f.verdict = s.verdict;
  f.corners = plan.corners;
  for (std::size_t e = 0; e < s.expects.size(); ++e) {
    const auto& x = s.expects[e];
    if (x.pass()) continue;
    f.expect_index = e;
    f.witness = at_spread(plan, x.witness, w).name();
    f.detail = x.detail;
    f.failing = x.failing;
    break;
  }
  if (s.verdict == sweep_verdict::nondeterministic && s.outcomes.size() > 1) {
    if (!f.expect_index) {
      f.witness = at_spread(plan, s.outcomes[0].witness, w).name();
      f.failing = plan.corners - s.outcomes[0].count;
      f.detail = fmt::format("{} settled outcomes across corners", s.outcomes.size());
    }
    // The witness of an outcome other than the one the named witness shows.
    const std::uint64_t first =
        f.expect_index ? s.expects[*f.expect_index].witness : s.outcomes[0].witness;
    const auto& other = s.outcomes[0].witness == first ? s.outcomes[1] : s.outcomes[0];
    f.other_witness = at_spread(plan, other.witness, w).name();
  } else if (!f.expect_index) {
    // The first outcome that is not a settled state names the corner.
    for (const auto& o : s.outcomes)
      if (o.status != step_status::settled && o.status != step_status::running) {
        f.witness = at_spread(plan, o.witness, w).name();
        f.failing += o.count;
        if (f.detail.empty())
          f.detail = o.status == step_status::oscillating
                         ? fmt::format("oscillating with period {}", format_time(o.period))
                         : std::string(o.end_of_time ? end_of_time_words : status_name(o.status));
      }
    if (f.witness.empty() && !s.outcomes.empty())
      f.witness = at_spread(plan, s.outcomes[0].witness, w).name();
  }
  return f;
}

// Why a property fails at spread w: its first violating corner.
margin_failure describe_property(const sweep_plan& plan, const sweep_property& p, double w) {
  margin_failure f;
  f.spread = w;
  f.property = p.index;
  f.step = p.step;
  f.corners = plan.corners;
  f.failing = p.violating;
  f.witness = at_spread(plan, p.witness, w).name();
  f.detail = fmt::format("first violation at {} (step {})", format_time(p.first_violation), p.step);
  return f;
}

}  // namespace

std::string spread_percent(double w) {
  std::string s = fmt::format("{:.2f}", 100.0 * w);
  while (s.back() == '0') s.pop_back();
  if (s.back() == '.') s.pop_back();
  return s + "%";
}

std::string margin_result::confidence_note() const {
  if (exact)
    return "exact over the corners searched: exhaustive covers every min/max assignment of the "
           "delay variables "
           "(each gate's rise and fall ranges, each rule's range)";
  if (sampled)
    return "a lower-confidence estimate: random corners can miss a failing corner, so the true "
           "margin may be "
           "smaller; only an exhaustive spec gives an exact figure";
  return "an estimate over the extremes corners only; only an exhaustive spec gives an exact "
         "figure";
}

bool margin_result::passes_as_written() const {
  return std::all_of(steps.begin(), steps.end(),
                     [](const step_margin& s) { return s.at_ceiling || s.margin >= 1.0; }) &&
         std::all_of(properties.begin(), properties.end(),
                     [](const property_margin& p) { return p.at_ceiling || p.margin >= 1.0; });
}

std::optional<margin_result> find_margin(const design& d, const margin_options& o,
                                         std::string* error) {
  const auto started = std::chrono::steady_clock::now();
  auto fail = [&](std::string why) -> std::optional<margin_result> {
    if (error) *error = std::move(why);
    return std::nullopt;
  };
  // The floors keep the bisection grid (ceiling / resolution points) within
  // a million, far from overflow, and the written spread inside the search.
  if (!(o.resolution_pct >= 0.01 && o.resolution_pct <= 100))
    return fail("the resolution must be at least 0.01 and at most 100 percentage points");
  if (!(o.ceiling_pct >= 100 && o.ceiling_pct <= 10000))
    return fail(
        "the search ceiling must be at least 100 (the written spread is always judged) and at most "
        "10000 percent");
  std::string err;
  auto plan = plan_sweep(o.spec, o.seed, delay_variables(d), &err);
  if (!plan) return fail(err);
  if (plan->corners == 0) return fail("the corner spec holds no corner to run");

  margin_result res;
  res.resolution = o.resolution_pct / 100.0;
  res.ceiling = o.ceiling_pct / 100.0;
  res.corners_per_probe = plan->corners;
  res.sampled = plan->sampled > 0;
  res.exact = !res.sampled &&
              std::any_of(plan->items.begin(), plan->items.end(), [](const sweep_plan::item& i) {
                return i.what == corner::kind::exhaustive;
              });

  // One scaled copy of the design: w applied to the ranges is what corner@w
  // does, and the horizon stays the one of the design as written.
  design scaled_d = d;
  sweep_options so;
  so.threads = o.threads;
  so.run = o.run;
  so.stop = o.stop;
  struct halted {};  // a probe was stopped part-way: its verdicts are not used
  // The horizon of the design as written, so that a run at a scaled copy and
  // `settle run --corner NAME@w` stop at the same time.
  if (!so.run.horizon) so.run.horizon = default_horizon(d.nets);
  const std::size_t steps = d.stim.steps.empty() ? 1 : d.stim.steps.size();
  // Brackets: one per step, then one per property.
  const std::size_t entries = steps + d.stim.properties.size();

  std::map<double, probe_outcome> cache;
  auto probe = [&](double w) -> const probe_outcome& {
    auto it = cache.find(w);
    if (it != cache.end()) return it->second;
    // Gates share delay records; scaling each record scales every gate.
    const auto& from = d.nets.delay.records();
    auto& to = scaled_d.nets.delay.records();
    for (std::size_t r = 0; r < from.size(); ++r) {
      to[r].rise = scaled(from[r].rise, w);
      to[r].fall = scaled(from[r].fall, w);
    }
    // The environment's delays widen with the gates' (as `--corner NAME@w` does).
    for (std::size_t r = 0; r < d.stim.rules.size(); ++r)
      scaled_d.stim.rules[r].delay = scaled(d.stim.rules[r].delay, w);
    probe_outcome p;
    if (o.timeout_s > 0) {
      const double left =
          o.timeout_s -
          std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
      if (left <= 0) {
        res.stopped = sweep_stop::timeout;
        throw halted{};
      }
      so.timeout_s = left;
    }
    p.sweep = run_sweep(scaled_d, *plan, so);
    if (p.sweep.stopped != sweep_stop::none) {
      res.stopped = p.sweep.stopped;
      throw halted{};
    }
    res.corner_runs += plan->corners;
    bool all = true;
    for (const auto& s : p.sweep.steps) {
      p.pass.push_back(s.pass);
      p.failure.push_back(s.pass ? margin_failure{} : describe(*plan, s, w));
      p.first_divergence.push_back(s.first_divergence);
      if (const auto race = race_witnesses(s))
        p.race.push_back(
            std::make_pair(at_spread(*plan, race->first, w), at_spread(*plan, race->second, w)));
      else
        p.race.emplace_back();
      all = all && s.pass;
    }
    for (const auto& pr : p.sweep.properties) {
      p.pass.push_back(pr.holds());
      p.failure.push_back(pr.holds() ? margin_failure{} : describe_property(*plan, pr, w));
      p.first_divergence.push_back(false);
      p.race.emplace_back();
      all = all && pr.holds();
    }
    // The pointers into the scaled copy's stimulus are not kept past this probe.
    for (auto& s : p.sweep.steps)
      for (auto& x : s.expects) x.spec = nullptr;
    // Only the written spread's settle times are drawn (histograms): the other
    // probes drop theirs, so the search holds two sweeps' results at most
    // (the budget --max-memory checks).
    if (w != 1.0)
      for (auto& s : p.sweep.steps)
        for (auto& oc : s.outcomes) std::vector<time_fs>().swap(oc.settle_times);
    res.probes.push_back({w, all});
    if (o.progress) o.progress(w, plan->corners, all);
    return cache.emplace(w, std::move(p)).first->second;
  };

  // Bisection on the grid k * resolution, k in [0, K], every step bracketed
  // between a passing lo and a failing hi; one probe updates every bracket it
  // falls in.
  const auto K = static_cast<std::int64_t>(std::llround(o.ceiling_pct / o.resolution_pct));
  auto w_of = [&](std::int64_t k) {
    return k == K ? res.ceiling : static_cast<double>(k) * o.resolution_pct / 100.0;
  };
  std::vector<std::int64_t> lo(entries, -1), hi(entries, -1);
  try {
    {
      const auto& top = probe(w_of(K));
      for (std::size_t k = 0; k < entries; ++k) (top.pass[k] ? lo : hi)[k] = K;
    }
    if (std::any_of(hi.begin(), hi.end(), [](std::int64_t h) { return h >= 0; })) {
      const auto& zero = probe(0.0);
      for (std::size_t k = 0; k < entries; ++k)
        if (hi[k] >= 0) (zero.pass[k] ? lo[k] = 0 : hi[k] = 0);
    }
    for (;;) {
      std::size_t pick = entries;
      for (std::size_t k = 0; k < entries; ++k)
        if (lo[k] >= 0 && hi[k] > lo[k] + 1) {
          pick = k;
          break;
        }
      if (pick == entries) break;
      const std::int64_t mid = (lo[pick] + hi[pick]) / 2;
      const auto& p = probe(w_of(mid));
      for (std::size_t k = 0; k < entries; ++k)
        if (lo[k] >= 0 && lo[k] < mid && mid < hi[k]) (p.pass[k] ? lo[k] : hi[k]) = mid;
    }
  } catch (const halted&) {
    // Keep what the finished probes bracketed.
  }
  const bool stopped = res.stopped != sweep_stop::none;

  // Per-step results, their failures just above the margin, and culprits.
  for (std::size_t k = 0; k < steps; ++k) {
    step_margin sm;
    sm.index = k + 1;
    sm.label = k < d.stim.steps.size() ? d.stim.steps[k].label : "initial";
    sm.at_ceiling = hi[k] < 0 && lo[k] >= 0;
    sm.fails_at_zero = hi[k] == 0;
    sm.margin = lo[k] >= 0 ? w_of(lo[k]) : 0.0;
    if (hi[k] >= 0) {
      const auto& p = cache.at(w_of(hi[k]));
      margin_failure f = p.failure[k];
      if (o.culprits && !stopped && p.race[k] && p.first_divergence[k]) {
        const auto& [a, b] = *p.race[k];
        culprit_report rep = find_culprits(d, so.run, k + 1, a, b, o.culprit_tests);
        res.culprit_runs += rep.tests + 2;
        if (!rep.gates.empty()) f.culprits = std::move(rep);
      }
      sm.failure = std::move(f);
    }
    res.steps.push_back(std::move(sm));
  }
  for (std::size_t q = 0; q < d.stim.properties.size(); ++q) {
    const std::size_t k = steps + q;
    property_margin pm;
    pm.index = q;
    pm.at_ceiling = hi[k] < 0 && lo[k] >= 0;
    pm.fails_at_zero = hi[k] == 0;
    pm.margin = lo[k] >= 0 ? w_of(lo[k]) : 0.0;
    if (hi[k] >= 0) pm.failure = cache.at(w_of(hi[k])).failure[k];
    res.properties.push_back(std::move(pm));
  }
  // The design's margin: the smallest over steps and properties (a step first on a tie).
  const std::optional<margin_failure>* worst_failure = nullptr;
  double worst_margin = 0;
  bool worst_at_zero = false;
  auto consider = [&](double m, bool at_ceiling, bool at_zero,
                      const std::optional<margin_failure>& f) {
    if (at_ceiling || (worst_failure && m >= worst_margin)) return;
    worst_failure = &f, worst_margin = m, worst_at_zero = at_zero;
  };
  for (const auto& s : res.steps) consider(s.margin, s.at_ceiling, s.fails_at_zero, s.failure);
  for (const auto& p : res.properties) consider(p.margin, p.at_ceiling, p.fails_at_zero, p.failure);
  res.at_ceiling = worst_failure == nullptr;
  res.margin = worst_failure ? worst_margin : res.ceiling;
  res.fails_at_zero = worst_failure && worst_at_zero;
  if (worst_failure) res.failure = *worst_failure;

  // Settle-time margins of every `settle within T` at the written spread.
  if (stopped && !cache.count(1.0)) {
    res.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
    return res;
  }
  const auto& written = stopped ? cache.at(1.0) : probe(1.0);
  res.written = written.sweep;
  // The probes cleared their pointers into the scaled copy: the written
  // sweep's expectations point into the design as written (same order).
  for (std::size_t k = 0; k < d.stim.steps.size() && k < res.written.steps.size(); ++k)
    for (std::size_t e = 0; e < res.written.steps[k].expects.size(); ++e)
      res.written.steps[k].expects[e].spec = &d.stim.steps[k].expects[e];
  for (std::size_t k = 0; k < d.stim.steps.size() && k < written.sweep.steps.size(); ++k) {
    const auto& spec = d.stim.steps[k];
    const auto& s = written.sweep.steps[k];
    for (std::size_t e = 0; e < spec.expects.size(); ++e) {
      if (spec.expects[e].what != expectation::kind::within) continue;
      within_margin wm;
      wm.step = k + 1;
      wm.expect_index = e;
      wm.budget = spec.expects[e].hi;
      std::uint64_t slowest = UINT64_MAX;
      for (const auto& oc : s.outcomes) {
        if (oc.status != step_status::settled) {
          wm.unsettled += oc.count;
          continue;
        }
        // The longest settle time; on a tie the lowest-numbered corner.
        if (slowest == UINT64_MAX || oc.settle.max > wm.worst ||
            (oc.settle.max == wm.worst && oc.slowest < slowest))
          wm.worst = oc.settle.max, slowest = oc.slowest;
      }
      if (slowest != UINT64_MAX) wm.worst_corner = plan->corner_at(slowest).name();
      wm.margin_fs = static_cast<std::int64_t>(wm.budget) - static_cast<std::int64_t>(wm.worst);
      res.within.push_back(std::move(wm));
    }
  }
  res.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return res;
}

}  // namespace settle
