// Baseline files: JSON read/write with a format version, merging entries, and comparison with a
// tolerance.
#include "sim/analysis/baseline.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <nlohmann/json.hpp>

namespace settle {
namespace {

using json = nlohmann::ordered_json;

double pct(double w) { return std::round(w * 100.0 * 1e6) / 1e6; }  // no float dust in the file

// Thrown inside parse_baseline only (never past it): a field with the wrong
// type or value, named by its entry and path.
struct bad_field {
  std::string what;
};

// Reads the fields of one JSON object, naming `where` (`entry "a.settle"`,
// `entry "a.settle", steps[2]`) in every complaint.
class fields {
 public:
  fields(const json& j, std::string where) : j_(j), where_(std::move(where)) {}

  [[noreturn]] void fail(const char* key, const std::string& why) const {
    throw bad_field{where_.empty() ? fmt::format("field \"{}\": {}", key, why)
                                   : fmt::format("{}, field \"{}\": {}", where_, key, why)};
  }
  const json* find(const char* key, bool required) const {
    auto it = j_.find(key);
    if (it == j_.end() || it->is_null()) {
      if (required) fail(key, "missing");
      return nullptr;
    }
    return &*it;
  }
  std::string text(const char* key, bool required, std::string fallback = {}) const {
    const json* v = find(key, required);
    if (!v) return fallback;
    if (!v->is_string()) fail(key, "expected a string");
    return v->get<std::string>();
  }
  bool flag(const char* key, bool fallback) const {
    const json* v = find(key, false);
    if (!v) return fallback;
    if (!v->is_boolean()) fail(key, "expected true or false");
    return v->get<bool>();
  }
  double percent(const char* key, bool required, double fallback) const {
    const json* v = find(key, required);
    if (!v) return fallback;
    if (!v->is_number()) fail(key, "expected a number");
    const double x = v->get<double>();
    if (!std::isfinite(x) || x < 0) fail(key, "expected a number of percent, 0 or more");
    return x;
  }
  std::uint64_t whole(const char* key, bool required, std::uint64_t fallback,
                      std::uint64_t least = 0) const {
    const json* v = find(key, required);
    if (!v) return fallback;
    if (!v->is_number_unsigned())
      fail(key, fmt::format("expected a whole number, {} or more", least));
    const auto x = v->get<std::uint64_t>();
    if (x < least) fail(key, fmt::format("expected a whole number, {} or more", least));
    return x;
  }
  std::int64_t signed_whole(const char* key, bool required) const {
    const json* v = find(key, required);
    if (!v) return 0;
    if (!v->is_number_integer()) fail(key, "expected a whole number");
    if (v->is_number_unsigned() && v->get<std::uint64_t>() > static_cast<std::uint64_t>(INT64_MAX))
      fail(key, "expected a whole number within 64-bit range");
    return v->get<std::int64_t>();
  }
  /// The array at `key` (empty when absent).
  const json& list(const char* key) const {
    static const json empty = json::array();
    const json* v = find(key, false);
    if (!v) return empty;
    if (!v->is_array()) fail(key, "expected an array");
    return *v;
  }
  const std::string& where() const { return where_; }

