// Explore throughput: states of the state graph built per second on a small design with feedback.
#include "sim/analysis/explore.hpp"

#include <benchmark/benchmark.h>

#include <string>

#include "bench/common.hpp"

namespace settle::bench {
namespace {

void explore_states(benchmark::State& st, std::string path) {
  std::string error;
  const design* d = design_or_skip(st, path);
  if (!d) return;
  std::uint64_t states = 0, edges = 0;
  bool complete = true;
  for (auto _ : st) {
    const auto r = explore_design(*d, explore_options{}, &error);
    if (!r) {
      st.SkipWithError(("explore refused the design: " + error).c_str());
      break;
    }
    for (const auto& s : r->steps) {
      states += s.states;
      edges += s.edges;
      complete = complete && s.complete;
    }
  }
  st.SetItemsProcessed(static_cast<std::int64_t>(states));
  st.counters["states_per_s"] =
      benchmark::Counter(static_cast<double>(states), benchmark::Counter::kIsRate);
  st.counters["edges_per_s"] =
      benchmark::Counter(static_cast<double>(edges), benchmark::Counter::kIsRate);
  const double it = static_cast<double>(st.iterations() ? st.iterations() : 1);
  st.counters["states_per_run"] = static_cast<double>(states) / it;
  st.counters["complete"] = complete ? 1 : 0;
  st.counters["gates"] = static_cast<double>(d->nets.gate_count());
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_explore(const config& c) {
  benchmark::RegisterBenchmark("explore/pipeline_12", explore_states, c.path("pipe12.settle"))
      ->Unit(benchmark::kMillisecond)
      ->Iterations(c.iterations(10, 1));
}

}  // namespace settle::bench
