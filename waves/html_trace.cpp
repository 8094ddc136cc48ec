// Report data pieces: recorded witness traces, their first difference, settle-time histograms,
// graph layers.
#include <algorithm>
#include <cstdio>
#include <fstream>
#include <iterator>
#include <limits>

#include "waves/html.hpp"

namespace settle {

html_recorder::html_recorder(std::size_t nets, const std::vector<net_id>& watched)
    : slot_(nets, -1),
      watched_(watched),
      initial_(watched.size(), logic::x),
      events_(watched.size()) {
  for (std::size_t i = 0; i < watched_.size(); ++i)
    if (watched_[i] < nets && slot_[watched_[i]] < 0)
      slot_[watched_[i]] = static_cast<std::int32_t>(i);
}

void html_recorder::on_start(std::span<const logic> initial) {
  for (std::size_t i = 0; i < watched_.size(); ++i)
    initial_[i] = watched_[i] < initial.size() ? initial[watched_[i]] : logic::x;
  for (auto& e : events_) e.clear();
}

void html_recorder::on_changes(std::span<const change> batch) {
  for (const auto& c : batch) {
    if (c.net >= slot_.size() || slot_[c.net] < 0) continue;
    auto& ev = events_[static_cast<std::size_t>(slot_[c.net])];
    const std::size_t i = static_cast<std::size_t>(slot_[c.net]);
    if (!ev.empty() && ev.back().time == c.time)
      ev.pop_back();  // the last value of an instant counts
    const logic before = ev.empty() ? initial_[i] : ev.back().value;
    if (before != c.value) ev.push_back(c);
  }
}

std::vector<html_net_trace> html_recorder::window(time_fs from, time_fs to, std::uint64_t limit,
                                                  std::size_t buckets, bool* summarised,
                                                  std::uint64_t* changes) const {
  std::vector<html_net_trace> out(watched_.size());
  std::uint64_t total = 0;
  std::vector<std::pair<std::size_t, std::size_t>> range(watched_.size());
  for (std::size_t i = 0; i < watched_.size(); ++i) {
    const auto& ev = events_[i];
    auto lo = std::lower_bound(ev.begin(), ev.end(), from,
                               [](const change& c, time_fs t) { return c.time < t; });
    auto hi =
        std::upper_bound(lo, ev.end(), to, [](time_fs t, const change& c) { return t < c.time; });
    out[i].initial = lo == ev.begin() ? initial_[i] : std::prev(lo)->value;
    range[i] = {static_cast<std::size_t>(lo - ev.begin()),
                static_cast<std::size_t>(hi - ev.begin())};
    total += range[i].second - range[i].first;
  }
  if (changes) *changes = total;
  const bool summary = total > limit && buckets > 0;
  if (summarised) *summarised = summary;
  const time_fs span = to > from ? to - from : 1;
  for (std::size_t i = 0; i < watched_.size(); ++i) {
    const auto& ev = events_[i];
    auto& tr = out[i];
    const auto [a, b] = range[i];
    if (!summary || b - a <= buckets / 4) {
      for (std::size_t k = a; k < b; ++k) {
        tr.times.push_back(ev[k].time - from);
        tr.values.push_back(to_char(ev[k].value));
      }
      continue;
    }
    // Dense: one bucket of span/buckets keeps a single change, or becomes a busy
    // band ending in the bucket's last value.
    std::size_t k = a;
    logic present = tr.initial;
    while (k < b) {
      const time_fs rel = ev[k].time - from;
      const auto bucket =
          static_cast<std::uint64_t>(static_cast<unsigned __int128>(rel) * buckets / span);
      const auto edge =
          static_cast<time_fs>(static_cast<unsigned __int128>(bucket + 1) * span / buckets);
      std::size_t e = k;
      while (e < b && ev[e].time - from < edge) ++e;
      if (e - k == 1) {
        tr.times.push_back(rel);
        tr.values.push_back(to_char(ev[k].value));
      } else {
        const time_fs start =
            static_cast<time_fs>(static_cast<unsigned __int128>(bucket) * span / buckets);
        if (!tr.busy.empty() && tr.busy.back().second == start)
          tr.busy.back().second = edge;
        else
          tr.busy.emplace_back(start, edge);
        if (ev[e - 1].value != present) {
          tr.times.push_back(std::min(edge, span));
          tr.values.push_back(to_char(ev[e - 1].value));
        }
      }
      present = ev[e - 1].value;
      k = e;
    }
  }
  return out;
}

std::uint64_t html_recorder::changes_between(time_fs from, time_fs to) const {
  std::uint64_t total = 0;
  for (const auto& ev : events_) {
    auto lo = std::lower_bound(ev.begin(), ev.end(), from,
                               [](const change& c, time_fs t) { return c.time < t; });
    auto hi =
        std::upper_bound(lo, ev.end(), to, [](time_fs t, const change& c) { return t < c.time; });
    total += static_cast<std::uint64_t>(hi - lo);
  }
  return total;
}

time_fs first_difference(const std::vector<std::vector<html_net_trace>>& traces) {
  constexpr time_fs none = std::numeric_limits<time_fs>::max();
  if (traces.size() < 2) return none;
  std::vector<time_fs> times{0};
  for (const auto& t : traces)
    for (const auto& net : t) times.insert(times.end(), net.times.begin(), net.times.end());
  std::sort(times.begin(), times.end());
  times.erase(std::unique(times.begin(), times.end()), times.end());
  const std::size_t nets = traces[0].size();
  // Per trace and net: the index of the next change not yet applied.
  std::vector<std::vector<std::size_t>> next(traces.size(), std::vector<std::size_t>(nets, 0));
  for (time_fs t : times) {
    for (std::size_t n = 0; n < nets; ++n) {
      char first = 0;
      for (std::size_t w = 0; w < traces.size(); ++w) {
        if (n >= traces[w].size()) continue;
        const auto& net = traces[w][n];
        auto& k = next[w][n];
        while (k < net.times.size() && net.times[k] <= t) ++k;
        const char v = k ? net.values[k - 1] : to_char(net.initial);
        if (!first)
          first = v;
        else if (v != first)
          return t;
      }
    }
  }
  return none;
}

html_histogram settle_histogram(const std::vector<sweep_outcome>& outcomes, std::size_t bins) {
  html_histogram h;
  bool any = false;
  for (const auto& o : outcomes) {
    if (o.count == 0) continue;
    h.lo = any ? std::min(h.lo, o.settle.min) : o.settle.min;
    h.hi = any ? std::max(h.hi, o.settle.max) : o.settle.max;
    any = true;
  }
  if (h.lo == h.hi) bins = 1;
  bins = std::max<std::size_t>(bins, 1);
  const unsigned __int128 span = static_cast<unsigned __int128>(h.hi - h.lo) + 1;
  for (const auto& o : outcomes) {
    std::vector<std::uint64_t> c(bins, 0);
    for (time_fs t : o.settle_times) {
      const auto b =
          static_cast<std::size_t>(static_cast<unsigned __int128>(t - h.lo) * bins / span);
      ++c[std::min(b, bins - 1)];
    }
    h.counts.push_back(std::move(c));
  }
  return h;
}

std::vector<std::pair<std::uint32_t, std::uint32_t>> layer_layout(const state_graph& g) {
  const std::uint32_t n = g.size();
  std::vector<std::pair<std::uint32_t, std::uint32_t>> at(n, {0, 0});
  // States are interned breadth-first, so a parent always comes before its child.
  std::vector<std::vector<std::uint32_t>> layers;
  for (std::uint32_t i = 0; i < n; ++i) {
    const std::uint32_t p = i < g.parent.size() ? g.parent[i] : no_id;
    const std::uint32_t layer = p == no_id || p >= i ? 0 : at[p].first + 1;
    if (layers.size() <= layer) layers.resize(layer + 1);
    at[i].first = layer;
    layers[layer].push_back(i);
  }
  for (auto& layer : layers) {
    // Order by the parent's place in its layer so that edges cross less.
    std::stable_sort(layer.begin(), layer.end(), [&](std::uint32_t a, std::uint32_t b) {
      const std::uint32_t pa = g.parent[a] == no_id ? a : at[g.parent[a]].second;
      const std::uint32_t pb = g.parent[b] == no_id ? b : at[g.parent[b]].second;
      return pa < pb;
    });
    for (std::uint32_t k = 0; k < layer.size(); ++k) at[layer[k]].second = k;
  }
  return at;
}

namespace {
std::string shell_quoted(const std::string& w) {
  const bool plain = !w.empty() && w.find_first_not_of(
                                       "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz"
                                       "0123456789_./:#@=+,-") == std::string::npos;
  if (plain) return w;
  std::string q = "'";
  for (char c : w) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}
}  // namespace

std::string html_invocation() {
  std::ifstream in("/proc/self/cmdline", std::ios::binary);
  std::string all((std::istreambuf_iterator<char>(in)), std::istreambuf_iterator<char>());
  std::string out;
  std::size_t pos = 0;
  bool first = true;
  while (pos < all.size()) {
    std::size_t end = all.find('\0', pos);
    if (end == std::string::npos) end = all.size();
    std::string word = all.substr(pos, end - pos);
    if (first) {
      const auto slash = word.rfind('/');
      if (slash != std::string::npos) word = word.substr(slash + 1);
    }
    if (!first) out += ' ';
    out += shell_quoted(word);
    first = false;
    pos = end + 1;
  }
  return out.empty() ? "settle" : out;
}

}  // namespace settle