 private:
  const json& j_;
  std::string where_;
};

baseline_entry read_entry(const json& d, std::size_t number) {
  if (!d.is_object())
    throw bad_field{fmt::format("entry #{} of \"designs\": expected an object", number)};
  // An entry is named by its design path once that is known to be a string.
  auto it = d.find("design");
  const bool named = it != d.end() && it->is_string();
  fields f(d, named ? fmt::format("entry \"{}\"", it->get<std::string>())
                    : fmt::format("entry #{}", number));
  baseline_entry e;
  e.design = f.text("design", true);
  e.stim = f.text("stim", false);
  e.spec = f.text("spec", false);
  e.seed = f.whole("seed", false, 1);
  e.resolution_pct = f.percent("resolution_pct", false, 1);
  e.ceiling_pct = f.percent("ceiling_pct", false, 100);
  e.margin_pct = f.percent("margin_pct", true, 0);
  e.at_least = f.flag("at_least", false);
  std::size_t k = 0;
  for (const auto& s : f.list("steps")) {
    const std::string where = fmt::format("{}, steps[{}]", f.where(), k++);
    if (!s.is_object()) throw bad_field{where + ": expected an object"};
    fields g(s, where);
    baseline_step st;
    st.index = g.whole("index", true, 0, 1);
    st.label = g.text("label", false);
    st.margin_pct = g.percent("margin_pct", true, 0);
    st.at_least = g.flag("at_least", false);
    e.steps.push_back(std::move(st));
  }
  k = 0;
  for (const auto& w : f.list("settle_within")) {
    const std::string where = fmt::format("{}, settle_within[{}]", f.where(), k++);
    if (!w.is_object()) throw bad_field{where + ": expected an object"};
    fields g(w, where);
    baseline_within bw;
    bw.step = g.whole("step", true, 0, 1);
    bw.ordinal = g.whole("ordinal", false, 0);
    bw.budget = g.whole("budget_fs", true, 0);
    bw.margin_fs = g.signed_whole("margin_fs", true);
    bw.unsettled = g.whole("unsettled", false, 0);
    e.within.push_back(bw);
  }
  return e;
}

std::string step_words(std::size_t index, const std::string& label) {
  return label.empty() ? fmt::format("step {}", index) : fmt::format("step {} ({})", index, label);
}

}  // namespace

bool baseline_comparison::regressed() const {
  return std::any_of(changes.begin(), changes.end(),
                     [](const baseline_change& c) { return c.regression; });
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
  const json& version = j["format_version"];
  if (version.is_number_unsigned()
          ? version.get<std::uint64_t>() > static_cast<std::uint64_t>(baseline_format_version)
          : false)
    return fail(
        fmt::format("format_version {} was written by a newer settle; this one reads up to {}",
                    version.dump(), baseline_format_version));
  if (!version.is_number_unsigned() || version.get<std::uint64_t>() < 1)
    return fail(fmt::format("format_version {} is not valid (1 or more)", version.dump()));
  f.format_version = static_cast<int>(version.get<std::uint64_t>());
  try {
    fields top(j, "");
    f.written_by = top.text("written_by", false);
    if (!j.contains("designs") || !j["designs"].is_array())
      return fail("no \"designs\" array of entries");
    std::size_t number = 0;
    for (const auto& d : j["designs"]) f.designs.push_back(read_entry(d, ++number));
  } catch (const bad_field& bad) {
    return fail(bad.what);
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
      d["steps"].push_back({{"index", s.index},
                            {"label", s.label},
                            {"margin_pct", s.margin_pct},
                            {"at_least", s.at_least}});
    d["settle_within"] = json::array();
    for (const auto& w : e.within)
      d["settle_within"].push_back({{"step", w.step},
                                    {"ordinal", w.ordinal},
                                    {"budget_fs", w.budget},
                                    {"margin_fs", w.margin_fs},
                                    {"unsettled", w.unsettled}});
    j["designs"].push_back(std::move(d));
  }
  return j.dump(2) + "\n";
}

baseline_entry baseline_of(const design& d, const std::string& design_path,
                           const std::string& stim_path, const margin_options& o,
                           const margin_result& r) {
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
  // The new entry takes the place of the first with its key; any further
  // entry with that key (a file edited by hand) goes, so one remains.
  auto same = [&](const baseline_entry& old) {
    return old.design == e.design && old.stim == e.stim;
  };
  auto first = std::find_if(f.designs.begin(), f.designs.end(), same);
  if (first == f.designs.end()) {
    f.designs.push_back(std::move(e));
    return;
  }
  const auto at = first - f.designs.begin();
  f.designs.erase(std::remove_if(first + 1, f.designs.end(), same), f.designs.end());
  f.designs[static_cast<std::size_t>(at)] = std::move(e);
}

const baseline_entry* find_entry(const baseline_file& f, const std::string& design_path,
                                 const std::string& stim_path) {
  for (const auto& e : f.designs)
    if (e.design == design_path && e.stim == stim_path) return &e;
  return nullptr;
}

baseline_comparison compare_baseline(const baseline_entry& before, const baseline_entry& now,
                                     double tolerance_pct) {
  baseline_comparison c;
  // b and a are the margins before and now; a flag marks a lower bound (the
  // search passed at its ceiling, so the margin is at least that figure).
  auto note_change = [&](std::string what, double b, bool b_least, double a, bool a_least) {
    if (a == b && a_least == b_least) return;
    // A lower bound that the new run meets or beats is no change for the worse.
    if (b_least && !a_least && a >= b) return;
    if (a_least && a < b) {
      // This run could see no further than its ceiling: the old figure is
      // compared only up to it, so a margin at the ceiling never shrinks.
      c.capped = true;
      c.notes.push_back(
          fmt::format("{}: >= {:g}% now (this run's ceiling) against {}{:g}% in the baseline; not "
                      "compared above {:g}%",
                      what, a, b_least ? ">= " : "", b, a));
      return;
    }
    const double compared = a_least ? std::min(b, now.ceiling_pct) : b;
    c.changes.push_back(
        {std::move(what), b, a, compared - a > tolerance_pct + 1e-9, b_least, a_least});
  };
  if (before.spec != now.spec || before.seed != now.seed)
    c.notes.push_back(fmt::format(
        "the baseline was found with --corners {} --seed {}, this run with --corners {} --seed {}",
        before.spec, before.seed, now.spec, now.seed));
  if (before.resolution_pct != now.resolution_pct)
    c.notes.push_back(fmt::format("resolution {:g}% in the baseline, {:g}% now",
                                  before.resolution_pct, now.resolution_pct));
  if (before.ceiling_pct != now.ceiling_pct)
    c.notes.push_back(fmt::format(
        "searched up to {:g}% in the baseline, up to {:g}% now: a margin at either ceiling is "
        "a lower bound",
        before.ceiling_pct, now.ceiling_pct));
  note_change("design", before.margin_pct, before.at_least, now.margin_pct, now.at_least);
  for (const auto& b : before.steps) {
    auto it = std::find_if(now.steps.begin(), now.steps.end(),
                           [&](const baseline_step& s) { return s.index == b.index; });
    if (it == now.steps.end()) {
      c.notes.push_back(fmt::format("{} is in the baseline but not in the stimulus now",
                                    step_words(b.index, b.label)));
      continue;
    }
    if (it->label != b.label)
      c.notes.push_back(
          fmt::format("step {} changed from '{}' to '{}'", b.index, b.label, it->label));
    note_change(step_words(it->index, it->label), b.margin_pct, b.at_least, it->margin_pct,
                it->at_least);
  }
  for (const auto& s : now.steps)
    if (std::none_of(before.steps.begin(), before.steps.end(),
                     [&](const baseline_step& b) { return b.index == s.index; }))
      c.notes.push_back(fmt::format("{} is new: no baseline", step_words(s.index, s.label)));
  for (const auto& b : before.within) {
    auto it = std::find_if(now.within.begin(), now.within.end(), [&](const baseline_within& w) {
      return w.step == b.step && w.ordinal == b.ordinal;
    });
    if (it == now.within.end()) continue;
    const std::string what =
        fmt::format("settle within {} of step {}", format_time(it->budget), it->step);
    if (it->unsettled > 0 && b.unsettled == 0) {
      c.changes.push_back({what + fmt::format(" (no longer settles in {} corners)", it->unsettled),
                           b.margin_pct(), it->margin_pct(), true, false, false});
      continue;
    }
    note_change(what, b.margin_pct(), false, it->margin_pct(), false);
  }
  std::stable_sort(c.changes.begin(), c.changes.end(),
                   [](const baseline_change& x, const baseline_change& y) {
                     return x.regression && !y.regression;
                   });
  return c;
}

}  // namespace settle
