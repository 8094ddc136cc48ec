// The HTML reports: report data as JSON (command result, witness traces, histograms, graphs) inside
// one page.
#include "waves/html.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <limits>
#include <map>
#include <nlohmann/json.hpp>

namespace settle {

// The page's style sheet and script (waves/html_assets.cpp).
extern const char* const html_style;
extern const char* const html_script;

namespace {

using json = report_json;

/// The most nets drawn per waveform panel, and the most outcomes per step.
constexpr std::size_t drawn_net_limit = 64;
constexpr std::size_t drawn_outcome_limit = 8;
/// Busy bands per net when a window is summarised.
constexpr std::size_t summary_buckets = 2000;
constexpr std::size_t histogram_bins = 24;

std::string one(logic v) { return std::string(1, to_char(v)); }

struct page_data {
  json root;
  std::vector<std::string> notes;
};

page_data start(const design& d, const std::vector<net_id>& reported, const html_source& src) {
  page_data p;
  auto& j = p.root;
  j["kind"] = src.command;
  j["design"] = d.path;
  j["version"] = SETTLE_VERSION;
  j["invocation"] = src.invocation.empty() ? html_invocation() : src.invocation;
  j["nets"] = json::array();
  std::size_t outputs = 0;
  for (std::size_t i = 0; i < reported.size() && i < drawn_net_limit; ++i) {
    j["nets"].push_back(d.nets.net_name[reported[i]]);
    if (i < d.nets.outputs.size()) ++outputs;
  }
  j["outputs"] = outputs;
  if (reported.size() > drawn_net_limit)
    p.notes.push_back(fmt::format("{} nets are reported; the waveforms show the first {}.",
                                  reported.size(), drawn_net_limit));
  j["result"] = src.result.is_null() ? json::object() : src.result;
  j["gates"] = d.nets.gate_count();
  j["net_count"] = d.nets.net_count();
  return p;
}

std::vector<net_id> drawn(const std::vector<net_id>& reported) {
  return {reported.begin(), reported.begin() + static_cast<std::ptrdiff_t>(
                                                   std::min(reported.size(), drawn_net_limit))};
}

json trace_json(const std::vector<html_net_trace>& nets) {
  json a = json::array();
  for (const auto& t : nets) {
    json e;
    e["i"] = one(t.initial);
    e["t"] = t.times;
    e["v"] = t.values;
    if (!t.busy.empty()) {
      e["busy"] = json::array();
      for (const auto& [from, to] : t.busy) e["busy"].push_back({from, to});
    }
    a.push_back(std::move(e));
  }
  return a;
}

/// A recorded replay of one corner.
struct replay {
  run_result result;
  std::unique_ptr<html_recorder> rec;
  std::uint64_t changes = 0;  ///< of the drawn nets over the whole run
  bool noted = false;         ///< the page already says this witness is decimated
};

/// The drawn traces of one step of a witness. A witness with more than
/// html_change_limit changes over its whole run is decimated step by step:
/// each step gets its share of the limit and of the busy bands, so the page
/// stays bounded however many steps the run has. The page says so once per
/// witness.
std::vector<html_net_trace> witness_window(replay& r, const step_result& st,
                                           const std::string& witness, page_data& p,
                                           bool* summarised, std::uint64_t* changes) {
  std::uint64_t limit = html_change_limit;
  std::size_t buckets = summary_buckets;
  if (r.changes > html_change_limit) {
    const double share = static_cast<double>(r.rec->changes_between(st.start, st.end)) /
                         static_cast<double>(r.changes);
    limit = std::max<std::uint64_t>(
        1, static_cast<std::uint64_t>(static_cast<double>(html_change_limit) * share));
    buckets = std::max<std::size_t>(
        64, static_cast<std::size_t>(static_cast<double>(summary_buckets) * share));
  }
  auto tr = r.rec->window(st.start, st.end, limit, buckets, summarised, changes);
  // Summarised means something was dropped: a busy band stands for it.
  *summarised =
      std::any_of(tr.begin(), tr.end(), [](const html_net_trace& t) { return !t.busy.empty(); });
  if (*summarised && !r.noted) {
    r.noted = true;
    p.notes.push_back(
        fmt::format("Witness {}: {} value changes over the run, more than {}; its waveforms are "
                    "decimated: dense stretches are drawn as busy bands.",
                    witness, r.changes, html_change_limit));
  }
  return tr;
}

replay replay_corner(const design& d, const corner& c, const run_options& ro,
                     const std::vector<net_id>& nets) {
  replay r;
  r.rec = std::make_unique<html_recorder>(d.nets.net_count(), nets);
  delay_table delays;
  fill_delays(d, c, delays);
  r.result = run_stimulus(d, delays, ro, r.rec.get());
  r.changes = r.rec->changes_between(0, std::numeric_limits<time_fs>::max());
  return r;
}

/// Waveform panels of a sweep: every step that is not deterministic, one lane per outcome's
/// witness.
void sweep_waves(const design& d, const sweep_result& r, const run_options& ro, page_data& p) {
  const auto nets = drawn(r.reported);
  std::map<std::string, replay> replays;
  auto& waves = p.root["waves"] = json::array();
  for (const auto& s : r.steps) {
    if (s.verdict == sweep_verdict::deterministic || s.outcomes.empty())
      continue;  // empty: `interval` alone
    json w;
    w["step"] = s.index;
    w["traces"] = json::array();
    std::vector<std::vector<html_net_trace>> all;
    time_fs span = 1;
    const std::size_t shown = std::min(s.outcomes.size(), drawn_outcome_limit);
    if (s.outcomes.size() > shown)
      p.notes.push_back(
          fmt::format("Step {} has {} outcomes; the waveforms show the {} most common.", s.index,
                      s.outcomes.size(), shown));
    for (std::size_t o = 0; o < shown; ++o) {
      const auto& oc = s.outcomes[o];
      auto it = replays.find(oc.witness_name);
      if (it == replays.end()) {
        std::string err;
        auto c = parse_corner(oc.witness_name, &err);
        if (!c) continue;
        it = replays.emplace(oc.witness_name, replay_corner(d, *c, ro, nets)).first;
      }
      const auto& rr = it->second.result;
      if (s.index == 0 || s.index > rr.steps.size()) continue;
      const auto& st = rr.steps[s.index - 1];
      bool summarised = false;
      std::uint64_t changes = 0;
      auto tr = witness_window(it->second, st, oc.witness_name, p, &summarised, &changes);
      span = std::max(span, st.end - st.start);
      json t;
      t["outcome"] = o + 1;
      t["corner"] = oc.witness_name;
      t["start_fs"] = st.start;
      t["end_fs"] = st.end;
      t["status"] = status_name(st.status);
      t["changes"] = changes;
      t["summarised"] = summarised;
      t["nets"] = trace_json(tr);
      w["traces"].push_back(std::move(t));
      all.push_back(std::move(tr));
    }
    const time_fs diff = first_difference(all);
    w["span_fs"] = span;
    if (diff != std::numeric_limits<time_fs>::max())
      w["diverge_fs"] = diff;
    else
      w["diverge_fs"] = nullptr;
    waves.push_back(std::move(w));
  }
}

void sweep_histograms(const sweep_result& r, page_data& p) {
  auto& hs = p.root["hist"] = json::array();
  for (const auto& s : r.steps) {
    if (s.outcomes.empty()) continue;  // `interval` alone runs no corner
    const auto h = settle_histogram(s.outcomes, histogram_bins);
    json e;
    e["step"] = s.index;
    e["lo_fs"] = h.lo;
    e["hi_fs"] = h.hi;
    e["bins"] = h.counts.empty() ? 1 : h.counts[0].size();
    e["counts"] = h.counts;
    hs.push_back(std::move(e));
  }
}

/// JSON safe inside <script>: '<', '>' and '&' occur only inside strings, where \u escapes mean the
/// same.
std::string script_safe(const json& j) {
  const std::string raw = j.dump(-1, ' ', false, json::error_handler_t::replace);
  std::string out;
  out.reserve(raw.size() + raw.size() / 16);
  for (char c : raw) {
    if (c == '<')
      out += "\\u003c";
    else if (c == '>')
      out += "\\u003e";
    else if (c == '&')
      out += "\\u0026";
    else
      out += c;
  }
  return out;
}

std::string html_text(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '<')
      out += "&lt;";
    else if (c == '>')
      out += "&gt;";
    else if (c == '&')
      out += "&amp;";
    else if (c == '"')
      out += "&quot;";
    else
      out += c;
  }
  return out;
}

