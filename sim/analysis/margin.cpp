// Delay margins by bisection over the spread w, shared between steps; settle-time margins at w = 1.
#include "sim/analysis/margin.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <chrono>
#include <cmath>
#include <map>

#include "sim/model/check.hpp"
#include "sim/model/time.hpp"

namespace settle {
namespace {

// What one probe (a sweep at spread w) says about every entry: each step,
// then each property.
struct probe_outcome {
  std::vector<bool> pass;
  std::vector<margin_failure> failure;  // meaningful where !pass
  // Steps: the witnesses of two settled outcomes; properties: none.
  std::vector<std::optional<std::pair<corner, corner>>> race;
  std::vector<bool> first_divergence;  // properties: false
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

// The options' own checks, made before any corner runs. The floors keep the
// bisection grid (ceiling / resolution points) within a million, far from
// overflow, and the written spread inside the search.
std::optional<std::string> options_error(const margin_options& o) {
  if (!(o.resolution_pct >= 0.01 && o.resolution_pct <= 100))
    return "the resolution must be at least 0.01 and at most 100 percentage points";
  if (!(o.ceiling_pct >= 100 && o.ceiling_pct <= 10000))
    return "the search ceiling must be at least 100 (the written spread is always judged) and at "
           "most 10000 percent";
  return std::nullopt;
}

// Every delay of `d` scaled by w, written into `out` (a copy of d): what
// corner@w does to the gates' ranges and to the environment's (as
// `--corner NAME@w` does). Gates share delay records, so scaling each record
// scales every gate.
void scale_delays(const design& d, double w, design& out) {
  const auto& from = d.nets.delay.records();
  auto& to = out.nets.delay.records();
  for (std::size_t r = 0; r < from.size(); ++r) {
    to[r].rise = scaled(from[r].rise, w);
    to[r].fall = scaled(from[r].fall, w);
  }
  for (std::size_t a = 0; a < d.nets.arcs.size(); ++a) {
    out.nets.arcs[a].rise = scaled(d.nets.arcs[a].rise, w);
    out.nets.arcs[a].fall = scaled(d.nets.arcs[a].fall, w);
  }
  for (std::size_t r = 0; r < d.stim.rules.size(); ++r)
    out.stim.rules[r].delay = scaled(d.stim.rules[r].delay, w);
}

// What a finished sweep at spread w says about every step, then every property.
probe_outcome judge_probe(const sweep_plan& plan, sweep_result sweep, double w) {
  probe_outcome p;
  for (const auto& s : sweep.steps) {
    p.pass.push_back(s.pass);
    p.failure.push_back(s.pass ? margin_failure{} : describe(plan, s, w));
    p.first_divergence.push_back(s.first_divergence);
    if (const auto race = race_witnesses(s))
      p.race.push_back(
          std::make_pair(at_spread(plan, race->first, w), at_spread(plan, race->second, w)));
    else
      p.race.emplace_back();
  }
  for (const auto& pr : sweep.properties) {
    p.pass.push_back(pr.holds());
    p.failure.push_back(pr.holds() ? margin_failure{} : describe_property(plan, pr, w));
    p.first_divergence.push_back(false);
    p.race.emplace_back();
  }
  // The pointers into the scaled copy's stimulus are not kept past this probe.
  for (auto& s : sweep.steps)
    for (auto& x : s.expects) x.spec = nullptr;
  // Only the written spread's settle times are drawn (histograms): the other
  // probes drop theirs, so the search holds two sweeps' results at most
  // (the budget --max-memory checks).
  if (w != 1.0)
    for (auto& s : sweep.steps)
      for (auto& oc : s.outcomes) std::vector<time_fs>().swap(oc.settle_times);
  p.sweep = std::move(sweep);
  return p;
}

// Runs the sweeps of one search, each spread once: a scaled copy of the
// design swept over the plan's corners, judged, and kept. It records in the
// result every probe that finished (probes, corner_runs) and why the search
// stopped, if it did.
class prober {
 public:
  prober(const design& d, const sweep_plan& plan, const margin_options& o,
         std::chrono::steady_clock::time_point started, margin_result& res)
      : d_(d), scaled_(d), plan_(plan), o_(o), started_(started), res_(res) {
    so_.threads = o.threads;
    so_.run = o.run;
    so_.stop = o.stop;
    // The horizon of the design as written, so that a run at a scaled copy
    // and `settle run --corner NAME@w` stop at the same time.
    if (!so_.run.horizon) so_.run.horizon = default_horizon(d.nets);
  }

