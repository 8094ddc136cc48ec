// Shared pieces of the benchmarks: configuration, a design cache, memory probes and a recording
// sink.
#pragma once

#include <benchmark/benchmark.h>

#include <cstdint>
#include <string>
#include <vector>

#include "sim/kernel/run.hpp"
#include "sim/model/design.hpp"

namespace settle::bench {

/// What the benchmark executable was told on its command line.
struct config {
  std::string data;             ///< folder with the generated designs (scripts/bench writes them)
  std::string iscas;            ///< folder with the ISCAS .bench files
  bool quick = false;           ///< fewer iterations (smoke runs, quick looks)
  std::uint64_t cycles = 1000;  ///< clock cycles of the ISCAS run

  /// `full` iterations normally, `quick` in quick mode (never below 1).
  std::int64_t iterations(std::int64_t full, std::int64_t quick_count) const;
  /// data/name.
  std::string path(const std::string& name) const;
};

/// Loads `path` once per process and keeps it; returns null and sets *error
/// (a short reason) when the file is absent or does not load.
const design* cached_design(const std::string& path, std::string* error);

/// cached_design, or null after marking the benchmark skipped with the reason.
const design* design_or_skip(benchmark::State& st, const std::string& path);

/// Resident set size of this process in bytes (VmRSS from /proc/self/status).
std::uint64_t resident_bytes();
/// Peak resident set size in bytes (VmHWM).
std::uint64_t peak_resident_bytes();
/// Heap bytes in use (glibc mallinfo2: uordblks + hblkhd).
std::uint64_t heap_bytes();

/// The load average over the last minute (from /proc/loadavg), or -1.
double load_average();

/// A change_sink that keeps every change (up to `limit`) and the initial values.
class recording_sink final : public change_sink {
 public:
  explicit recording_sink(std::size_t limit) : limit_(limit) {}
  void on_start(std::span<const logic> initial) override {
    initial_.assign(initial.begin(), initial.end());
  }
  void on_changes(std::span<const change> batch) override;
  void on_finish(time_fs end) override { end_ = end; }

  const std::vector<logic>& initial() const { return initial_; }
  const std::vector<change>& changes() const { return changes_; }
  /// The end of the recorded stream: the run's end, or the last kept change when truncated.
  time_fs end() const { return truncated_ && !changes_.empty() ? changes_.back().time : end_; }
  bool truncated() const { return truncated_; }

 private:
  std::size_t limit_;
  std::vector<logic> initial_;
  std::vector<change> changes_;
  time_fs end_ = 0;
  bool truncated_ = false;
};

// Registration of each family (one .cpp each).
void register_kernel(const config& c);
void register_load(const config& c);
void register_vcd(const config& c);
void register_sweep(const config& c);
void register_explore(const config& c);
void register_iscas(const config& c);

}  // namespace settle::bench
