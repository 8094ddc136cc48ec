// `settle margin`: the delay-spread margin of every step, settle-time margins, baselines and JUnit
// XML.
#include <fmt/color.h>
#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <cerrno>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <memory>
#include <sstream>

#include "sim/analysis/baseline.hpp"
#include "sim/analysis/baseline_store.hpp"
#include "sim/analysis/margin.hpp"
#include "sim/cli/command.hpp"
#include "sim/cli/interrupt.hpp"
#include "sim/cli/report_common.hpp"
#include "sim/model/time_parse.hpp"
#include "waves/html.hpp"
#include "waves/json.hpp"
#include "waves/junit.hpp"

namespace settle::cli {
namespace {

struct margin_cli_options {
  design_options design;
  std::string corners = "extremes+random:200";
  std::uint64_t seed = 1;
  unsigned threads = 0;
  double resolution = 1.0, ceiling = 100.0, tolerance = 2.0;
  double timeout_s = 0;  ///< --timeout: wall-clock budget of the whole search (0: none)
  std::uint64_t max_memory_mib = sweep_default_max_memory_mib;  ///< --max-memory
  std::string json, baseline, junit, horizon, html;
  bool allow_x = false;  ///< --allow-x
  bool update_baseline = false, no_culprits = false, quiet = false;
};

std::string replay(const margin_cli_options& o, const std::string& corner) {
  return replay_command(o.design, corner, o.horizon, 0, o.allow_x);
}

std::string pct_words(double w, bool at_least) {
  return (at_least ? ">= " : "") + spread_percent(w);
}

std::string failure_text(const design& d, const margin_cli_options& o, const margin_failure& f,
                         const std::string& in) {
  std::string what;
  if (f.property && *f.property < d.stim.properties.size())
    what = fmt::format("{}: violated in {} of {} corners", d.stim.properties[*f.property].text,
                       f.failing, f.corners);
  else if (f.expect_index && f.step <= d.stim.steps.size())
    what = fmt::format("{}: fails in {} of {} corners",
                       expectation_words(d.nets, d.stim.steps[f.step - 1].expects[*f.expect_index]),
                       f.failing, f.corners);
  else
    what = fmt::format("{} ({} of {} corners off the main outcome)",
                       mark(verdict_name(f.verdict), false, false), f.failing, f.corners);
  std::string out =
      fmt::format("{}step {}, {}{}\n", in, f.step, what, f.detail.empty() ? "" : "; " + f.detail);
  out += fmt::format("{}  witness  {}\n{}  replay   {}\n", in, f.witness, in, replay(o, f.witness));
  if (!f.other_witness.empty())
    out += fmt::format("{}  other    {}\n{}  replay   {}\n", in, f.other_witness, in,
                       replay(o, f.other_witness));
  if (f.culprits) out += culprit_text(d.nets, *f.culprits, in + "  ");
  return out;
}

std::string summary(const design& d, const margin_cli_options& o, const margin_result& r,
                    const baseline_comparison* cmp, const baseline_outcome& bo, bool pass,
                    bool colour) {
  // Verdict words are marked (mark); a margin figure is coloured only.
  auto paint = [colour](std::string text, bool good) {
    if (!colour) return text;
    return fmt::format(
        fmt::fg(good ? fmt::terminal_color::green : fmt::terminal_color::red) | fmt::emphasis::bold,
        "{}", text);
  };
  std::string out = fmt::format("design   {}\n", d.path);
  out += fmt::format("corners  {} per probe ({}, seed {}), {} probes, {} corner runs",
                     r.corners_per_probe, o.corners, o.seed, r.probes.size(), r.corner_runs);
  if (r.culprit_runs) out += fmt::format(" + {} culprit runs", r.culprit_runs);
  out += fmt::format(", {:.2f} s\n", r.wall_s);
  out += fmt::format("margin   {} of the written delay spread (searched 0%..{}, resolution {})\n",
                     paint(pct_words(r.margin, r.at_ceiling), r.margin >= 1.0 || r.at_ceiling),
                     spread_percent(r.ceiling), spread_percent(r.resolution));
  out += fmt::format("         {}\n", r.confidence_note());
  if (r.fails_at_zero) out += "         fails with every gate at its typical delay\n";
  if (r.failure) {
    out += fmt::format("\nfirst failure just above the margin, at {}:\n",
                       spread_percent(r.failure->spread));
    out += failure_text(d, o, *r.failure, "  ");
  }
  out += fmt::format("\n  {:>3}  {:<10}  {}\n", "#", "margin", "step");
  for (const auto& s : r.steps)
    out += fmt::format("  {:>3}  {:<10}  {}\n", s.index, pct_words(s.margin, s.at_ceiling),
                       s.label.empty() ? "(no input change)" : s.label);
  for (const auto& p : r.properties)
    out += fmt::format("  {:>3}  {:<10}  {}\n", "", pct_words(p.margin, p.at_ceiling),
                       d.stim.properties[p.index].text);
  for (const auto& s : r.steps)
    if (s.failure && r.failure && (r.failure->property || s.index != r.failure->step)) {
      out += fmt::format("\nstep {} fails at {}:\n", s.index, spread_percent(s.failure->spread));
      out += failure_text(d, o, *s.failure, "  ");
    }
  for (const auto& p : r.properties)
    if (p.failure && r.failure && r.failure->property != p.failure->property) {
      out += fmt::format("\n{} is violated at {}:\n", d.stim.properties[p.index].text,
                         spread_percent(p.failure->spread));
      out += failure_text(d, o, *p.failure, "  ");
    }
  if (!r.within.empty()) {
    out += "\nsettle-time margins at the written spread:\n";
    for (const auto& w : r.within) {
      std::string m = w.margin_fs >= 0 ? format_time(static_cast<time_fs>(w.margin_fs))
                                       : "-" + format_time(static_cast<time_fs>(-w.margin_fs));
      out += fmt::format(
          "  step {}  budget {}  worst {} at {}  margin {}{}\n", w.step, format_time(w.budget),
          format_time(w.worst), w.worst_corner.empty() ? "-" : w.worst_corner,
          paint(m, w.margin_fs >= 0 && !w.unsettled),
          w.unsettled ? fmt::format("  ({} corners do not settle)", w.unsettled) : "");
    }
  }
  if (cmp || bo.updated || !bo.not_updated.empty()) {
    out += fmt::format("\nbaseline {}{}\n", o.baseline,
                       bo.updated               ? " (updated)"
                       : bo.not_updated.empty() ? ""
                                                : " (not updated: " + bo.not_updated + ")");
    if (cmp) {
      for (const auto& c : cmp->changes)
        out += fmt::format("  {}  {}: {}{:g}% -> {}{:g}% ({:+.2f} points)\n",
                           mark(c.regression ? "shrank" : "moved", !c.regression, colour), c.what,
                           c.before_at_least ? ">= " : "", c.before_pct,
                           c.after_at_least ? ">= " : "", c.after_pct, c.after_pct - c.before_pct);
      for (const auto& n : cmp->notes) out += fmt::format("  note  {}\n", n);
      if (cmp->changes.empty())
        out += cmp->capped ? "  no margin moved up to this run's ceiling\n" : "  no margin moved\n";
    }
  }
  out += fmt::format("\nresult  {}\n", mark(pass ? "pass" : "findings", pass, colour));
  return out;
}

// Baselines are small regular files; anything else (a device, a FIFO, a
// folder) is refused rather than read until memory runs out.
std::optional<std::string> read_file(const std::string& path, std::string& why) {
  std::error_code ec;
  const auto st = std::filesystem::status(path, ec);
  if (!std::filesystem::exists(st)) {
    why = "no such file";
    return std::nullopt;
  }
  if (!std::filesystem::is_regular_file(st)) {
    why = "it is not a regular file";
    return std::nullopt;
  }
  std::ifstream in(path, std::ios::binary);
  if (!in) {
    why = std::strerror(errno);
    return std::nullopt;
  }
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

// The limits of the search options, checked before anything runs. The
// resolution's floor keeps the grid of the bisection (ceiling / resolution
// points) within a million, and the ceiling's floor keeps the written spread
// (100%) inside the search, since it is always judged.
bool search_options_valid(const margin_cli_options& o) {
  if (!(o.resolution >= 0.01 && o.resolution <= 100)) {
    spdlog::error(
        "--resolution {:g}: the bisection step must be at least 0.01 and at most 100 percentage "
        "points",
        o.resolution);
    return false;
  }
  if (!(o.ceiling >= 100 && o.ceiling <= 10000)) {
    spdlog::error(
        "--up-to {:g}: the search ceiling must be at least 100 (the written spread is always "
        "judged) and "
        "at most 10000 percent",
        o.ceiling);
    return false;
  }
  if (!(o.tolerance >= 0 && o.tolerance <= 10000)) {
    spdlog::error("--tolerance {:g}: the points a margin may fall must be a number from 0 to 10000",
                  o.tolerance);
    return false;
  }
  return true;
}

exit_status run_margin_cmd(const margin_cli_options& o) {
  if (o.quiet) spdlog::set_level(spdlog::level::err);
  if (o.update_baseline && o.baseline.empty()) {
    spdlog::error("--update-baseline needs --baseline FILE to write to");
    return exit_status::error;
  }
  if (o.baseline == "-") {
    spdlog::error(
        "--baseline -: a baseline is a file that is read and rewritten in place; give its path");
    return exit_status::error;
  }
  if (!search_options_valid(o)) return exit_status::error;
  // Refuse a baseline that cannot be written before the search spends any time.
  if (o.update_baseline) {
    const std::string why = baseline_unwritable(o.baseline);
    if (!why.empty()) {
      spdlog::error("cannot update baseline '{}': {}; nothing was run", o.baseline, why);
      return exit_status::error;
    }
  }
  auto uses = design_inputs(o.design);
  // Read only, the baseline is an input; updated, it is one more output.
  uses.push_back({o.update_baseline ? path_use::kind::output : path_use::kind::input,
                  o.update_baseline ? "--baseline" : "baseline file", o.baseline, ""});
  for (const auto& [opt, path] :
       {std::pair{"--json", &o.json}, {"--junit", &o.junit}, {"--html", &o.html}})
    uses.push_back({path_use::kind::output, opt, *path, ""});
  if (!check_paths(uses)) return exit_status::error;
  std::string err;
  margin_options mo;
  mo.spec = o.corners;
  mo.seed = o.seed;
  mo.threads = o.threads;
  mo.resolution_pct = o.resolution;
  mo.ceiling_pct = o.ceiling;
  mo.culprits = !o.no_culprits;
  if (!parse_horizon_option(o.horizon, mo.run.horizon)) return exit_status::error;
  mo.run.allow_x = o.allow_x;
  // Read the baseline before the search, so a bad file fails fast.
  std::optional<baseline_file> before;
  if (!o.baseline.empty()) {
    std::string why;
    auto text = read_file(o.baseline, why);
    if (text) {
      before = parse_baseline(*text, &err);
      if (!before) {
        spdlog::error("{}: {}", o.baseline, err);
        return exit_status::error;
      }
    } else if (!o.update_baseline) {
      spdlog::error("cannot read baseline '{}': {}; write one with --update-baseline", o.baseline,
                    why);
      return exit_status::error;
    }
  }
  auto d = load(o.design);
  if (!d || !fits_kernel(*d)) return exit_status::error;
  {
    // A probe in flight and the sweep kept at the written spread hold per-corner results.
    auto plan = plan_sweep(o.corners, o.seed, delay_variables(*d), &err);
    const std::size_t steps = d->stim.steps.empty() ? 1 : d->stim.steps.size();
    if (plan && !fits_memory(*plan, steps, 2, o.max_memory_mib, d->stim.gauges.size()))
      return exit_status::error;
  }
  if (!o.quiet && ::isatty(2) == 1)
    mo.progress = [](double w, std::uint64_t corners, bool pass) {
      std::fputs(fmt::format("\r\033[K  spread {}: {} corners, {}", spread_percent(w), corners,
                             pass ? "pass" : "fails")
                     .c_str(),
                 stderr);
      std::fflush(stderr);
    };
  install_interrupt_handlers();
  mo.stop = interrupt_flag();
  mo.timeout_s = o.timeout_s;
  auto r = find_margin(*d, mo, &err);
  if (mo.progress) std::fputs("\r\033[K", stderr);
  if (!r) {
    spdlog::error("{}", err);
    return exit_status::error;
  }
  if (r->written.error) {
    // The stimulus as written cannot go on in some corner: an input error.
    std::fputs(format_diagnostic(*r->written.error).c_str(), stderr);
    return exit_status::error;
  }
  const bool stopped = r->stopped != sweep_stop::none;
  if (stopped)
    spdlog::error(
        "margin search {}: the margins reported are those the finished probes bracketed (lower "
        "bounds); "
        "no baseline is compared or written",
        r->stopped == sweep_stop::timeout ? "stopped by --timeout" : "interrupted");

  const baseline_entry now = baseline_of(*d, o.design.path, o.design.stim, mo, *r);
  std::optional<baseline_comparison> cmp;
  const baseline_entry* old = before ? find_entry(*before, o.design.path, o.design.stim) : nullptr;
  if (before) {
    if (stopped) {
      // A partial search proves nothing about regressions.
    } else if (old) {
      cmp = compare_baseline(*old, now, o.tolerance);
    } else if (!o.update_baseline) {
      spdlog::error("baseline '{}' has no entry for {}{}; add one with --update-baseline",
                    o.baseline, o.design.path,
                    o.design.stim.empty() ? "" : " with --stim " + o.design.stim);
      return exit_status::error;
    }
  }
  baseline_outcome bo;
  bool update_interrupted = false;
  if (o.update_baseline && stopped) {
    bo.not_updated = r->stopped == sweep_stop::timeout
                         ? "the search was stopped by --timeout; the file is unchanged"
                         : "the search was interrupted; the file is unchanged";
  } else if (o.update_baseline) {
    // Re-read and merged under the lock, so concurrent updates keep each other's entries.
    const auto u = update_baseline_file(o.baseline, now, version_text(), mo.stop, [&] {
      spdlog::info("waiting for the lock on baseline '{}': another process is updating it",
                   o.baseline);
    });
    switch (u.status) {
      case baseline_update_status::written:
        bo.updated = true;
        if (!u.warning.empty()) spdlog::warn("baseline '{}': {}", o.baseline, u.warning);
        break;
      case baseline_update_status::stopped:
        update_interrupted = true;
        bo.not_updated = "interrupted before the file was replaced; the file is unchanged";
        spdlog::error(
            "baseline '{}' not updated: {} arrived before the new file was in place; the file is "
            "unchanged",
            o.baseline, interrupt_signal_name());
        break;
      case baseline_update_status::failed:
        spdlog::error("cannot update baseline '{}': {}", o.baseline, u.error);
        return exit_status::error;
    }
  }
  const bool regressed = cmp && !o.update_baseline && cmp->regressed();
  const bool pass = r->passes_as_written() && !regressed;

  const auto replay_of = [&](const std::string& c) { return replay(o, c); };
  margin_source src{o.corners, o.seed, o.resolution, o.ceiling, replay_of, report_json(), pass};
  if (!o.baseline.empty())
    src.baseline = baseline_json(o.baseline, bo, cmp ? &*cmp : nullptr, old, o.ceiling);
  const report_json result =
      o.json.empty() && o.html.empty() ? report_json() : margin_json(*d, *r, src);
  // The reports are written to temporary files and put in place together, all or nothing. The
  // baseline, updated under its own lock just above, is already in place by then.
  output_set outs;
  if (!o.json.empty() && !outs.put(o.json, json_text(result))) return exit_status::error;
  if (!o.junit.empty()) {
    std::vector<std::pair<std::string, std::string>> shrank;
    if (regressed)
      for (const auto& c : cmp->changes)
        if (c.regression)
          shrank.emplace_back(
              c.what,
              fmt::format("{} margin fell from {:g}% to {:g}% ({:.2f} points, tolerance {:g})",
                          c.what, c.before_pct, c.after_pct, c.before_pct - c.after_pct,
                          o.tolerance));
    const auto suite = junit_of_margin(*d, *r, replay_of, shrank);
    if (!outs.put(o.junit, junit_xml({suite}))) return exit_status::error;
  }
  if (!o.html.empty() &&
      !outs.put(o.html, html_report_margin(*d, *r, mo.run, {"margin", result, ""})))
    return exit_status::error;
  if (!outs.commit()) return exit_status::error;
  if (!o.quiet && o.json != "-" && o.junit != "-" && o.html != "-")
    std::fputs(
        summary(*d, o, *r, cmp && !o.update_baseline ? &*cmp : nullptr, bo, pass, use_colour(1))
            .c_str(),
        stdout);
  if (r->stopped == sweep_stop::interrupted || update_interrupted) return exit_status::interrupted;
  return pass && !stopped ? exit_status::ok : exit_status::findings;
}

void add_margin(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<margin_cli_options>();
  auto* cmd = app.add_subcommand(
      "margin", "find how far every gate's delay range can widen before a step fails");
  add_design_options(*cmd, o->design);
  add_corner_options(*cmd, o->corners, o->seed, o->threads,
                     "corners run at every probed spread: extremes, exhaustive, random:N, gauss:N "
                     "joined by '+' (default extremes+random:200)");
  cmd->add_option("--resolution", o->resolution,
                  "stop bisecting when the bracket is PCT percentage points wide (default 1)");
  cmd->add_option("--up-to", o->ceiling,
                  "largest spread searched, in percent of the written one (default 100; a pass "
                  "there reports >= PCT)");
  add_json_option(*cmd, o->json);
  cmd->add_option("--baseline", o->baseline,
                  "compare the margins with this baseline file (exit 1 when one shrank)");
  cmd->add_flag("--update-baseline", o->update_baseline,
                "write this run's margins into the --baseline file instead");
  check_number_at_least(
      cmd->add_option("--tolerance", o->tolerance,
                      "percentage points a margin may fall before it counts (default 2)"),
      0, "the tolerance in percentage points");
  add_timeout_option(*cmd, o->timeout_s,
                     "wall-clock budget in seconds for the whole search; when it runs out the "
                     "margins found so far are reported and the command exits 1");
  add_junit_option(*cmd, o->junit);
  add_allow_x_flag(*cmd, o->allow_x);
  add_max_memory_option(*cmd, o->max_memory_mib);
  add_html_option(*cmd, o->html, "margins, culprits, witness waveforms");
  add_run_limit_options(*cmd, o->horizon);
  cmd->add_flag("--no-culprits", o->no_culprits,
                "skip the search for the gates that decide a race");
  add_quiet_flag(*cmd, o->quiet);
  cmd->callback([o, &status] { status = run_margin_cmd(*o); });
}

}  // namespace

SETTLE_COMMAND(margin, "margin", add_margin);

}  // namespace settle::cli
