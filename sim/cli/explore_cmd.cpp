// `settle explore`: every interleaving under unbounded gate delays, and ternary simulation.
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <chrono>
#include <cstdio>
#include <fstream>
#include <memory>
#include <optional>

#include "sim/analysis/explore.hpp"
#include "sim/cli/command.hpp"
#include "sim/cli/report_common.hpp"
#include "waves/dot.hpp"
#include "waves/html.hpp"
#include "waves/json.hpp"

namespace settle::cli {
namespace {

constexpr std::uint64_t dot_state_limit = 5000;

struct explore_cli_options {
  design_options design;
  std::string model = "gmw";
  std::uint64_t max_states = 2'000'000;
  std::uint64_t max_memory_mib = 0;  ///< --max-memory; 0: the default guard
  std::string json, dot, html;
};

std::string yes_no(answer a, const char* yes) {
  return a == answer::unknown ? "?" : a == answer::yes ? yes : "no";
}

// A firing sequence in words: "reader_req=1, rule 3, (a=0 b=1)": one item per
// instant, the firings of one instant in parentheses.
std::string path_words(const design& d, const closed_path& p, std::size_t most = 12) {
  std::string out;
  for (std::size_t i = 0; i < p.size() && i < most; ++i) {
    std::string in;
    for (const auto& e : p[i])
      in += (in.empty() ? "" : " ") + (e.what == closed_event::kind::gate
                                           ? fmt::format("{}={}", d.nets.gate_name(e.id), e.value)
                                           : fmt::format("rule {}", e.id + 1));
    out += (i ? ", " : "") + (p[i].size() > 1 ? "(" + in + ")" : in);
  }
  if (p.size() > most) out += fmt::format(", ... ({} instants)", p.size());
  return out.empty() ? "at the step's start" : out;
}

std::string timed_words(const timed_check& t) {
  if (t.feasible)
    return fmt::format("timed: corner {}{}", t.corner,
                       t.confirmed ? " (replayed)" : " (not confirmed by a run: " + t.why + ")");
  return fmt::format("timed: {} ({})", t.exact ? "no delays within the ranges" : "not decided",
                     t.why);
}

std::string closed_findings(const design& d, const explore_step& s, bool colour) {
  std::string t;
  for (const auto& f : s.deadlocks) {
    std::string owed;
    for (const auto& o : f.owed_rules)
      owed += fmt::format("{}rule {} ({} of {} firings)", owed.empty() ? "" : ", ", o.rule + 1,
                          o.fired, o.times);
    t += fmt::format("        {} with {} owed, after {}\n", mark("deadlock", false, colour), owed,
                     path_words(d, f.path));
    t += fmt::format("          {}\n", timed_words(f.timed));
  }
  for (const auto& p : s.properties) {
    if (p.holds) continue;
    t += fmt::format("        {} '{}' after {}\n", mark("violated", false, colour),
                     d.stim.properties[p.index].text, path_words(d, p.path));
    t += fmt::format("          {}\n", timed_words(p.timed));
  }
  if (!s.nonpersistent.empty()) {
    std::string gates;
    for (const auto& h : s.nonpersistent)
      gates +=
          (gates.empty() ? "" : ", ") + d.nets.gate_name(h.gate) + (h.output ? " (output)" : "");
    t += fmt::format("        not persistent: {}\n", gates);
  }
  return t;
}

std::string table(const design& d, const explore_result& r, double wall, bool colour) {
  const netlist& n = d.nets;
  std::string t = fmt::format("settle explore {} (model {}, {} gates)\n", d.path,
                              model_name(r.model), n.gate_count());
  for (const auto& note : r.notes) t += fmt::format("  note: {}\n", note);
  t += fmt::format("{:>4}  {:<28} {:>9} {:>6}  {:<12} {:<12} {:<16} {}\n", "step", "inputs",
                   "states", "stable", "race", "oscillation", "hazards", "ternary x");
  for (const auto& s : r.steps) {
    std::string label = s.label.size() > 28 ? s.label.substr(0, 25) + "..." : s.label;
    // A critical race is a finding: marked in capitals (mark), like every finding.
    std::string race = s.critical_race == answer::yes      ? "CRITICAL"
                       : s.noncritical_race == answer::yes ? "non-critical"
                       : s.critical_race == answer::no
                           ? (s.noncritical_race == answer::no ? "none" : "not critical")
                           : "?";
    std::string osc = s.must_oscillate == answer::yes  ? "must"
                      : s.may_oscillate == answer::yes ? "may"
                                                       : yes_no(s.may_oscillate, "may");
    // An oscillation no `expect oscillating` asked for is a finding too (capitals,
    // never coloured inside the table, so its columns stay aligned).
    if (!s.pass() && (osc == "must" || osc == "may")) osc = mark(osc, false, false);
    std::string hz, tx;
    for (net_id h : s.hazards) hz += (hz.empty() ? "" : ",") + n.net_name[h];
    for (net_id net : r.reported)
      if (s.ternary[net] == logic::x) tx += (tx.empty() ? "" : ",") + n.net_name[net];
    std::string states = s.explored ? fmt::format("{}{}", s.states, s.complete ? "" : "+") : "-";
    std::string stable = s.exact ? std::to_string(s.stable.size()) : "?";
    t += fmt::format("{:>4}  {:<28} {:>9} {:>6}  {:<12} {:<12} {:<16} {}\n", s.index, label, states,
                     stable, race, osc, hz.empty() ? "-" : hz, tx.empty() ? "-" : tx);
    const std::size_t shown = std::min<std::size_t>(s.stable.size(), 6);
    for (std::size_t i = 0; i < shown && s.stable.size() > 1; ++i) {
      std::string v;
      for (net_id net : r.reported)
        v += fmt::format(" {}={}", n.net_name[net], to_char(stable_value(n, s, s.stable[i], net)));
      t += fmt::format("        stable {}:{}\n", i + 1, v);
    }
    if (s.stable.size() > shown)
      t += fmt::format("        ... and {} more stable states\n", s.stable.size() - shown);
    if (!s.stop.empty() && s.stop != "ternary model")
      t += fmt::format("        stopped: {}\n", s.stop);
    if (s.closed) t += closed_findings(d, s, colour);
    for (const auto& e : s.expects) {
      if (e.pass && e.checked) continue;
      const std::string what =
          e.spec->what == expectation::kind::value
              ? fmt::format("{} = {}", e.spec->ref.empty() ? n.net_name[e.spec->net] : e.spec->ref,
                            to_char(e.spec->want))
              : expect_kind_word(e.spec->what);
      t += fmt::format("        expect {}: {}{}\n", what,
                       !e.checked ? "not checked" : mark("fail", false, colour),
                       e.detail.empty() ? "" : " (" + e.detail + ")");
    }
  }
  t += fmt::format("result: {} ({:.3f} s)\n",
                   mark(r.pass() ? "pass" : "findings", r.pass(), colour), wall);
  return t;
}

// The text of line `line` (1-based) of `path`, or nullopt when it cannot be read.
std::optional<std::string> line_of(const std::string& path, std::uint32_t line) {
  std::ifstream in(path, std::ios::binary);
  std::string text;
  for (std::uint32_t i = 0; in && i < line; ++i)
    if (!std::getline(in, text)) return std::nullopt;
  if (!text.empty() && text.back() == '\r') text.pop_back();
  return text;
}

// The engine names a stimulus position as "DESIGN:LINE:COL: why". The
// stimulus came from the --stim file when one was given: print it as a
// diagnostic of that file, with its source line and a caret.
void report_explore_error(const design_options& o, const std::string& design_path,
                          const std::string& err) {
  const std::string prefix = design_path + ":";
  unsigned line = 0, col = 0;
  int used = 0;
  if (err.starts_with(prefix) &&
      std::sscanf(err.c_str() + prefix.size(), "%u:%u: %n", &line, &col, &used) == 2 && used > 0 &&
      line > 0) {
    diagnostic dg;
    dg.file = o.stim.empty() ? design_path : o.stim;
    dg.line = line;
    dg.col = col;
    dg.message = err.substr(prefix.size() + static_cast<std::size_t>(used));
    if (auto text = line_of(dg.file, line)) set_source_line(dg, *text);
    diagnostics diags;
    diags.add(std::move(dg));
    print_diagnostics(diags);
    return;
  }
  spdlog::error("{}", err);
}

exit_status run_explore(const explore_cli_options& o) {
  explore_options eo;
  eo.model = o.model == "single"    ? explore_model::single
             : o.model == "ternary" ? explore_model::ternary
                                    : explore_model::gmw;
  eo.max_states = o.max_states;
  eo.max_bytes = o.max_memory_mib << 20;
  eo.keep_graphs = !o.dot.empty() || !o.html.empty();
  if (!o.dot.empty() && eo.model == explore_model::ternary) {
    spdlog::error("--dot needs a state graph: use --model gmw or single");
    return exit_status::error;
  }
  auto uses = design_inputs(o.design);
  for (const auto& [opt, path] :
       {std::pair{"--json", &o.json}, {"--dot", &o.dot}, {"--html", &o.html}})
    uses.push_back({path_use::kind::output, opt, *path, ""});
  if (!check_paths(uses)) return exit_status::error;
  auto d = load(o.design);
  if (!d) return exit_status::error;
  const auto t0 = std::chrono::steady_clock::now();
  std::string err;
  auto r = explore_design(*d, eo, &err);
  if (!r) {
    report_explore_error(o.design, d->path, err);
    return exit_status::error;
  }
  const double wall = seconds_since(t0);
  if (!o.dot.empty() && kept_states(*r) > dot_state_limit) {
    spdlog::error(
        "--dot: the explored graphs hold {} states; DOT output is for designs up to {} states",
        kept_states(*r), dot_state_limit);
    return exit_status::error;
  }
  output_set outs;  // all or nothing
  const report_json result = o.json.empty() && o.html.empty()
                                 ? report_json()
                                 : explore_json(*d, *r, wall, [&](const std::string& c) {
                                     return replay_command(o.design, c);
                                   });
  if (!o.json.empty() && !outs.put(o.json, json_text(result))) return exit_status::error;
  if (!o.dot.empty() && !outs.put(o.dot, state_graph_dot(d->nets, *r, d->path)))
    return exit_status::error;
  if (!o.html.empty() && !outs.put(o.html, html_report_explore(*d, *r, {"explore", result, ""})))
    return exit_status::error;
  if (!outs.commit()) return exit_status::error;
  if (o.json != "-" && o.dot != "-" && o.html != "-")
    std::fputs(table(*d, *r, wall, use_colour(1)).c_str(), stdout);
  return r->pass() ? exit_status::ok : exit_status::findings;
}

void add_explore(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<explore_cli_options>();
  auto* cmd = app.add_subcommand(
      "explore", "every interleaving under unbounded gate delays, and ternary simulation");
  add_design_options(*cmd, o->design);
  cmd->add_option("--model", o->model,
                  "gmw (any subset of excited gates fires, default), single, or ternary")
      ->check(one_of({"gmw", "single", "ternary"}));
  check_whole_number(
      cmd->add_option("--max-states", o->max_states, "state budget per step (default 2,000,000)"),
      1, UINT64_MAX, "the state budget");
  auto* mem = cmd->add_option(
      "--max-memory", o->max_memory_mib,
      fmt::format(
          "memory the stored state graphs may hold, in MiB; past it the step stops incomplete "
          "(default {}, or half the available memory when less)",
          default_max_memory_mib));
  check_whole_number(mem, 1, std::uint64_t{1} << 40, "the memory in MiB");
  add_json_option(*cmd, o->json);
  check_output_path(
      cmd->add_option("--dot", o->dot, "write the explored state graphs as Graphviz DOT to PATH"));
  add_html_option(*cmd, o->html, "stable states, small state graphs");
  cmd->callback([o, &status] { status = run_explore(*o); });
}

}  // namespace

SETTLE_COMMAND(explore, "explore", add_explore);

}  // namespace settle::cli