std::string page(page_data& p) {
  p.root["notes"] = p.notes;
  const std::string title = fmt::format("settle {} report: {}", p.root["kind"].get<std::string>(),
                                        p.root["design"].get<std::string>());
  std::string out;
  out += "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n";
  out += "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n";
  out +=
      "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src "
      "'unsafe-inline'; "
      "script-src 'unsafe-inline'; img-src data:\">\n";
  out += "<title>" + html_text(title) + "</title>\n<style>\n";
  out += html_style;
  out += "</style>\n</head>\n<body data-errors=\"0\" data-rendered=\"0\">\n";
  out +=
      "<noscript><p class=\"noscript\">This report draws itself with its inline script; enable "
      "scripts to see "
      "it. The data are in the JSON block of this file.</p></noscript>\n";
  out += "<main id=\"report\"></main>\n";
  out +=
      "<script type=\"application/json\" id=\"settle-data\">" + script_safe(p.root) + "</script>\n";
  out += "<script>\n";
  out += html_script;
  out += "</script>\n</body>\n</html>\n";
  return out;
}

}  // namespace

std::string html_report_run(const design& d, const corner& c, const run_options& ro,
                            const html_source& src) {
  std::vector<net_id> reported = d.nets.outputs;
  reported.insert(reported.end(), d.stim.watch.begin(), d.stim.watch.end());
  auto p = start(d, reported, src);
  const auto nets = drawn(reported);
  auto rep = replay_corner(d, c, ro, nets);
  auto& waves = p.root["waves"] = json::array();
  for (const auto& st : rep.result.steps) {
    bool summarised = false;
    std::uint64_t changes = 0;
    auto tr = witness_window(rep, st, c.name(), p, &summarised, &changes);
    json t;
    t["outcome"] = 1;
    t["corner"] = c.name();
    t["start_fs"] = st.start;
    t["end_fs"] = st.end;
    t["status"] = status_name(st.status);
    t["changes"] = changes;
    t["summarised"] = summarised;
    t["nets"] = trace_json(tr);
    json w;
    w["step"] = st.index;
    w["span_fs"] = std::max<time_fs>(st.end - st.start, 1);
    w["diverge_fs"] = nullptr;
    w["traces"] = json::array({std::move(t)});
    waves.push_back(std::move(w));
  }
  return page(p);
}