  // The outcome at spread w, from the cache when it was probed before. Null
  // when the search is stopped (signal or wall-clock budget) before or during
  // this probe: res.stopped then says why, and the probe's verdicts are not used.
  const probe_outcome* probe(double w) {
    if (const auto* known = probed(w)) return known;
    scale_delays(d_, w, scaled_);
    if (o_.timeout_s > 0) {
      const double left =
          o_.timeout_s -
          std::chrono::duration<double>(std::chrono::steady_clock::now() - started_).count();
      if (left <= 0) {
        res_.stopped = sweep_stop::timeout;
        return nullptr;
      }
      so_.timeout_s = left;
    }
    sweep_result sweep = run_sweep(scaled_, plan_, so_);
    if (sweep.stopped != sweep_stop::none) {
      res_.stopped = sweep.stopped;
      return nullptr;
    }
    res_.corner_runs += plan_.corners;
    probe_outcome p = judge_probe(plan_, std::move(sweep), w);
    const bool all = std::all_of(p.pass.begin(), p.pass.end(), [](bool b) { return b; });
    res_.probes.push_back({w, all});
    if (o_.progress) o_.progress(w, plan_.corners, all);
    return &cache_.emplace(w, std::move(p)).first->second;
  }

  // The outcome at spread w if a probe there finished, else null.
  const probe_outcome* probed(double w) const {
    const auto it = cache_.find(w);
    return it != cache_.end() ? &it->second : nullptr;
  }

  // The outcome at spread w, which a bracket's end says was probed.
  const probe_outcome& finished(double w) const {
    const auto* p = probed(w);
    SETTLE_CHECK(p, "every end of a bracket is a probe that finished");
    return *p;
  }

  // The run options of every probe (the culprit search runs with them too).
  const run_options& run() const { return so_.run; }

