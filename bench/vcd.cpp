// VCD writing speed: the waves/vcd.hpp writer over the recorded change stream of a big run.
#include "waves/vcd.hpp"

#include <benchmark/benchmark.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <cstdio>
#include <memory>
#include <string>

#include "bench/common.hpp"
#include "sim/model/corner.hpp"

namespace settle::bench {
namespace {

constexpr std::size_t keep_changes = 12'000'000;  // 192 MB of recorded changes at most
constexpr std::size_t batch = 1 << 14;            // the kernel's trace batch size

// The run is recorded once (not timed); each iteration feeds the whole stream
// to a fresh writer and writes the file (a temporary file: page cache, no sync).
void vcd_write(benchmark::State& st, std::string path) {
  std::string error;
  const design* d = design_or_skip(st, path);
  if (!d) return;
  delay_table table;
  fill_delays(*d, *parse_corner("random:1", &error), table);
  recording_sink rec(keep_changes);
  run_stimulus(*d, table, run_options{}, &rec);
  std::unique_ptr<std::FILE, int (*)(std::FILE*)> f(std::tmpfile(), &std::fclose);
  if (!f) {
    st.SkipWithError("cannot create a temporary file");
    return;
  }
  const auto& ch = rec.changes();
  std::uint64_t bytes = 0, changes_written = 0;
  double feed_s = 0, total_s = 0;
  for (auto _ : st) {
    std::rewind(f.get());
    if (::ftruncate(::fileno(f.get()), 0) != 0) {
      st.SkipWithError("cannot truncate the temporary file");
      break;
    }
    const auto t0 = std::chrono::steady_clock::now();
    vcd_writer w(d->nets, vcd_options{"bench", "settle bench", "fixed", {}});
    w.on_start(rec.initial());
    for (std::size_t i = 0; i < ch.size(); i += batch)
      w.on_changes(std::span<const change>(ch.data() + i, std::min(batch, ch.size() - i)));
    w.on_finish(rec.end());
    const auto t1 = std::chrono::steady_clock::now();
    std::string err;
    if (!w.write(f.get(), &err) || std::fflush(f.get()) != 0) {
      st.SkipWithError(("write failed: " + err).c_str());
      break;
    }
    const auto t2 = std::chrono::steady_clock::now();
    bytes += static_cast<std::uint64_t>(std::ftell(f.get()));
    changes_written += w.changes_written();
    feed_s += std::chrono::duration<double>(t1 - t0).count();
    total_s += std::chrono::duration<double>(t2 - t0).count();
  }
  st.SetBytesProcessed(static_cast<std::int64_t>(bytes));
  const double it = static_cast<double>(std::max<std::int64_t>(1, st.iterations()));
  st.counters["file_MB"] = static_cast<double>(bytes) / it / 1e6;
  st.counters["changes_in"] = static_cast<double>(ch.size());
  st.counters["changes_written"] = static_cast<double>(changes_written) / it;
  st.counters["stream_truncated"] = rec.truncated() ? 1 : 0;
  st.counters["feed_share"] =
      total_s > 0 ? feed_s / total_s : 0;  // on_changes + on_finish vs write
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_vcd(const config& c) {
  benchmark::RegisterBenchmark("vcd/random_100k", vcd_write, c.path("random100k.settle"))
      ->Unit(benchmark::kMillisecond)
      ->UseRealTime()
      ->Iterations(c.iterations(5, 1));
}

}  // namespace settle::bench
