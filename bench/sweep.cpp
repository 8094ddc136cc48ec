// Sweep throughput (corners per second at 1 and 2 threads) and the per-corner set-up share.
#include "sim/analysis/sweep.hpp"

#include <benchmark/benchmark.h>

#include <chrono>
#include <optional>
#include <string>

#include "bench/common.hpp"
#include "sim/kernel/simulator.hpp"

namespace settle::bench {
namespace {

constexpr std::uint64_t corners = 1000;

std::optional<sweep_plan> plan_or_skip(benchmark::State& st, const design& d) {
  std::string error;
  auto plan = plan_sweep("random:" + std::to_string(corners), 1, d.nets.gate_count(), &error);
  if (!plan) st.SkipWithError(error.c_str());
  return plan;
}

void sweep_threads(benchmark::State& st, std::string path, unsigned threads) {
  const design* d = design_or_skip(st, path);
  if (!d) return;
  const auto plan = plan_or_skip(st, *d);
  if (!plan) return;
  sweep_options opt;
  opt.threads = threads;
  std::uint64_t done = 0, events = 0;
  for (auto _ : st) {
    const sweep_result r = run_sweep(*d, *plan, opt);
    done += r.corners;
    events += r.events;
    benchmark::DoNotOptimize(r.events);
  }
  st.SetItemsProcessed(static_cast<std::int64_t>(done));
  st.counters["corners_per_s"] =
      benchmark::Counter(static_cast<double>(done), benchmark::Counter::kIsRate);
  st.counters["events_per_s"] =
      benchmark::Counter(static_cast<double>(events), benchmark::Counter::kIsRate);
  st.counters["gates"] = static_cast<double>(d->nets.gate_count());
  st.counters["threads"] = threads;
  st.counters["load_avg"] = load_average();
}

// A corner costs fill_delays + run_stimulus, and run_stimulus starts with
// simulator::reset. The set-up is timed on its own (fill_delays, then an
// extra reset) and compared with the whole corner (fill_delays + run_stimulus).
void sweep_setup(benchmark::State& st, std::string path) {
  const design* d = design_or_skip(st, path);
  if (!d) return;
  const auto plan = plan_or_skip(st, *d);
  if (!plan) return;
  using clock = std::chrono::steady_clock;
  run_context ctx(d->nets);
  delay_table table;
  double fill_s = 0, reset_s = 0, run_s = 0;
  for (auto _ : st) {
    for (std::uint64_t i = 0; i < plan->corners; ++i) {
      const auto t0 = clock::now();
      fill_delays(*d, plan->corner_at(i), table);
      const auto t1 = clock::now();
      ctx.sim().reset(table);
      const auto t2 = clock::now();
      const run_result r = run_stimulus(ctx, *d, table, run_options{});
      const auto t3 = clock::now();
      benchmark::DoNotOptimize(r.events);
      fill_s += std::chrono::duration<double>(t1 - t0).count();
      reset_s += std::chrono::duration<double>(t2 - t1).count();
      run_s += std::chrono::duration<double>(t3 - t2).count();
    }
  }
  const double n = static_cast<double>(st.iterations() * plan->corners);
  const double corner_s = fill_s + run_s;
  st.counters["setup_share"] = corner_s > 0 ? (fill_s + reset_s) / corner_s : 0;
  st.counters["fill_us"] = fill_s / n * 1e6;
  st.counters["reset_us"] = reset_s / n * 1e6;
  st.counters["corner_us"] = corner_s / n * 1e6;
  st.counters["gates"] = static_cast<double>(d->nets.gate_count());
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_sweep(const config& c) {
  const std::string p = c.path("pipe500.settle");
  for (unsigned t : {1u, 2u})
    benchmark::RegisterBenchmark(("sweep/pipeline_500/threads:" + std::to_string(t)).c_str(),
                                 sweep_threads, p, t)
        ->Unit(benchmark::kMillisecond)
        ->UseRealTime()
        ->Iterations(c.iterations(5, 1));
  benchmark::RegisterBenchmark("sweep_setup/pipeline_500", sweep_setup, p)
      ->Unit(benchmark::kMillisecond)
      ->UseRealTime()
      ->Iterations(c.iterations(3, 1));
}

}  // namespace settle::bench
