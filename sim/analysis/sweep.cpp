// The sweep engine: outcome grouping, verdicts and statistics per step over the corners the
// workers ran (sweep_workers.cpp).
#include "sim/analysis/sweep.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <atomic>
#include <chrono>
#include <cmath>
#include <map>

#include "sim/analysis/sweep_workers.hpp"
#include "sim/model/check.hpp"
#include "sim/model/enum_names.hpp"

namespace settle {
namespace {

using detail::corner_table;
using detail::decode_key;
using detail::expect_acc;
using detail::gauge_acc;
using detail::outcome_registry;
using detail::shared_run;
using detail::spec_of;
using detail::worker_state;

bool settles(step_status s) { return s == step_status::settled || s == step_status::running; }

sweep_verdict verdict_of(const std::vector<sweep_outcome>& outs) {
  if (outs.empty()) return sweep_verdict::timeout;  // a stopped sweep that finished no corner
  bool settled = false, osc = false, other = false, dead = false;
  for (const auto& o : outs) {
    if (settles(o.status))
      settled = true;
    else if (o.status == step_status::oscillating)
      osc = true;
    else if (o.status == step_status::deadlock)
      dead = true;
    else
      other = true;
  }
  // A deadlock in some corners is never hidden behind the others' verdict.
  if (dead) return settled || osc || other ? sweep_verdict::mixed : sweep_verdict::deadlock;
  if (!osc && !other)
    return outs.size() == 1 ? sweep_verdict::deterministic : sweep_verdict::nondeterministic;
  if (!settled && !other) return sweep_verdict::oscillating;
  if (!settled && !osc) return sweep_verdict::timeout;
  return sweep_verdict::mixed;
}

// Groups step k's corners into outcomes, ordered by count, then witness.
std::vector<sweep_outcome> group_step(const sweep_plan& plan, const corner_table& table,
                                      const outcome_registry& reg, std::size_t k,
                                      std::uint64_t corners, std::size_t& sampled_outcomes) {
  const std::size_t steps = table.steps;
  const auto& keys = reg.keys(k);
  std::vector<sweep_outcome> outs(keys.size());
  std::vector<std::vector<time_fs>> times(keys.size());
  std::vector<std::uint8_t> seen_sampled(keys.size(), 0);
  for (std::size_t id = 0; id < keys.size(); ++id) decode_key(keys[id], outs[id]);
  for (std::uint64_t i = 0; i < plan.corners; ++i) {
    if (!table.finished[i]) continue;
    const std::uint32_t id = table.outcome_of[i * steps + k];
    const time_fs t = table.settle_of[i * steps + k];
    if (outs[id].count++ == 0) outs[id].witness = i;  // ascending: the first seen is the lowest
    if (times[id].empty() || t > outs[id].settle.max) outs[id].slowest = i, outs[id].settle.max = t;
    times[id].push_back(t);
    if (plan.is_sampled(i)) seen_sampled[id] = 1;
  }
  sampled_outcomes = 0;
  for (std::size_t id = 0; id < keys.size(); ++id) {
    auto& o = outs[id];
    auto& t = times[id];
    sampled_outcomes += seen_sampled[id];
    SETTLE_CHECK(!t.empty(), "an outcome is registered only by a corner that finished");
    std::sort(t.begin(), t.end());
    o.settle = {t.front(), t[(t.size() - 1) / 2], t.back()};
    o.settle_times = std::move(t);
    o.share = static_cast<double>(o.count) / static_cast<double>(corners);
    o.share_ci95 = wilson_interval(o.count, corners, 0.95);
    o.witness_name = plan.corner_at(o.witness).name();
  }
  std::sort(outs.begin(), outs.end(), [](const sweep_outcome& a, const sweep_outcome& b) {
    return a.count != b.count ? a.count > b.count : a.witness < b.witness;
  });
  return outs;
}

// Findings of a step: its verdict, then every expectation over every corner.
bool step_passes(const sweep_step& st) {
  for (const auto& e : st.expects)
    if (!e.pass()) return false;
  for (const auto& o : st.outcomes)
    if (!o.unknown.empty()) return false;
  switch (st.verdict) {
    case sweep_verdict::deterministic:
      return true;
    case sweep_verdict::nondeterministic:
      return st.run_step;  // a `run` window samples a moving circuit
    case sweep_verdict::oscillating:
      return std::any_of(st.expects.begin(), st.expects.end(), [](const sweep_expect& e) {
        return e.spec->what == expectation::kind::oscillating;
      });
    default:
      return false;
  }
}

// `interval` alone: the min-max run is the only judge. A step is proven
// deterministic when every reported net ends binary in a settled run (the run
// covers every delay assignment in range, Breuer and Friedman 1976); otherwise
// nothing is known either way, so the step is inconclusive. An expectation
// holds when the run passes it: its binary values are those of every corner.
void judge_by_interval(const step_spec* spec, const std::optional<interval_result>& iv,
                       std::size_t k, std::size_t reported, sweep_step& st) {
  if (iv && k < iv->steps.size()) {
    st.interval = iv->steps[k];
  } else {  // the run stopped before this step (--max-events)
    interval_step none;
    none.status = step_status::event_limit;
    none.values.assign(reported, logic::x);
    st.interval = std::move(none);
  }
  const interval_step& is = *st.interval;
  st.verdict = is.proven ? sweep_verdict::deterministic : sweep_verdict::inconclusive;
  const std::size_t n_expects = spec ? spec->expects.size() : 0;
  for (std::size_t e = 0; e < n_expects; ++e) {
    sweep_expect x;
    x.spec = &spec->expects[e];
    x.by_interval = true;
    if (x.spec->what == expectation::kind::deterministic) {
      x.proven = is.proven;
      if (!x.proven) x.detail = "the interval run does not prove the step deterministic";
    } else if (e < is.expects.size()) {
      x.proven = is.expects[e].pass;
      if (!x.proven) x.detail = "interval run: " + is.expects[e].detail;
    } else {
      x.detail = "the interval run stopped before this step";
    }
    st.expects.push_back(std::move(x));
  }
  st.pass = step_passes(st);
}

// Properties and gauges over the finished corners, merged from every worker.
// The result does not depend on which worker ran which corner: counts add up,
// extremes keep the lower corner on a tie, and the median is taken over the
// per-corner means in corner order.
void gather_closed_loop(const design& d, const sweep_plan& plan,
                        const std::vector<worker_state>& workers, const corner_table& table,
                        sweep_result& res) {
  for (std::uint32_t p = 0; p < d.stim.properties.size(); ++p) {
    sweep_property sp;
    sp.index = p;
    std::uint64_t first = UINT64_MAX;
    for (const auto& w : workers) {
      if (p >= w.properties.size()) continue;
      const auto& a = w.properties[p];
      sp.violating += a.violating;
      if (a.first < first) first = a.first, sp.first_violation = a.at, sp.step = a.step;
    }
    if (sp.violating) sp.witness = first, sp.witness_name = plan.corner_at(first).name();
    res.properties.push_back(std::move(sp));
  }
  const std::size_t n_gauges = d.stim.gauges.size();
  std::vector<double> means;
  for (std::uint32_t g = 0; g < n_gauges; ++g) {
    sweep_gauge sg;
    sg.index = g;
    gauge_acc all;
    for (const auto& w : workers) {
      if (g >= w.gauges.size() || w.gauges[g].corners == 0) continue;
      const auto& a = w.gauges[g];
      all.corners += a.corners;
      all.samples += a.samples;
      all.add(a.min, a.min_at, a.max, a.max_at);
    }
    sg.corners = all.corners;
    sg.samples = all.samples;
    if (all.corners) {
      sg.min = all.min, sg.max = all.max;
      sg.witness_min = all.min_at, sg.witness_max = all.max_at;
      sg.witness_min_name = plan.corner_at(all.min_at).name();
      sg.witness_max_name = plan.corner_at(all.max_at).name();
      means.clear();
      for (std::uint64_t i = 0; i < plan.corners; ++i) {
        if (!table.finished[i]) continue;
        const double m = table.gauge_mean_of[i * n_gauges + g];
        if (!std::isnan(m)) means.push_back(m);
      }
      // The lower median, the ((n-1)/2)-th smallest, as for settle times.
      const auto mid = means.begin() + static_cast<std::ptrdiff_t>((means.size() - 1) / 2);
      std::nth_element(means.begin(), mid, means.end());
      sg.median = *mid;
    }
    res.gauges.push_back(std::move(sg));
  }
  const auto budgets = detail::element_budgets(d);
  for (std::uint32_t e = 0; e < d.nets.meta.size(); ++e) {
    sweep_element se;
    se.index = e;
    detail::element_acc all;
    all.exceeded.assign(budgets[e].size(), 0);
    all.model.assign(budgets[e].size(), 0);
    for (const auto& w : workers) {
      if (e >= w.elements.size()) continue;
      const auto& a = w.elements[e];
      all.resolutions += a.resolutions, all.inside += a.inside, all.drawn += a.drawn;
      if (a.longest_at != UINT64_MAX) all.add_longest(a.longest, a.longest_at);
      for (std::size_t b = 0; b < a.exceeded.size(); ++b)
        all.exceeded[b] += a.exceeded[b], all.model[b] += a.model[b];
    }
    se.resolutions = all.resolutions, se.inside = all.inside, se.drawn = all.drawn;
    if (all.longest_at != UINT64_MAX) {
      se.longest = all.longest, se.witness = all.longest_at;
      se.witness_name = plan.corner_at(all.longest_at).name();
    }
    for (std::size_t b = 0; b < budgets[e].size(); ++b) {
      sweep_element::budget sb;
      sb.within = budgets[e][b];
      sb.exceeded = all.exceeded[b];
      sb.share =
          res.corners ? static_cast<double>(sb.exceeded) / static_cast<double>(res.corners) : 0;
      sb.share_ci95 = wilson_interval(sb.exceeded, res.corners, 0.95);
      sb.model_share = res.corners
                           ? static_cast<double>(all.model[b]) / detail::element_acc::model_unit /
                                 static_cast<double>(res.corners)
                           : 0;
      se.budgets.push_back(sb);
    }
    res.elements.push_back(std::move(se));
  }
}

// The rules owed at each deadlocked outcome's witness, and how far each timed-out
// outcome's witness got: one replay per witness
// corner (outcomes only keep their end state while the corners run).
void replay_owed(const design& d, const sweep_plan& plan, const run_options& opt,
                 sweep_result& res) {
  std::map<std::uint64_t, run_result> replays;
  delay_table table;
  // A timeout runs to its time limit: its explanation is worth a bounded
  // number of replays (the deadlocks' owed rules are always replayed).
  constexpr std::size_t timeout_replays = 32;
  std::size_t timeouts = 0;
  for (auto& st : res.steps)
    for (auto& o : st.outcomes) {
      const bool timeout = o.status == step_status::timeout && !o.end_of_time;
      if (o.status != step_status::deadlock && !timeout) continue;
      auto it = replays.find(o.witness);
      if (it == replays.end()) {
        if (o.status != step_status::deadlock && timeouts++ >= timeout_replays) continue;
        fill_delays(d, plan.corner_at(o.witness), table);
        it = replays.emplace(o.witness, run_stimulus(d, table, opt)).first;
      }
      const auto& steps = it->second.steps;
      if (st.index - 1 >= steps.size()) continue;
      const auto& w = steps[st.index - 1];
      o.owed = w.owed;
      if (timeout)
        o.reached = w.end - w.start, o.events = w.events, o.values_repeat_at = w.values_repeat_at,
        o.values_period = w.values_period;
    }
}

// The random and gauss corners that finished.
std::uint64_t sampled_finished(const sweep_plan& plan, const corner_table& table,
                               sweep_stop stopped) {
  if (stopped == sweep_stop::none) return plan.sampled;
  std::uint64_t sampled = 0;
  for (std::uint64_t i = 0; i < plan.corners; ++i)
    sampled += table.finished[i] && plan.is_sampled(i);
  return sampled;
}

// What judging a step over the finished corners reads.
struct corner_judge {
  const sweep_plan& plan;
  const corner_table& table;
  const outcome_registry& registry;
  const std::vector<worker_state>& workers;
  std::uint64_t corners;  // finished
  std::uint64_t sampled;  // finished random and gauss corners
  bool allow_x;
  const std::vector<net_id>& reported;
};

// Expectation e of step st (the step's k-th) over the corners. `expect
// deterministic` is judged from the outcomes: the corners outside the most
// common one fail it. Any other kind from the workers' accumulators: the
// corners where it failed, the lowest of them and why.
sweep_expect judge_expect(const corner_judge& j, const sweep_step& st, std::size_t k,
                          const expectation& spec, std::size_t e) {
  sweep_expect x;
  x.spec = &spec;
  if (spec.what == expectation::kind::deterministic) {
    if (st.verdict != sweep_verdict::deterministic && !st.outcomes.empty()) {
      const bool several = st.outcomes.size() > 1;
      x.failing = several ? j.corners - st.outcomes[0].count : j.corners;
      x.witness = st.outcomes[several ? 1 : 0].witness;
      for (std::size_t o = 1; o < st.outcomes.size(); ++o)
        x.witness = std::min(x.witness, st.outcomes[o].witness);
      x.witness_name = j.plan.corner_at(x.witness).name();
      x.detail = fmt::format("the step is {} across corners", verdict_name(st.verdict));
    }
    return x;
  }
  expect_acc acc;
  for (const auto& w : j.workers) {
    if (k >= w.expects.size() || e >= w.expects[k].size()) continue;
    const auto& a = w.expects[k][e];
    acc.failing += a.failing;
    if (a.first < acc.first) acc.first = a.first, acc.detail = a.detail;
  }
  x.failing = acc.failing;
  if (acc.failing) {
    x.witness = acc.first;
    x.witness_name = j.plan.corner_at(acc.first).name();
    x.detail = acc.detail;
  }
  return x;
}

// Step k over the finished corners: its outcomes and verdict, whether it is
// the first to diverge (`divergence`: the first divergent step so far, 0 for
// none, updated here), the rule-of-three bound, and its expectations.
void judge_by_corners(const corner_judge& j, const step_spec* spec, std::size_t k,
                      std::size_t& divergence, sweep_step& st) {
  std::size_t sampled_outcomes = 0;
  st.outcomes = group_step(j.plan, j.table, j.registry, k, j.corners, sampled_outcomes);
  st.verdict = verdict_of(st.outcomes);
  if (!j.allow_x)
    for (auto& o : st.outcomes)
      if (o.status != step_status::oscillating)
        o.unknown = unknown_at_end(spec, j.reported, o.values);
  if (divergence) st.inherits = divergence;
  // A step every corner deadlocks in has not diverged: it is stuck alike everywhere.
  else if (st.verdict != sweep_verdict::deterministic && st.verdict != sweep_verdict::deadlock)
    st.first_divergence = true, divergence = st.index;
  if (j.sampled > 0 && sampled_outcomes == 1) st.unseen_outcome_bound = rule_of_three(j.sampled);
  const std::size_t n_expects = spec ? spec->expects.size() : 0;
  for (std::size_t e = 0; e < n_expects; ++e)
    st.expects.push_back(judge_expect(j, st, k, spec->expects[e], e));
}

}  // namespace

std::optional<std::pair<std::uint64_t, std::uint64_t>> race_witnesses(const sweep_step& s) {
  const sweep_outcome* settled[2] = {nullptr, nullptr};
  for (const auto& oc : s.outcomes) {
    if (oc.status != step_status::settled) continue;
    if (settled[0]) {
      settled[1] = &oc;
      return std::pair{settled[0]->witness, settled[1]->witness};
    }
    settled[0] = &oc;
  }
  return std::nullopt;
}

const char* verdict_name(sweep_verdict v) {
  static constexpr const char* names[] = {"deterministic", "nondeterministic", "oscillating",
                                          "mixed",         "timeout",          "inconclusive",
                                          "deadlock"};
  return enum_name<sweep_verdict::deadlock>(v, names);
}

bool sweep_result::pass() const {
  return stopped == sweep_stop::none &&
         std::all_of(steps.begin(), steps.end(), [](const sweep_step& s) { return s.pass; }) &&
         std::all_of(properties.begin(), properties.end(),
                     [](const sweep_property& p) { return p.holds(); });
}

sweep_result run_sweep(const design& d, const sweep_plan& plan, const sweep_options& opt) {
  const auto started = std::chrono::steady_clock::now();
  sweep_result res;
  res.planned = plan.corners;
  const std::size_t steps = d.stim.steps.empty() ? 1 : d.stim.steps.size();
  res.threads = detail::pool_size(opt, plan);

  corner_table table(plan.corners, steps, d.stim.gauges.size());
  outcome_registry registry(steps);
  std::atomic<std::uint64_t> next{0}, done{0};
  std::atomic<bool> halt{false};
  run_options ro = opt.run;
  ro.stop = &halt;
  shared_run shared{d, plan, ro, table, halt, registry, next, done};
  std::vector<worker_state> workers(res.threads);
  res.stopped = detail::run_pool(shared, workers, opt, halt, started);
  detail::merge_workers(workers, res);
  res.corners = done.load();

  std::optional<interval_result> iv;
  if (plan.interval && res.stopped == sweep_stop::none) iv = run_interval(d, opt.run);
  if (iv && res.reported.empty()) res.reported = iv->reported;  // `interval` alone: no corner ran

  const corner_judge judge{plan,
                           table,
                           registry,
                           workers,
                           res.corners,
                           sampled_finished(plan, table, res.stopped),
                           opt.run.allow_x,
                           res.reported};
  std::size_t divergence = 0;
  for (std::size_t k = 0; k < steps; ++k) {
    sweep_step st;
    st.index = k + 1;
    const step_spec* spec = spec_of(d, k);
    st.label = spec ? spec->label : "initial";
    st.run_step = spec && spec->end == step_spec::end_kind::run;
    if (plan.interval_only()) {
      judge_by_interval(spec, iv, k, res.reported.size(), st);
    } else {
      judge_by_corners(judge, spec, k, divergence, st);
      if (iv && k < iv->steps.size()) st.interval = iv->steps[k];
      st.pass = step_passes(st);
    }
    res.steps.push_back(std::move(st));
  }
  if (!plan.interval_only()) {
    gather_closed_loop(d, plan, workers, table, res);
    if (res.stopped == sweep_stop::none) replay_owed(d, plan, opt.run, res);
  }
  res.wall_s = std::chrono::duration<double>(std::chrono::steady_clock::now() - started).count();
  return res;
}

}  // namespace settle
