// s38417 (ISCAS-89, six-NAND flip-flops) clocked for 1,000 cycles with random inputs on one core.
#include <benchmark/benchmark.h>
#include <sys/stat.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <optional>
#include <random>
#include <string>

#include "bench/common.hpp"
#include "parser/load.hpp"
#include "sim/model/corner.hpp"

namespace settle::bench {
namespace {

// The stimulus tests/cli/bench_seq.py uses, one cycle after another, each
// change followed by `settle` so the period is always long enough: CK falls,
// the inputs change while CK is low, CK rises.
std::string cycle_stimulus(const design& d, std::uint64_t cycles, std::uint32_t seed) {
  std::mt19937 rng(seed);
  std::string out = "stimulus {\n";
  for (std::uint64_t k = 0; k < cycles; ++k) {
    std::string assigns;
    for (net_id n : d.nets.inputs) {
      const std::string& name = d.nets.net_name[n];
      if (name == "CK") continue;
      assigns += (assigns.empty() ? "" : ", ") + name + " = " + std::to_string(rng() & 1);
    }
    if (k == 0) {
      out += "    at 0ns CK = 0, " + assigns + "\n    settle\n";
    } else {
      out += "    after 10ns CK = 0\n    settle\n    after 10ns " + assigns + "\n    settle\n";
    }
    out += "    after 10ns CK = 1\n    settle\n";
  }
  return out + "}\n";
}

void iscas_cycles(benchmark::State& st, std::string path, std::uint64_t cycles) {
  struct stat fs {};
  if (::stat(path.c_str(), &fs) != 0) {
    st.SkipWithError((path + " is absent: the ISCAS benchmark needs tests/data/iscas").c_str());
    return;
  }
  diagnostics diags;
  std::optional<design> plain = load_design(path, load_options{}, diags);
  if (!plain) {
    st.SkipWithError((path + " does not load").c_str());
    return;
  }
  char stim_path[] = "/tmp/settle-bench-stim-XXXXXX";
  const int fd = ::mkstemp(stim_path);
  if (fd < 0) {
    st.SkipWithError("cannot create the stimulus file");
    return;
  }
  const std::string text = cycle_stimulus(*plain, cycles, 19890501);
  const bool wrote = ::write(fd, text.data(), text.size()) == static_cast<ssize_t>(text.size());
  ::close(fd);
  load_options opt;
  opt.stim_path = stim_path;
  diagnostics diags2;
  const auto t0 = std::chrono::steady_clock::now();
  std::optional<design> d = wrote ? load_design(path, opt, diags2) : std::nullopt;
  const double load_s =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  ::unlink(stim_path);
  if (!d) {
    st.SkipWithError(
        ("the generated stimulus does not load: " +
         (diags2.items.empty() ? std::string("write failed") : diags2.items.front().message))
            .c_str());
    return;
  }
  std::string error;
  delay_table table;
  fill_delays(*d, *parse_corner("random:1", &error), table);
  run_context ctx(d->nets);
  std::uint64_t events = 0, settled = 0, steps = 0;
  for (auto _ : st) {
    const run_result r = run_stimulus(ctx, *d, table, run_options{});
    events += r.events;
    for (const auto& s : r.steps) settled += s.status == step_status::settled;
    steps += r.steps.size();
  }
  st.SetItemsProcessed(static_cast<std::int64_t>(events));
  st.counters["events_per_s"] =
      benchmark::Counter(static_cast<double>(events), benchmark::Counter::kIsRate);
  st.counters["cycles"] = static_cast<double>(cycles);
  st.counters["steps_settled_share"] =
      steps ? static_cast<double>(settled) / static_cast<double>(steps) : 0;
  st.counters["gates"] = static_cast<double>(d->nets.gate_count());
  st.counters["load_s"] =
      load_s;  // parse + elaborate of the netlist and the 3,000-step stimulus (not timed)
  st.counters["load_avg"] = load_average();
}

}  // namespace

void register_iscas(const config& c) {
  const std::uint64_t cycles = c.cycles;
  benchmark::RegisterBenchmark(("iscas/s38417/cycles:" + std::to_string(cycles)).c_str(),
                               iscas_cycles, c.iscas + "/s38417.bench", cycles)
      ->Unit(benchmark::kMillisecond)
      ->Iterations(c.iterations(5, 1));
}

}  // namespace settle::bench
