// Shared pieces of the benchmarks: the design cache, memory probes and the recording sink.
#include "bench/common.hpp"

#include <malloc.h>
#include <sys/stat.h>

#include <algorithm>
#include <fstream>
#include <map>
#include <memory>

#include "parser/load.hpp"

namespace settle::bench {

std::int64_t config::iterations(std::int64_t full, std::int64_t quick_count) const {
  return std::max<std::int64_t>(1, quick ? quick_count : full);
}

std::string config::path(const std::string& name) const { return data + "/" + name; }

const design* cached_design(const std::string& path, std::string* error) {
  static std::map<std::string, std::unique_ptr<design>> cache;
  if (auto it = cache.find(path); it != cache.end()) return it->second.get();
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) {
    *error = path + " is absent (scripts/bench generates it)";
    return nullptr;
  }
  diagnostics diags;
  auto d = load_design(path, load_options{}, diags);
  if (!d) {
    *error = path + " does not load: " +
             (diags.items.empty() ? std::string("no diagnostic") : diags.items.front().message);
    return nullptr;
  }
  return cache.emplace(path, std::make_unique<design>(std::move(*d))).first->second.get();
}

const design* design_or_skip(benchmark::State& st, const std::string& path) {
  std::string error;
  const design* d = cached_design(path, &error);
  if (!d) st.SkipWithError(error.c_str());
  return d;
}

namespace {

std::uint64_t status_field(const char* key) {
  std::ifstream f("/proc/self/status");
  std::string line;
  const std::string k(key);
  while (std::getline(f, line))
    if (line.compare(0, k.size(), k) == 0) return std::stoull(line.substr(k.size())) * 1024;  // kB
  return 0;
}

}  // namespace

std::uint64_t resident_bytes() { return status_field("VmRSS:"); }
std::uint64_t peak_resident_bytes() { return status_field("VmHWM:"); }

std::uint64_t heap_bytes() {
  const struct mallinfo2 m = mallinfo2();
  return m.uordblks + m.hblkhd;
}

double load_average() {
  std::ifstream f("/proc/loadavg");
  double one = -1;
  f >> one;
  return f ? one : -1;
}

void recording_sink::on_changes(std::span<const change> batch) {
  const std::size_t room = limit_ - std::min(limit_, changes_.size());
  if (batch.size() > room) truncated_ = true;
  changes_.insert(changes_.end(), batch.begin(),
                  batch.begin() + static_cast<std::ptrdiff_t>(std::min(room, batch.size())));
}

}  // namespace settle::bench
