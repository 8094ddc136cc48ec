// The one report layer: the JSON of every command's result (run, sweep, margin,
// explore, race culprits). `--json` writes these values and the HTML reports
// embed the same values; nothing is built twice or parsed back.
#pragma once

#include <cstdint>
#include <functional>
#include <nlohmann/json.hpp>
#include <string>
#include <string_view>
#include <vector>

#include "sim/analysis/baseline.hpp"
#include "sim/analysis/culprit.hpp"
#include "sim/analysis/explore.hpp"
#include "sim/analysis/margin.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/design.hpp"

namespace settle {

/// Every report's JSON value: keys in the order they were set.
using report_json = nlohmann::ordered_json;

/// The text of a JSON report file: indented by two, invalid UTF-8 replaced,
/// a newline at the end.
std::string json_text(const report_json& j);

/// The first fields of every JSON report: "tool", "version" and "design".
report_json report_head(const std::string& design_path);

/// One level as the one-character string the JSON reports use ("0", "1", "x").
std::string logic_text(logic v);

/// The JSON word of an expectation kind: "value", "stable", "oscillating",
/// "within", "no_glitch", "deterministic" or "gauge".
const char* expect_kind_word(expectation::kind k);

/// What every report says of an expectation before its result: "kind", then
/// "net" (value, no_glitch), "want" (value: the level; gauge: the range),
/// "budget_fs" (within) and "gauge" (gauge), the same in run, sweep and explore.
report_json expectation_json(const netlist& n, const expectation& spec);

/// The JSON array of the names of `nets`.
report_json net_names_json(const netlist& n, const std::vector<net_id>& nets);
/// The resolutions of metastable elements: element, output, first and
/// resolved times, the resolution time, Δ (delta_fs) or δ (lead_fs) when inside
/// the window (else null), whether a tie was drawn, and the value.
report_json resolutions_json(const netlist& n, const std::vector<resolution>& list);

/// Why a timeout step stopped, in words, from its step_result figures: how
/// far it got ("stopped 10ns after its start, 123 events") and, when its net
/// values had repeated without its full state, that and the --horizon hint.
std::string timeout_words(time_fs reached, std::uint64_t events, time_fs values_repeat_at,
                          time_fs values_period);
/// Only the hint part (empty when the values never repeated).
std::string values_repeat_words(time_fs values_repeat_at, time_fs values_period);

/// The `settle run` command line that replays a corner (by its name).
using replay_words = std::function<std::string(const std::string& corner)>;

/// `{"culprits":[{"gate":..,"delay_fs":[a,b]}],"paths":[[..],[..]], ...}`;
/// delay_fs are the rise delays, with "fall_fs" added when a gate's rise and
/// fall delays differ.
report_json culprit_json(const netlist& n, const culprit_report& r);

/// `settle run`: one corner's steps, properties and gauges. `corner_name` is
/// used when the result names none; `stopped`: a signal ended the run early.
report_json run_json(const design& d, const run_result& r, const std::string& corner_name,
                     double wall_s, bool stopped);

/// What a sweep report says of where its corners came from.
struct sweep_source {
  std::string_view spec;  ///< --corners as written
  std::uint64_t seed = 0;
  const std::vector<culprit_report>* races = nullptr;  ///< culprits of racing steps, or none
};

/// `settle sweep`: the whole report.
report_json sweep_json(const design& d, const sweep_result& r, const sweep_source& src);
/// The sweep's steps and its whole-run "properties" and "gauges" set into `j`
/// (the part of sweep_json after the head; the margin report's written spread).
void sweep_figures_json(const design& d, const sweep_result& r,
                        const std::vector<culprit_report>* races, report_json& j);

/// What became of a margin baseline: compared, written, or why not.
struct baseline_outcome {
  bool updated = false;
  std::string not_updated;  ///< with --update-baseline and no write: why
};
report_json baseline_json(const std::string& file, const baseline_outcome& out,
                          const baseline_comparison* cmp, const baseline_entry* old,
                          double ceiling_pct);

/// What a margin report says of its search besides the result.
struct margin_source {
  std::string_view spec;  ///< --corners as written
  std::uint64_t seed = 0;
  double resolution_pct = 0, ceiling_pct = 0;
  replay_words replay;   ///< the replay command of a witness corner
  report_json baseline;  ///< baseline_json, or null without --baseline
  bool pass = false;     ///< the verdict, baseline regressions included
};

/// `settle margin`: the whole report.
report_json margin_json(const design& d, const margin_result& r, const margin_source& src);

/// `settle explore`: the whole report; `replay` (may be empty) words the run
/// command of a closed system's timed corners.
report_json explore_json(const design& d, const explore_result& r, double wall_s,
                         const replay_words& replay = {});

}  // namespace settle