 private:
  const design& d_;
  design scaled_;
  const sweep_plan& plan_;
  const margin_options& o_;
  std::chrono::steady_clock::time_point started_;
  margin_result& res_;
  sweep_options so_;
  std::map<double, probe_outcome> cache_;
};

// The spreads a search may probe: k * resolution for k in [0, K], the last
// of them being the ceiling itself.
struct spread_grid {
  std::int64_t points = 0;  // K
  double resolution_pct = 1.0, ceiling = 1.0;
  double at(std::int64_t k) const {
    return k == points ? ceiling : static_cast<double>(k) * resolution_pct / 100.0;
  }
};

// Every entry (each step, then each property) bracketed on the grid between
// the highest point found passing (lo) and the lowest found failing (hi);
// -1: none found.
struct brackets {
  std::vector<std::int64_t> lo, hi;
};

// Bisection: the top of the grid, then 0 when something fails at the top,
// then the middle of the first bracket still wider than one point, until none
// is; one probe updates every bracket it falls in. Stops early when a probe
// is stopped, keeping what the finished probes bracketed.
brackets bisect(prober& pr, const spread_grid& grid, std::size_t entries) {
  brackets b{std::vector<std::int64_t>(entries, -1), std::vector<std::int64_t>(entries, -1)};
  auto& [lo, hi] = b;
  const auto* top = pr.probe(grid.at(grid.points));
  if (!top) return b;
  SETTLE_CHECK(top->pass.size() == entries, "a probe judges every step and every property");
  for (std::size_t k = 0; k < entries; ++k) (top->pass[k] ? lo : hi)[k] = grid.points;
  if (std::any_of(hi.begin(), hi.end(), [](std::int64_t h) { return h >= 0; })) {
    const auto* zero = pr.probe(0.0);
    if (!zero) return b;
    for (std::size_t k = 0; k < entries; ++k)
      if (hi[k] >= 0) (zero->pass[k] ? lo[k] = 0 : hi[k] = 0);
  }
  for (;;) {
    std::size_t pick = entries;
    for (std::size_t k = 0; k < entries; ++k)
      if (lo[k] >= 0 && hi[k] > lo[k] + 1) {
        pick = k;
        break;
      }
    if (pick == entries) return b;
    const std::int64_t mid = (lo[pick] + hi[pick]) / 2;
    const auto* p = pr.probe(grid.at(mid));
    if (!p) return b;
    for (std::size_t k = 0; k < entries; ++k)
      if (lo[k] >= 0 && lo[k] < mid && mid < hi[k]) (p->pass[k] ? lo[k] : hi[k]) = mid;
  }
}

// An entry's margin from its bracket (a step_margin or a property_margin).
template <class Margin>
void set_margin(Margin& m, std::int64_t lo, std::int64_t hi, const spread_grid& grid) {
  m.at_ceiling = hi < 0 && lo >= 0;
  m.fails_at_zero = hi == 0;
  m.margin = lo >= 0 ? grid.at(lo) : 0.0;
}

// Each step's margin and its failure at the smallest failing spread probed;
// there, when two settled outcomes diverge first in that step, the gates
// whose delays decide between them (not when the search was stopped).
void collect_steps(const design& d, const margin_options& o, const prober& pr,
                   const spread_grid& grid, const brackets& b, std::size_t steps, bool stopped,
                   margin_result& res) {
  for (std::size_t k = 0; k < steps; ++k) {
    step_margin sm;
    sm.index = k + 1;
    sm.label = k < d.stim.steps.size() ? d.stim.steps[k].label : "initial";
    set_margin(sm, b.lo[k], b.hi[k], grid);
    if (b.hi[k] >= 0) {
      const probe_outcome& p = pr.finished(grid.at(b.hi[k]));
      margin_failure f = p.failure[k];
      if (o.culprits && !stopped && p.race[k] && p.first_divergence[k]) {
        const auto& [a, c] = *p.race[k];
        culprit_report rep = find_culprits(d, pr.run(), k + 1, a, c, o.culprit_tests);
        res.culprit_runs += rep.tests + 2;
        if (!rep.gates.empty()) f.culprits = std::move(rep);
      }
      sm.failure = std::move(f);
    }
    res.steps.push_back(std::move(sm));
  }
}

// Each property's margin and its failure at the smallest violating spread probed.
void collect_properties(const design& d, const prober& pr, const spread_grid& grid,
                        const brackets& b, std::size_t steps, margin_result& res) {
  for (std::size_t q = 0; q < d.stim.properties.size(); ++q) {
    const std::size_t k = steps + q;
    property_margin pm;
    pm.index = q;
    set_margin(pm, b.lo[k], b.hi[k], grid);
    if (b.hi[k] >= 0) pm.failure = pr.finished(grid.at(b.hi[k])).failure[k];
    res.properties.push_back(std::move(pm));
  }
}

// The design's margin: the smallest over steps and properties (a step first on a tie).
void take_smallest(margin_result& res) {
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
}

// Settle-time margins of every `settle within T` at the written spread.
void collect_within(const design& d, const sweep_plan& plan, const sweep_result& written,
                    margin_result& res) {
  for (std::size_t k = 0; k < d.stim.steps.size() && k < written.steps.size(); ++k) {
    const auto& spec = d.stim.steps[k];
    const auto& s = written.steps[k];
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
      if (slowest != UINT64_MAX) wm.worst_corner = plan.corner_at(slowest).name();
      wm.margin_fs = static_cast<std::int64_t>(wm.budget) - static_cast<std::int64_t>(wm.worst);
      res.within.push_back(std::move(wm));
    }
  }
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
  if (auto why = options_error(o)) return fail(std::move(*why));
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

  prober pr(d, *plan, o, started, res);
  const std::size_t steps = d.stim.steps.empty() ? 1 : d.stim.steps.size();
  const spread_grid grid{static_cast<std::int64_t>(std::llround(o.ceiling_pct / o.resolution_pct)),
                         o.resolution_pct, res.ceiling};
  const brackets b = bisect(pr, grid, steps + d.stim.properties.size());
  const bool stopped = res.stopped != sweep_stop::none;
  collect_steps(d, o, pr, grid, b, steps, stopped, res);
  collect_properties(d, pr, grid, b, steps, res);
  take_smallest(res);
  // A stopped search reports the written spread only when it was probed.
  if (const auto* written = stopped ? pr.probed(1.0) : pr.probe(1.0)) {
    res.written = written->sweep;
    // The probes cleared their pointers into the scaled copy: the written
    // sweep's expectations point into the design as written (same order).
    for (std::size_t k = 0; k < d.stim.steps.size() && k < res.written.steps.size(); ++k)
      for (std::size_t e = 0; e < res.written.steps[k].expects.size(); ++e)
        res.written.steps[k].expects[e].spec = &d.stim.steps[k].expects[e];
    collect_within(d, *plan, written->sweep, res);
  }
  res.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return res;
}

}  // namespace settle