std::string html_report_sweep(const design& d, const sweep_result& r, const run_options& ro,
                              const html_source& src) {
  auto p = start(d, r.reported, src);
  sweep_waves(d, r, ro, p);
  sweep_histograms(r, p);
  return page(p);
}

std::string html_report_margin(const design& d, const margin_result& r, const run_options& ro,
                               const html_source& src) {
  auto p = start(d, r.written.reported, src);
  auto& written = p.root["written"] = {{"corners", r.written.corners}};
  sweep_figures_json(d, r.written, nullptr, written);
  run_options wro = ro;
  if (wro.horizon == 0) wro.horizon = default_horizon(d.nets);
  sweep_waves(d, r.written, wro, p);
  sweep_histograms(r.written, p);
  return page(p);
}

std::string html_report_mtbf(const design& d, const html_source& src) {
  auto p = start(d, {}, src);
  return page(p);
}

std::string html_report_explore(const design& d, const explore_result& r, const html_source& src) {
  auto p = start(d, r.reported, src);
  p.root["state_order"] =
      state_order_text(d.nets);  // the gates behind each character of a node's label
  auto& graphs = p.root["graphs"] = json::array();
  for (const auto& s : r.steps) {
    if (!s.graph) continue;
    const state_graph& g = *s.graph;
    if (g.size() > html_graph_limit) {
      p.notes.push_back(
          fmt::format("Step {}: {} states, more than {}; the state graph is not drawn.", s.index,
                      g.size(), html_graph_limit));
      continue;
    }
    const auto at = layer_layout(g);
    json e;
    e["step"] = s.index;
    e["nodes"] = json::array();
    for (std::uint32_t i = 0; i < g.size(); ++i) {
      const std::string bits = g.bits_text(i);
      std::string label;
      for (net_id net : drawn(r.reported)) {
        const gate_id drv = d.nets.driver[net];
        const char v = drv == no_id ? (net < s.inputs.size() ? to_char(s.inputs[net]) : 'x')
                                    : (g.bit(i, drv) ? '1' : '0');
        label += v;
      }
      const bool explored = i < g.explored;
      e["nodes"].push_back({{"layer", at[i].first},
                            {"pos", at[i].second},
                            {"stable", explored && g.is_stable(i)},
                            {"start", i < g.starts},
                            {"values", label},
                            {"state", bits}});
    }
    e["edges"] = json::array();
    for (std::uint32_t i = 0; i < g.explored && i + 1 < g.edge_begin.size(); ++i)
      for (std::uint32_t k = g.edge_begin[i]; k < g.edge_begin[i + 1]; ++k) {
        const std::uint32_t to = g.edge_to[k];
        std::string fired;
        for (gate_id q = 0; q < d.nets.gate_count(); ++q)
          if (g.bit(i, q) != g.bit(to, q))
            fired += (fired.empty() ? "" : " ") + d.nets.gate_name(q);
        e["edges"].push_back({i, to, fired});
      }
    graphs.push_back(std::move(e));
  }
  return page(p);
}

}  // namespace settle
