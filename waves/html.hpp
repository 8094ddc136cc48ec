// One self-contained HTML report (inline CSS, script and SVG) of a run, sweep, margin search or
// exploration.
#pragma once

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "sim/analysis/explore.hpp"
#include "sim/analysis/margin.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"
#include "sim/model/design.hpp"
#include "waves/json.hpp"

namespace settle {

/// A witness trace with more value changes than this (over the drawn nets,
/// within one step) is summarised into busy bands, and the page says so.
inline constexpr std::uint64_t html_change_limit = 100'000;
/// The largest state graph drawn on the page (states of one step).
inline constexpr std::uint64_t html_graph_limit = 60;

/// What every report states about where it came from.
struct html_source {
  std::string command;        ///< "run", "sweep", "margin", "explore" or "mtbf"
  const report_json& result;  ///< the command's JSON report (json.hpp), embedded as it is
  std::string invocation;     ///< the command line; empty: read from /proc/self/cmdline
};

/// `settle run`: the single run's waveforms per step (replayed under `c`).
std::string html_report_run(const design& d, const corner& c, const run_options& ro,
                            const html_source& src);

/// `settle sweep`: verdict banners, outcome blocks, settle-time histograms,
/// and for every step that is not deterministic the witnesses' waveforms on a
/// shared time axis (time since the step began) with the first difference marked.
std::string html_report_sweep(const design& d, const sweep_result& r, const run_options& ro,
                              const html_source& src);

/// `settle margin`: the margin figures, failures and culprit gates, and the
/// sweep at the written spread as in the sweep report.
std::string html_report_margin(const design& d, const margin_result& r, const run_options& ro,
                               const html_source& src);

/// `settle explore`: reachable stable states per step and, for graphs of at
/// most html_graph_limit states kept in `r`, the state graph in layers.
std::string html_report_explore(const design& d, const explore_result& r, const html_source& src);

/// `settle mtbf`: the MTBF figures of the JSON report `src.result` (typ and
/// worst, a plot of MTBF against the budget) and their check by simulation.
std::string html_report_mtbf(const design& d, const html_source& src);

/// The command line of this process, shell-quoted ("settle sweep a.settle ...").
std::string html_invocation();

// ---- pieces, exposed for tests

/// One net's drawn trace inside a window: its value at the window's start and
/// its changes at times relative to the start. `busy` holds [from, to) spans
/// where changes were too dense to keep (summarised traces only).
struct html_net_trace {
  logic initial = logic::x;
  std::vector<time_fs> times;
  std::string values;  ///< one of '0' '1' 'x' per change
  std::vector<std::pair<time_fs, time_fs>> busy;
};

/// Records the changes of selected nets of one run (a change_sink).
class html_recorder final : public change_sink {
 public:
  html_recorder(std::size_t nets, const std::vector<net_id>& watched);
  void on_start(std::span<const logic> initial) override;
  void on_changes(std::span<const change> batch) override;
  void on_finish(time_fs) override {}
  /// The traces of the watched nets in [from, to], times relative to `from`;
  /// summarised into at most `buckets` busy bands per net when the window
  /// holds more than `limit` changes (*summarised set to true).
  std::vector<html_net_trace> window(time_fs from, time_fs to, std::uint64_t limit,
                                     std::size_t buckets, bool* summarised,
                                     std::uint64_t* changes) const;
  /// The changes of the watched nets in [from, to].
  std::uint64_t changes_between(time_fs from, time_fs to) const;

 private:
  std::vector<std::int32_t> slot_;  // per net: index into watched, or -1
  std::vector<net_id> watched_;
  std::vector<logic> initial_;               // per watched net
  std::vector<std::vector<change>> events_;  // per watched net, last value per instant
};

/// The earliest relative time at which two of `traces` (each a list of nets
/// in the same order) disagree on some net; UINT64_MAX when they never do.
time_fs first_difference(const std::vector<std::vector<html_net_trace>>& traces);

/// Histogram of settle times: `bins` equal bins from lo to hi (inclusive of
/// hi), counts per outcome. lo == hi gives one bin.
struct html_histogram {
  time_fs lo = 0, hi = 0;
  std::vector<std::vector<std::uint64_t>> counts;  ///< [outcome][bin]
};
html_histogram settle_histogram(const std::vector<sweep_outcome>& outcomes, std::size_t bins);

/// Layered layout of a state graph: BFS depth from the start states is the
/// layer; order within a layer by barycentre of parents. Returns per state
/// (layer, position in layer).
std::vector<std::pair<std::uint32_t, std::uint32_t>> layer_layout(const state_graph& g);

}  // namespace settle
