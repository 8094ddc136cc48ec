// The sweep's workers: each takes corners from a shared counter, runs them and records them.
#include "sim/analysis/sweep_workers.hpp"

#include <algorithm>
#include <cmath>
#include <cstring>
#include <thread>

namespace settle::detail {
namespace {

// An outcome as bytes: status (0x40 set for a timeout at the end of
// representable time), period (oscillating only), then the values.
constexpr char end_of_time_bit = 0x40;
std::string key_of(step_status status, time_fs period, const std::vector<logic>& values,
                   bool end_of_time = false) {
  std::string k(1 + sizeof(time_fs) + values.size(), '\0');
  k[0] = static_cast<char>(static_cast<char>(status) | (end_of_time ? end_of_time_bit : 0));
  if (status != step_status::oscillating) period = 0;
  std::memcpy(k.data() + 1, &period, sizeof period);
  for (std::size_t i = 0; i < values.size(); ++i)
    k[1 + sizeof(time_fs) + i] = static_cast<char>(values[i]);
  return k;
}

// Sizes a worker's accumulators for the design's steps, properties and gauges.
void prepare(const design& d, std::size_t steps, worker_state& w) {
  w.cache.resize(steps);
  w.expects.resize(steps);
  for (std::size_t k = 0; k < steps; ++k) {
    const step_spec* spec = spec_of(d, k);
    w.expects[k].resize(spec ? spec->expects.size() : 0);
  }
  w.properties.resize(d.stim.properties.size());
  w.gauges.resize(d.stim.gauges.size());
  const auto budgets = element_budgets(d);
  w.elements.resize(d.nets.meta.size());
  for (std::size_t e = 0; e < budgets.size(); ++e) {
    w.elements[e].exceeded.assign(budgets[e].size(), 0);
    w.elements[e].model.assign(budgets[e].size(), 0);
  }
}

// Corner i's resolutions of each metastable element: counts, the longest, and
// per budget whether one exceeded it and the model's chance that one would.
void record_elements(const design& d, const std::vector<std::vector<time_fs>>& budgets,
                     worker_state& w, std::uint64_t i, const run_result& r,
                     const delay_table& table) {
  const netlist& n = d.nets;
  for (const auto& st : r.steps)
    for (const auto& res : st.resolutions) {
      auto& acc = w.elements[n.meta_at[res.gate]];
      ++acc.resolutions;
      acc.inside += res.near;
      acc.drawn += res.drawn;
      acc.add_longest(res.time(), i);
    }
  for (std::size_t e = 0; e < budgets.size(); ++e) {
    auto& acc = w.elements[e];
    const double tau = static_cast<double>(table.tau[e]);
    for (std::size_t b = 0; b < budgets[e].size(); ++b) {
      const time_fs within = budgets[e][b];
      bool over = false;
      double none = 1;  // the model's chance that no resolution exceeds the budget
      for (const auto& st : r.steps)
        for (const auto& res : st.resolutions) {
          if (n.meta_at[res.gate] != e) continue;
          over = over || res.time() > within;
          if (!res.drawn) {
            if (res.time() > within) none = 0;
          } else if (within < res.delay || tau == 0) {
            if (within < res.delay) none = 0;
          } else {
            none *= 1 - std::min(1.0, std::exp(-static_cast<double>(within - res.delay) / tau));
          }
        }
      acc.exceeded[b] += over;
      acc.model[b] +=
          static_cast<std::uint64_t>(std::llround((1 - none) * element_acc::model_unit));
    }
  }
}

// Corner i's steps: each one's outcome id and settle time in the table, and
// its failing expectations in the worker's accumulators. `unknown` is a
// buffer for the outcome of a step the run did not reach.
void record_steps(shared_run& s, worker_state& w, std::uint64_t i, const run_result& r,
                  std::vector<logic>& unknown) {
  const std::size_t steps = s.table.steps;
  unknown.assign(r.reported.size(), logic::x);
  for (std::size_t k = 0; k < steps; ++k) {
    const bool ran = k < r.steps.size();
    // A run stopped by --max-events has no later steps: they count as stopped.
    const std::string key = ran ? key_of(r.steps[k].status, r.steps[k].period, r.steps[k].values,
                                         r.steps[k].end_of_time)
                                : key_of(step_status::event_limit, 0, unknown);
    auto& cache = w.cache[k];
    auto it = cache.find(key);
    const std::uint32_t id =
        it != cache.end() ? it->second : cache.emplace(key, s.registry.id(k, key)).first->second;
    s.table.outcome_of[i * steps + k] = id;
    // An oscillating step's time is when its repeat was detected, not a settle time.
    s.table.settle_of[i * steps + k] = !ran ? 0
                                       : r.steps[k].status == step_status::oscillating
                                           ? r.steps[k].end - r.steps[k].start
                                           : r.steps[k].settle;
    auto& accs = w.expects[k];
    for (std::size_t e = 0; e < accs.size(); ++e) {
      const bool pass = ran && e < r.steps[k].expects.size() && r.steps[k].expects[e].pass;
      if (pass) continue;
      ++accs[e].failing;
      if (i < accs[e].first) {
        accs[e].first = i;
        accs[e].detail =
            ran ? r.steps[k].expects[e].detail : "the run stopped before this step (event limit)";
      }
    }
  }
}

// Corner i's properties and gauges: violations and extremes in the worker's
// accumulators, each gauge's mean in the table.
void record_closed_loop(shared_run& s, worker_state& w, std::uint64_t i, const run_result& r) {
  for (const auto& p : r.properties) {
    if (p.holds || p.property >= w.properties.size()) continue;
    auto& acc = w.properties[p.property];
    ++acc.violating;
    if (i < acc.first) acc.first = i, acc.at = p.first_violation, acc.step = p.step;
  }
  const std::size_t n_gauges = s.table.gauges;
  for (std::size_t g = 0; g < n_gauges; ++g) s.table.gauge_mean_of[i * n_gauges + g] = std::nan("");
  for (const auto& g : r.gauges) {
    if (g.count == 0 || g.gauge >= n_gauges) continue;
    auto& acc = w.gauges[g.gauge];
    ++acc.corners;
    acc.samples += g.count;
    acc.add(g.min, i, g.max, i);
    s.table.gauge_mean_of[i * n_gauges + g.gauge] = g.mean;
  }
}

// A worker: takes the next corner from the shared counter and runs it, until
// none is left or the sweep halts (a corner cut short is not stored). One
// run_context and delay table serve all its corners.
void work(shared_run& s, worker_state& w) {
  try {
    run_context ctx(s.d.nets);
    delay_table table;
    prepare(s.d, s.table.steps, w);
    const auto budgets = element_budgets(s.d);
    std::vector<logic> unknown;
    for (;;) {
      const std::uint64_t i = s.next.fetch_add(1, std::memory_order_relaxed);
      if (i >= s.plan.corners || s.halt.load(std::memory_order_relaxed)) break;
      fill_delays(s.d, s.plan.corner_at(i), table);
      const run_result r = run_stimulus(ctx, s.d, table, s.opt);
      if (s.halt.load(std::memory_order_relaxed)) break;  // possibly cut short: not a result
      if (r.error && i < w.stim_error_corner) w.stim_error_corner = i, w.stim_error = r.error;
      w.events += r.events;
      if (!w.have_reported) w.reported = r.reported, w.have_reported = true;
      record_steps(s, w, i, r, unknown);
      record_closed_loop(s, w, i, r);
      if (!s.d.nets.meta.empty()) record_elements(s.d, budgets, w, i, r, table);
      s.table.finished[i] = 1;
      s.done.fetch_add(1, std::memory_order_relaxed);
    }
  } catch (...) {
    w.error = std::current_exception();
  }
}

}  // namespace

std::vector<std::vector<time_fs>> element_budgets(const design& d) {
  const netlist& n = d.nets;
  std::vector<std::vector<time_fs>> out(n.meta.size());
  for (const auto& step : d.stim.steps)
    for (const auto& e : step.expects)
      if (e.what == expectation::kind::resolves) out[n.meta_at[n.driver[e.net]]].push_back(e.hi);
  for (auto& b : out) {
    std::sort(b.begin(), b.end());
    b.erase(std::unique(b.begin(), b.end()), b.end());
  }
  return out;
}

void decode_key(const std::string& k, sweep_outcome& o) {
  o.status = static_cast<step_status>(k[0] & ~end_of_time_bit);
  o.end_of_time = (k[0] & end_of_time_bit) != 0;
  std::memcpy(&o.period, k.data() + 1, sizeof o.period);
  for (std::size_t i = 1 + sizeof(time_fs); i < k.size(); ++i)
    o.values.push_back(static_cast<logic>(k[i]));
}

unsigned pool_size(const sweep_options& opt, const sweep_plan& plan) {
  unsigned threads = opt.threads ? opt.threads : std::max(1u, std::thread::hardware_concurrency());
  if (plan.corners < threads)
    threads = static_cast<unsigned>(std::max<std::uint64_t>(plan.corners, 1));
  return threads;
}

sweep_stop run_pool(shared_run& shared, std::vector<worker_state>& workers,
                    const sweep_options& opt, std::atomic<bool>& halt,
                    std::chrono::steady_clock::time_point started) {
  const auto threads = static_cast<unsigned>(workers.size());
  std::atomic<unsigned> finished{0};
  sweep_stop stopped = sweep_stop::none;
  std::vector<std::thread> pool;
  pool.reserve(threads);
  for (unsigned t = 0; t < threads; ++t)
    pool.emplace_back([&, t] {
      work(shared, workers[t]);
      finished.fetch_add(1);
    });
  const bool watch = opt.stop || opt.timeout_s > 0;
  if (opt.progress || watch) {
    const std::uint64_t corners = shared.plan.corners;
    auto last = std::chrono::steady_clock::now();
    while (finished.load() < threads) {
      std::this_thread::sleep_for(std::chrono::milliseconds(20));
      const auto now = std::chrono::steady_clock::now();
      if (!halt.load() && opt.stop && opt.stop->load())
        stopped = sweep_stop::interrupted, halt.store(true);
      if (!halt.load() && opt.timeout_s > 0 &&
          std::chrono::duration<double>(now - started).count() >= opt.timeout_s)
        stopped = sweep_stop::timeout, halt.store(true);
      if (opt.progress &&
          std::chrono::duration<double>(now - last).count() >= opt.progress_every_s) {
        opt.progress(shared.done.load(), corners);
        last = now;
      }
    }
    if (opt.progress) opt.progress(shared.done.load(), corners);
  }
  for (auto& th : pool) th.join();
  return stopped;
}

void merge_workers(const std::vector<worker_state>& workers, sweep_result& res) {
  for (const auto& w : workers)
    if (w.error) std::rethrow_exception(w.error);
  for (const auto& w : workers) {
    res.events += w.events;
    if (w.have_reported && res.reported.empty()) res.reported = w.reported;
    if (w.stim_error && w.stim_error_corner < res.error_corner)
      res.error_corner = w.stim_error_corner, res.error = w.stim_error;
  }
}

}  // namespace settle::detail
