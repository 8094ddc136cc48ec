// The benchmark executable: reads its own options, registers every family and runs Google
// Benchmark.
#include <benchmark/benchmark.h>
#include <fmt/format.h>

#include <cstring>
#include <string>
#include <vector>

#include "bench/common.hpp"

namespace {

// Takes `--name=VALUE` or `--name VALUE` out of argv; true when found.
bool take_option(std::vector<char*>& args, const char* name, std::string& value) {
  const std::size_t len = std::strlen(name);
  for (std::size_t i = 1; i < args.size(); ++i) {
    if (std::strncmp(args[i], name, len) != 0) continue;
    if (args[i][len] == '=') {
      value = args[i] + len + 1;
      args.erase(args.begin() + static_cast<std::ptrdiff_t>(i));
      return true;
    }
    if (args[i][len] == '\0' && i + 1 < args.size()) {
      value = args[i + 1];
      args.erase(args.begin() + static_cast<std::ptrdiff_t>(i),
                 args.begin() + static_cast<std::ptrdiff_t>(i) + 2);
      return true;
    }
  }
  return false;
}

bool take_flag(std::vector<char*>& args, const char* name) {
  for (std::size_t i = 1; i < args.size(); ++i)
    if (std::strcmp(args[i], name) == 0) {
      args.erase(args.begin() + static_cast<std::ptrdiff_t>(i));
      return true;
    }
  return false;
}

}  // namespace

int main(int argc, char** argv) {
  std::vector<char*> args(argv, argv + argc);
  settle::bench::config cfg;
  cfg.data = "bench-data";
  cfg.iscas = SETTLE_SOURCE_DIR "/tests/data/iscas";
  take_option(args, "--data", cfg.data);
  take_option(args, "--iscas", cfg.iscas);
  cfg.quick = take_flag(args, "--quick");
  if (std::string v; take_option(args, "--cycles", v)) cfg.cycles = std::stoull(v);
  if (take_flag(args, "--usage")) {
    fmt::print(
        "settle_bench [--data DIR] [--iscas DIR] [--quick] [google benchmark options]\n"
        "  --data DIR   generated designs (scripts/bench writes random100k.settle, "
        "random1m.settle,\n"
        "               pipe500.settle, pipe12.settle)\n"
        "  --iscas DIR  folder holding s38417.bench (default: tests/data/iscas)\n"
        "  --quick      one or a few iterations per benchmark\n"
        "  --cycles N   clock cycles of the s38417 run (default 1000)\n");
    return 0;
  }
  int n = static_cast<int>(args.size());
  args.push_back(nullptr);
  benchmark::Initialize(&n, args.data());
  if (benchmark::ReportUnrecognizedArguments(n, args.data())) return 2;
  benchmark::AddCustomContext("settle_data", cfg.data);
  benchmark::AddCustomContext("load_average_1min_at_start",
                              fmt::format("{:.2f}", settle::bench::load_average()));
  settle::bench::register_kernel(cfg);
  settle::bench::register_iscas(cfg);
  settle::bench::register_load(cfg);
  settle::bench::register_vcd(cfg);
  settle::bench::register_sweep(cfg);
  settle::bench::register_explore(cfg);
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
