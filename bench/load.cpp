// Parse plus elaborate: time and resident memory per gate of load_design on a generated .settle
// file.
#include "parser/load.hpp"

#include <benchmark/benchmark.h>
#include <sys/stat.h>

#include <optional>
#include <string>

#include "bench/common.hpp"

namespace settle::bench {
namespace {

// Memory is read around the first load, with the design kept alive: run this
// family in a fresh process (scripts/bench does) so earlier frees do not hide it.
void load_file(benchmark::State& st, std::string path) {
  struct stat fs {};
  if (::stat(path.c_str(), &fs) != 0) {
    st.SkipWithError((path + " is absent (scripts/bench generates it)").c_str());
    return;
  }
  std::uint64_t rss_delta = 0, heap_delta = 0, gates = 0, nets = 0;
  bool first = true;
  for (auto _ : st) {
    const std::uint64_t rss0 = resident_bytes(), heap0 = heap_bytes();
    diagnostics diags;
    std::optional<design> d = load_design(path, load_options{}, diags);
    if (!d) {
      st.SkipWithError((path + " does not load").c_str());
      break;
    }
    if (first) {
      st.PauseTiming();
      rss_delta = resident_bytes() - rss0;
      heap_delta = heap_bytes() - heap0;
      gates = d->nets.gate_count();
      nets = d->nets.net_count();
      first = false;
      st.ResumeTiming();
    }
    benchmark::DoNotOptimize(d->nets.gate_count());
    st.PauseTiming();
    d.reset();  // freeing is not part of parse + elaborate
    st.ResumeTiming();
  }
  const double g = static_cast<double>(gates ? gates : 1);
  st.SetBytesProcessed(static_cast<std::int64_t>(st.iterations()) * fs.st_size);
  st.counters["gates"] = static_cast<double>(gates);
  st.counters["nets"] = static_cast<double>(nets);
  st.counters["rss_bytes_per_gate"] = static_cast<double>(rss_delta) / g;
  st.counters["heap_bytes_per_gate"] = static_cast<double>(heap_delta) / g;
  st.counters["peak_rss_MB"] = static_cast<double>(peak_resident_bytes()) / 1e6;
  st.counters["file_MB"] = static_cast<double>(fs.st_size) / 1e6;
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_load(const config& c) {
  benchmark::RegisterBenchmark("load/random_1m", load_file, c.path("random1m.settle"))
      ->Unit(benchmark::kMillisecond)
      ->UseRealTime()
      ->Iterations(c.iterations(3, 1));
}

}  // namespace settle::bench
