// Kernel throughput: value changes applied per second by run_stimulus on generated random logic.
#include <benchmark/benchmark.h>

#include <string>

#include "bench/common.hpp"
#include "sim/model/corner.hpp"

namespace settle::bench {
namespace {

// One corner (random:1, so every gate has its own delay), one run_context,
// the design's stimulus run again and again; parsing happens before timing.
void kernel_run(benchmark::State& st, std::string path) {
  std::string error;
  const design* d = design_or_skip(st, path);
  if (!d) return;
  delay_table table;
  fill_delays(*d, *parse_corner("random:1", &error), table);
  run_context ctx(d->nets);
  std::uint64_t events = 0, runs = 0;
  for (auto _ : st) {
    const run_result r = run_stimulus(ctx, *d, table, run_options{});
    events += r.events;
    ++runs;
    benchmark::DoNotOptimize(r.events);
  }
  st.SetItemsProcessed(static_cast<std::int64_t>(events));
  st.counters["events_per_s"] =
      benchmark::Counter(static_cast<double>(events), benchmark::Counter::kIsRate);
  st.counters["events_per_run"] =
      static_cast<double>(events) / static_cast<double>(runs ? runs : 1);
  st.counters["gates"] = static_cast<double>(d->nets.gate_count());
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_kernel(const config& c) {
  benchmark::RegisterBenchmark("kernel/random_100k", kernel_run, c.path("random100k.settle"))
      ->Unit(benchmark::kMillisecond)
      ->Iterations(c.iterations(20, 2));
  benchmark::RegisterBenchmark("kernel/random_1m", kernel_run, c.path("random1m.settle"))
      ->Unit(benchmark::kMillisecond)
      ->Iterations(c.iterations(5, 1));
}

}  // namespace settle::bench
