// Baseline files: JSON read/write with a format version, merging entries, and comparison with a tolerance.
#include "sim/baseline.hpp"

#include <algorithm>
#include <cmath>

#include <fmt/format.h>
#include <nlohmann/json.hpp>

namespace settle {
namespace {

using json = nlohmann::ordered_json;

double pct(double w) { return std::round(w * 100.0 * 1e6) / 1e6; }  // no float dust in the file

template <class T>
T get_or(const json& j, const char* key, T fallback) {
  auto it = j.find(key);
  return it == j.end() || it->is_null() ? fallback : it->get<T>();
}

std::string step_words(std::size_t index, const std::string& label) {
  return label.empty() ? fmt::format("step {}", index) : fmt::format("step {} ({})", index, label);
}

}  // namespace

bool baseline_comparison::regressed() const {
  return std::any_of(changes.begin(), changes.end(), [](const baseline_change& c) { return c.regression; });
}

std::optional<baseline_file> parse_baseline(std::string_view text, std::string* error) {
  auto fail = [&](std::string why) -> std::optional<baseline_file> {
    if (error) *error = std::move(why);
    return std::nullopt;
  };
  json j = json::parse(text.begin(), text.end(), nullptr, false);
  if (j.is_discarded()) return fail("not valid JSON");
  if (!j.is_object() || !j.contains("format_version") || !j["format_version"].is_number_integer())
    return fail("no integer \"format_version\": not a settle baseline file");
  baseline_file f;
  f.format_version = j["format_version"].get<int>();
  if (f.format_version < 1) return fail(fmt::format("format_version {} is not valid", f.format_version));
  if (f.format_version > baseline_format_version)
    return fail(fmt::format("format_version {} was written by a newer settle; this one reads up to {}",
                            f.format_version, baseline_format_version));
  try {
    f.written_by = get_or<std::string>(j, "written_by", "");
    if (!j.contains("designs") || !j["designs"].is_array()) return fail("no \"designs\" array");
    for (const auto& d : j["designs"]) {
      baseline_entry e;
      e.design = d.at("design").get<std::string>();
      e.stim = get_or<std::string>(d, "stim", "");
      e.spec = get_or<std::string>(d, "spec", "");
      e.seed = get_or<std::uint64_t>(d, "seed", 1);
      e.resolution_pct = get_or<double>(d, "resolution_pct", 1);
      e.ceiling_pct = get_or<double>(d, "ceiling_pct", 100);
      e.margin_pct = d.at("margin_pct").get<double>();
      e.at_least = get_or<bool>(d, "at_least", false);
      for (const auto& s : d.value("steps", json::array())) {
        baseline_step st;
        st.index = s.at("index").get<std::size_t>();
        st.label = get_or<std::string>(s, "label", "");
        st.margin_pct = s.at("margin_pct").get<double>();
        st.at_least = get_or<bool>(s, "at_least", false);
        e.steps.push_back(std::move(st));
      }
      for (const auto& w : d.value("settle_within", json::array())) {
        baseline_within bw;
        bw.step = w.at("step").get<std::size_t>();
        bw.ordinal = get_or<std::size_t>(w, "ordinal", 0);
        bw.budget = w.at("budget_fs").get<time_fs>();
        bw.margin_fs = w.at("margin_fs").get<std::int64_t>();
        bw.unsettled = get_or<std::uint64_t>(w, "unsettled", 0);
        e.within.push_back(bw);
      }
      f.designs.push_back(std::move(e));
    }
  } catch (const json::exception& ex) {
    return fail(fmt::format("malformed entry: {}", ex.what()));
  }
  return f;
}

std::string baseline_text(const baseline_file& f) {
  json j;
  j["format_version"] = f.format_version;
  j["written_by"] = f.written_by;
  j["designs"] = json::array();
  for (const auto& e : f.designs) {
    json d;
    d["design"] = e.design;
    if (!e.stim.empty()) d["stim"] = e.stim;
    d["spec"] = e.spec;
    d["seed"] = e.seed;
    d["resolution_pct"] = e.resolution_pct;
    d["ceiling_pct"] = e.ceiling_pct;
    d["margin_pct"] = e.margin_pct;
    d["at_least"] = e.at_least;
    d["steps"] = json::array();
    for (const auto& s : e.steps)
      d["steps"].push_back({{"index", s.index}, {"label", s.label}, {"margin_pct", s.margin_pct}, {"at_least", s.at_least}});
    d["settle_within"] = json::array();
    for (const auto& w : e.within)
      d["settle_within"].push_back({{"step", w.step}, {"ordinal", w.ordinal}, {"budget_fs", w.budget},
                                    {"margin_fs", w.margin_fs}, {"unsettled", w.unsettled}});
    j["designs"].push_back(std::move(d));
  }
  return j.dump(2) + "\n";
}

baseline_entry baseline_of(const design& d, const std::string& design_path, const std::string& stim_path,
                           const margin_options& o, const margin_result& r) {
  (void)d;
  baseline_entry e;
  e.design = design_path;
  e.stim = stim_path;
  e.spec = o.spec;
  e.seed = o.seed;
  e.resolution_pct = o.resolution_pct;
  e.ceiling_pct = o.ceiling_pct;
  e.margin_pct = pct(r.margin);
  e.at_least = r.at_ceiling;
  for (const auto& s : r.steps) e.steps.push_back({s.index, s.label, pct(s.margin), s.at_ceiling});
  std::size_t last_step = 0, ordinal = 0;
  for (const auto& w : r.within) {
    ordinal = w.step == last_step ? ordinal + 1 : 0;
    last_step = w.step;
    e.within.push_back({w.step, ordinal, w.budget, w.margin_fs, w.unsettled});
  }
  return e;
}

void merge_entry(baseline_file& f, baseline_entry e) {
  for (auto& old : f.designs)
    if (old.design == e.design && old.stim == e.stim) {
      old = std::move(e);
      return;
    }
  f.designs.push_back(std::move(e));
}

const baseline_entry* find_entry(const baseline_file& f, const std::string& design_path, const std::string& stim_path) {
  for (const auto& e : f.designs)
    if (e.design == design_path && e.stim == stim_path) return &e;
  return nullptr;
}

baseline_comparison compare_baseline(const baseline_entry& before, const baseline_entry& now, double tolerance_pct) {
  baseline_comparison c;
  auto note_change = [&](std::string what, double b, double a, bool lower_bound_before) {
    if (a == b) return;
    // A lower bound that the new run meets or beats is no change for the worse.
    if (lower_bound_before && a >= b) return;
    c.changes.push_back({std::move(what), b, a, b - a > tolerance_pct + 1e-9});
  };
  if (before.spec != now.spec || before.seed != now.seed)
    c.notes.push_back(fmt::format("the baseline was found with --corners {} --seed {}, this run with --corners {} --seed {}",
                                  before.spec, before.seed, now.spec, now.seed));
  if (before.resolution_pct != now.resolution_pct)
    c.notes.push_back(fmt::format("resolution {}% in the baseline, {}% now", before.resolution_pct, now.resolution_pct));
  note_change("design", before.margin_pct, now.margin_pct, before.at_least);
  for (const auto& b : before.steps) {
    auto it = std::find_if(now.steps.begin(), now.steps.end(), [&](const baseline_step& s) { return s.index == b.index; });
    if (it == now.steps.end()) {
      c.notes.push_back(fmt::format("{} is in the baseline but not in the stimulus now", step_words(b.index, b.label)));
      continue;
    }
    if (it->label != b.label)
      c.notes.push_back(fmt::format("step {} changed from '{}' to '{}'", b.index, b.label, it->label));
    note_change(step_words(it->index, it->label), b.margin_pct, it->margin_pct, b.at_least);
  }
  for (const auto& s : now.steps)
    if (std::none_of(before.steps.begin(), before.steps.end(), [&](const baseline_step& b) { return b.index == s.index; }))
      c.notes.push_back(fmt::format("{} is new: no baseline", step_words(s.index, s.label)));
  for (const auto& b : before.within) {
    auto it = std::find_if(now.within.begin(), now.within.end(), [&](const baseline_within& w) {
      return w.step == b.step && w.ordinal == b.ordinal;
    });
    if (it == now.within.end()) continue;
    const std::string what = fmt::format("settle within {} of step {}", format_time(it->budget), it->step);
    if (it->unsettled > 0 && b.unsettled == 0) {
      c.changes.push_back({what + fmt::format(" (no longer settles in {} corners)", it->unsettled), b.margin_pct(),
                           it->margin_pct(), true});
      continue;
    }
    note_change(what, b.margin_pct(), it->margin_pct(), false);
  }
  std::stable_sort(c.changes.begin(), c.changes.end(),
                   [](const baseline_change& x, const baseline_change& y) { return x.regression && !y.regression; });
  return c;
}

}  // namespace settle
