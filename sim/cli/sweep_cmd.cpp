// `settle sweep`: one design under many delay corners; a verdict table per step, JSON and witness
// VCDs.
#include <fmt/color.h>
#include <fmt/format.h>
#include <spdlog/spdlog.h>
#include <unistd.h>

#include <CLI/CLI.hpp>
#include <cctype>
#include <chrono>
#include <cmath>
#include <filesystem>
#include <memory>

#include "sim/analysis/culprit.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/cli/command.hpp"
#include "sim/cli/interrupt.hpp"
#include "sim/cli/report_common.hpp"
#include "sim/kernel/interval.hpp"
#include "sim/model/time.hpp"
#include "sim/model/time_parse.hpp"
#include "waves/html.hpp"
#include "waves/json.hpp"
#include "waves/junit.hpp"
#include "waves/vcd.hpp"

namespace settle::cli {
namespace {

struct sweep_cli_options {
  design_options design;
  std::string corners = "extremes+random:1000";
  std::uint64_t seed = 1;
  unsigned threads = 0;
  std::string json, vcd_dir, horizon;
  std::string junit, html;
  std::uint64_t max_events = 0;
  bool allow_x = false;  ///< --allow-x
  double timeout_s = 0;  ///< --timeout: wall-clock budget in seconds (0: none)
  std::uint64_t max_memory_mib = sweep_default_max_memory_mib;  ///< --max-memory
  bool quiet = false;
};

/// Why the sweep stopped early, in words ("" when it ran every corner).
std::string stop_words(const sweep_result& r) {
  switch (r.stopped) {
    case sweep_stop::interrupted:
      return fmt::format("interrupted by {}", interrupt_signal_name());
    case sweep_stop::timeout:
      return "stopped by --timeout";
    case sweep_stop::none:
      break;
  }
  return "";
}

/// The most witness VCDs written for one step.
constexpr std::size_t vcd_per_step_limit = 32;

// The command that replays one corner with `settle run`.
std::string replay(const sweep_cli_options& o, const std::string& corner) {
  return replay_command(o.design, corner, o.horizon, o.max_events, o.allow_x);
}

std::string percent(double share) { return fmt::format("{:.1f}%", 100.0 * share); }

// The reported nets the interval run left at x: "a, b, ... (N nets)", at most 8 named.
std::string x_nets(const netlist& n, const sweep_result& r, const interval_step& iv) {
  std::string xs;
  std::size_t shown = 0, total = 0;
  for (std::size_t k = 0; k < r.reported.size() && k < iv.values.size(); ++k) {
    if (iv.values[k] != logic::x) continue;
    ++total;
    if (shown++ < 8) xs += (xs.empty() ? "" : ", ") + n.net_name[r.reported[k]];
  }
  if (total > 8) xs += fmt::format(", ... ({} nets)", total);
  return xs;
}

// One step of a sweep whose spec is `interval` alone: what the min-max run proved.
template <class Paint>
std::string interval_only_step(const netlist& n, const sweep_result& r, const sweep_step& s,
                               const std::string& verdict, const Paint& paint) {
  std::string out;
  const interval_step& iv = *s.interval;
  std::string vals;
  for (std::size_t k = 0; k < r.reported.size() && k < iv.values.size(); ++k)
    vals += fmt::format("{}{}={}", k ? " " : "", n.net_name[r.reported[k]], to_char(iv.values[k]));
  if (iv.proven) {
    out += fmt::format("  {}  proven: every delay assignment in range ends in the same state\n",
                       verdict);
  } else if (iv.status != step_status::settled) {
    out += fmt::format("  {}  not proven: the interval run is {} at the end of the step\n", verdict,
                       status_name(iv.status));
  } else {
    out += fmt::format(
        "  {}  not proven: the interval run leaves x on {}; a race or x pessimism, sample corners "
        "to tell which (e.g. --corners extremes+random:1000+interval)\n",
        verdict, x_nets(n, r, iv));
  }
  if (!vals.empty()) out += fmt::format("       values  {}\n", vals);
  for (const auto& x : s.expects) {
    const std::string what = expectation_words(n, *x.spec);
    if (x.pass())
      out += fmt::format("  {}  {}: proven for all delays in range\n", paint("pass", true), what);
    else
      out += fmt::format("  {}  {}: not proven ({})\n", paint("UNPROVEN", false), what, x.detail);
  }
  return out;
}

// A rate with an SI prefix: 1.178e9 -> "1.178 G/s".
std::string per_second(double v) {
  static constexpr std::pair<double, const char*> prefixes[] = {
      {1e12, "T"}, {1e9, "G"}, {1e6, "M"}, {1e3, "k"}};
  for (const auto& [scale, p] : prefixes)
    if (v >= scale) return fmt::format("{:.4g} {}/s", v / scale, p);
  return fmt::format("{:.4g} /s", v);
}

// The properties over the corners and the gauges' distributions, after the steps.
template <class Paint>
std::string closed_loop_text(const design& d, const sweep_cli_options& o, const sweep_result& r,
                             const Paint& paint) {
  std::string out;
  if (!r.properties.empty()) out += "\nproperties\n";
  for (const auto& p : r.properties) {
    const std::string& text = d.stim.properties[p.index].text;
    if (p.holds()) {
      out += fmt::format("  {}  {} in every corner\n", paint("holds", true), text);
      continue;
    }
    out += fmt::format("  {}  {}: violated in {} of {} corners; first at {} (at {}, step {})\n",
                       paint("VIOLATED", false), text, p.violating, r.corners, p.witness_name,
                       format_time(p.first_violation), p.step);
    out += fmt::format("       replay  {}\n", replay(o, p.witness_name));
  }
  if (!r.gauges.empty()) out += "\ngauges (min / median / max over corners)\n";
  for (const auto& g : r.gauges) {
    const auto& spec = d.stim.gauges[g.index];
    if (g.corners == 0) {
      out += fmt::format("  {}  no sample in any corner\n", spec.name);
      continue;
    }
    std::string line =
        fmt::format("  {}  {} / {} / {}", spec.name, format_time(g.min),
                    format_time(static_cast<time_fs>(std::llround(g.median))), format_time(g.max));
    if (spec.what == gauge::kind::period && g.median > 0)
      line += "  throughput " + per_second(1e15 / g.median);
    line += fmt::format("  ({} samples in {} corners; min at {}, max at {})\n", g.samples,
                        g.corners, g.witness_min_name, g.witness_max_name);
    out += line;
  }
  if (!r.elements.empty()) out += "\nmetastable elements\n";
  for (const auto& el : r.elements) {
    const auto& m = d.nets.meta[el.index];
    out += fmt::format("  {} ({})  {} resolutions, {} inside the window ({} ties drawn)",
                       d.nets.gate_name(m.gates[0]), kind_name(d.nets.kind[m.gates[0]]),
                       el.resolutions, el.inside, el.drawn);
    if (el.resolutions)
      out += fmt::format("; longest {} at {}", format_time(el.longest), el.witness_name);
    out += "\n";
    for (const auto& b : el.budgets)
      out += fmt::format(
          "    longer than {}: {} of {} corners, {:.4g}% (95% {:.4g}% .. {:.4g}%), "
          "model {:.4g}%\n",
          format_time(b.within), b.exceeded, r.corners, 100 * b.share, 100 * b.share_ci95.lo,
          100 * b.share_ci95.hi, 100 * b.model_share);
  }
  return out;
}

std::string summary(const design& d, const sweep_cli_options& o, const sweep_result& r, bool colour,
                    const std::vector<culprit_report>& races = {}) {
  const netlist& n = d.nets;
  const bool interval_only = r.planned == 0;
  auto paint = [colour](std::string_view text, bool good) { return mark(text, good, colour); };
  std::string out = fmt::format("design   {}\n", d.path);
  if (interval_only)
    out += fmt::format(
        "corners  none ({}): one min-max ambiguity run covers every delay in range, {:.2f} s\n",
        o.corners, r.wall_s);
  else
    out += fmt::format("corners  {} ({}, seed {}), {} thread{}, {} events, {:.2f} s\n", r.corners,
                       o.corners, o.seed, r.threads, r.threads == 1 ? "" : "s", r.events, r.wall_s);
  if (r.stopped != sweep_stop::none)
    out += fmt::format("{}  {}: {} of {} corners finished; the verdicts below cover those only\n",
                       paint("STOPPED", false), stop_words(r), r.corners, r.planned);
  for (const auto& s : r.steps) {
    out += "\n" + step_title(s.index, s.label) + "\n";
    // Findings stand out in capitals, with or without colour (mark).
    const std::string verdict = verdict_name(s.verdict);
    if (interval_only) {
      out += interval_only_step(n, r, s, paint(verdict, s.pass), paint);
      continue;
    }
    std::string note = fmt::format("{} outcome{} over {} corners", s.outcomes.size(),
                                   s.outcomes.size() == 1 ? "" : "s", r.corners);
    if (s.first_divergence) note += "; first divergence";
    if (s.inherits) note += fmt::format("; inherits the divergence of step {}", s.inherits);
    if (s.run_step && s.verdict == sweep_verdict::nondeterministic)
      note += "; a `run` window, not a settled state";
    if (s.verdict == sweep_verdict::deadlock)
      note += "; every corner goes quiet with a reaction rule owed";
    out += fmt::format("  {}  {}\n", paint(verdict, s.pass), note);
    if (s.unseen_outcome_bound)
      out += fmt::format(
          "  chance of an outcome not seen < {:.3g}% (rule of three over the random corners)\n",
          100.0 * *s.unseen_outcome_bound);
    // The times column holds settle times for outcomes that settle; an
    // oscillating outcome's are the times from the step's start to the
    // detected repeat, a timeout's its last change: each line says which.
    out += fmt::format("  {:>3}  {:<12} {:>8}  {:>6}  {:<17}  {:<40}  {}\n", "#", "status", "count",
                       "share", "95% CI", "times min / median / max", "witness");
    for (std::size_t i = 0; i < s.outcomes.size(); ++i) {
      const auto& oc = s.outcomes[i];
      std::string status = status_name(oc.status);
      if (oc.status == step_status::oscillating) status += " " + format_time(oc.period);
      const std::string ci =
          fmt::format("[{}, {}]", percent(oc.share_ci95.lo), percent(oc.share_ci95.hi));
      const char* label =
          oc.status == step_status::oscillating ? "detected "
          : oc.status == step_status::timeout || oc.status == step_status::event_limit
              ? "last change "
              : "settle ";
      const std::string times =
          fmt::format("{}{} / {} / {}", label, format_time(oc.settle.min),
                      format_time(oc.settle.median), format_time(oc.settle.max));
      out += fmt::format("  {:>3}  {:<12} {:>8}  {:>6}  {:<17}  {:<40}  {}\n", i + 1, status,
                         oc.count, percent(oc.share), ci, times, oc.witness_name);
      std::string vals;
      for (std::size_t k = 0; k < r.reported.size() && k < oc.values.size(); ++k)
        vals +=
            fmt::format("{}{}={}", k ? " " : "", n.net_name[r.reported[k]], to_char(oc.values[k]));
      if (!vals.empty()) out += fmt::format("       values  {}\n", vals);
      if (!oc.unknown.empty())
        out += fmt::format("       {}  {} {}\n", paint("UNKNOWN", false), n.names_of(oc.unknown),
                           unknown_words);
      if (oc.end_of_time)
        out += fmt::format("       reason  {}\n", end_of_time_words);
      else if (oc.status == step_status::timeout && oc.reached)
        out += fmt::format(
            "       reason  at {}: {}\n", oc.witness_name,
            timeout_words(oc.reached, oc.events, oc.values_repeat_at, oc.values_period));
      for (const auto& w : oc.owed)
        out += fmt::format("       owed    {} (fired {} of {}; condition {})\n",
                           d.stim.rules[w.rule].text, w.fired, w.times, to_char(w.condition));
      out += fmt::format("       replay  {}\n", replay(o, oc.witness_name));
    }
    for (const auto& x : s.expects) {
      const std::string what = expectation_words(n, *x.spec);
      if (x.pass()) {
        out += fmt::format("  {}  {} in every corner\n", paint("pass", true), what);
      } else {
        out += fmt::format("  {}  {}: fails in {} of {} corners; first at {}{}\n",
                           paint("FAIL", false), what, x.failing, r.corners, x.witness_name,
                           x.detail.empty() ? "" : " (" + x.detail + ")");
        out += fmt::format("       replay  {}\n", replay(o, x.witness_name));
      }
    }
    for (const auto& race : races)
      if (race.step == s.index) out += culprit_text(n, race, "  ");
    if (s.interval) {
      if (s.interval->proven) {
        out += "  interval  proven deterministic for all delays in range\n";
      } else {
        const std::string xs = x_nets(n, r, *s.interval);
        out += fmt::format("  interval  inconclusive (x on {})\n",
                           xs.empty() ? std::string(status_name(s.interval->status)) : xs);
      }
    }
  }
  if (!interval_only) out += closed_loop_text(d, o, r, paint);
  std::size_t bad = 0, proven = 0;
  for (const auto& s : r.steps) bad += s.pass ? 0 : 1;
  for (const auto& s : r.steps) proven += s.interval && s.interval->proven;
  out += fmt::format("\nresult  {}", paint(r.pass() ? "pass" : "findings", r.pass()));
  if (interval_only)
    out += fmt::format(" ({} of {} steps proven deterministic, {} inconclusive{})", proven,
                       r.steps.size(), r.steps.size() - proven,
                       bad > r.steps.size() - proven ? ", expectations not proven" : "");
  else {
    std::size_t violated = 0;
    for (const auto& p : r.properties) violated += p.holds() ? 0 : 1;
    std::string why;
    if (bad) why = fmt::format("{} of {} steps", bad, r.steps.size());
    if (violated)
      why += fmt::format("{}{} of {} properties violated", bad ? "; " : "", violated,
                         r.properties.size());
    if (!why.empty()) out += " (" + why + ")";
  }
  out += "\n";
  return out;
}

// A corner name as part of a file name: random:1#37 -> random-1-37.
std::string corner_file_part(std::string name) {
  for (auto& c : name)
    if (c == ':' || c == '#' || c == '@' || c == '/') c = '-';
  return name;
}

// One VCD per outcome of every step that is not deterministic, replaying its
// witness: DIR/step<k>_outcome<r>_<witness>.vcd, r the outcome's rank (1 = most corners).
bool write_witness_vcds(const design& d, const sweep_cli_options& o, const sweep_plan& plan,
                        const sweep_result& r, const run_options& ro, output_set& outs) {
  std::error_code ec;
  std::filesystem::create_directories(o.vcd_dir, ec);
  if (ec) {
    spdlog::error("cannot create '{}': {}", o.vcd_dir, ec.message());
    return false;
  }
  delay_table delays;
  for (const auto& s : r.steps) {
    if (s.verdict == sweep_verdict::deterministic) continue;
    if (s.outcomes.size() > vcd_per_step_limit)
      spdlog::warn("step {}: {} outcomes; writing the VCDs of the first {}", s.index,
                   s.outcomes.size(), vcd_per_step_limit);
    for (std::size_t i = 0; i < s.outcomes.size() && i < vcd_per_step_limit; ++i) {
      const auto& oc = s.outcomes[i];
      const std::string path = fmt::format("{}/step{}_outcome{}_{}.vcd", o.vcd_dir, s.index, i + 1,
                                           corner_file_part(oc.witness_name));
      vcd_options vo;
      vo.top = file_stem(d.path);
      vo.version = version_text();
      vo.timescale = design_timescale(d, ro.horizon);  // every witness of the design alike
      vcd_writer vcd(d.nets, std::move(vo));
      if (interrupted()) return false;  // the caller reports it
      fill_delays(d, plan.corner_at(oc.witness), delays);
      run_stimulus(d, delays, ro, &vcd);
      std::FILE* f = outs.open(path);
      std::string err;
      if (!f) return false;
      if (!vcd.write(f, &err)) {
        spdlog::error("cannot write '{}': {}", path, err);
        return false;
      }
      if (!outs.finish_last()) return false;
    }
  }
  return true;
}

// "  1234/5000 corners  2.1k/s  1.8 s left" on one rewritten line.
void show_progress(std::uint64_t done, std::uint64_t total,
                   std::chrono::steady_clock::time_point t0) {
  const double el = seconds_since(t0);
  const double rate = el > 0 ? static_cast<double>(done) / el : 0;
  const std::string left =
      rate > 0 ? fmt::format("{:.1f} s left", static_cast<double>(total - done) / rate) : "";
  std::fputs(fmt::format("\r\033[K  {}/{} corners  {:.0f}/s  {}", done, total, rate, left).c_str(),
             stderr);
  std::fflush(stderr);
}

exit_status run_sweep_cmd(const sweep_cli_options& o) {
  if (o.quiet) spdlog::set_level(spdlog::level::err);
  auto uses = design_inputs(o.design);
  for (const auto& [opt, path] :
       {std::pair{"--json", &o.json}, {"--junit", &o.junit}, {"--html", &o.html}})
    uses.push_back({path_use::kind::output, opt, *path, ""});
  uses.push_back({path_use::kind::output_folder, "--vcd-dir", o.vcd_dir, "step*_outcome*_*.vcd"});
  if (!check_paths(uses)) return exit_status::error;
  std::string err;
  run_options ro;
  ro.max_events = o.max_events;
  ro.allow_x = o.allow_x;
  if (!parse_horizon_option(o.horizon, ro.horizon)) return exit_status::error;
  auto d = load(o.design);
  if (!d || !fits_kernel(*d)) return exit_status::error;
  auto plan = plan_sweep(o.corners, o.seed, delay_variables(*d), &err);
  if (!plan) {
    spdlog::error("{}", err);
    return exit_status::error;
  }
  if (plan->interval && !interval_refusal(*d).empty()) {
    spdlog::error("--corners '{}': {}", o.corners, interval_refusal(*d));
    return exit_status::error;
  }
  const std::size_t steps = d->stim.steps.empty() ? 1 : d->stim.steps.size();
  if (!fits_memory(*plan, steps, 1, o.max_memory_mib, d->stim.gauges.size()))
    return exit_status::error;
  sweep_options so;
  so.threads = o.threads;
  so.run = ro;
  install_interrupt_handlers();
  so.stop = interrupt_flag();
  so.timeout_s = o.timeout_s;
  const bool progress = !o.quiet && ::isatty(2) == 1;
  const auto t0 = std::chrono::steady_clock::now();
  if (progress)
    so.progress = [t0](std::uint64_t done, std::uint64_t total) { show_progress(done, total, t0); };
  const sweep_result r = run_sweep(*d, *plan, so);
  if (progress) std::fputs("\r\033[K", stderr);
  if (r.error) {
    std::fputs(format_diagnostic(*r.error).c_str(), stderr);
    spdlog::error("the stimulus cannot go on at corner {} (replay: {})",
                  plan->corner_at(r.error_corner).name(),
                  replay_command(o.design, plan->corner_at(r.error_corner).name(), o.horizon,
                                 o.max_events, o.allow_x));
    return exit_status::error;
  }

  // The gates that decide each first divergence between two settled outcomes (ddmin).
  std::vector<culprit_report> races;
  for (const auto& s : r.steps) {
    if (r.stopped != sweep_stop::none) break;  // a stopped sweep reports what it has, at once
    if (!s.first_divergence || s.run_step) continue;
    const auto witnesses = race_witnesses(s);
    if (!witnesses) continue;
    auto race = find_culprits(*d, ro, s.index, plan->corner_at(witnesses->first),
                              plan->corner_at(witnesses->second));
    if (!race.gates.empty()) races.push_back(std::move(race));
  }

  output_set outs;  // all or nothing
  const report_json result = o.json.empty() && o.html.empty()
                                 ? report_json()
                                 : sweep_json(*d, r, {o.corners, o.seed, &races});
  if (!o.json.empty() && !outs.put(o.json, json_text(result))) return exit_status::error;
  if (!o.junit.empty() &&
      !outs.put(o.junit, junit_xml({junit_of_sweep(
                             *d, r, [&](const std::string& c) { return replay(o, c); })})))
    return exit_status::error;
  if (!o.html.empty() && !outs.put(o.html, html_report_sweep(*d, r, ro, {"sweep", result, ""})))
    return exit_status::error;
  if (!o.vcd_dir.empty() && r.stopped == sweep_stop::none &&
      !write_witness_vcds(*d, o, *plan, r, ro, outs)) {
    if (!interrupted()) return exit_status::error;
    outs.discard();
    spdlog::error("interrupted by {} while writing the witness VCDs; nothing was written",
                  interrupt_signal_name());
    return exit_status::interrupted;
  }
  if (!outs.commit()) return exit_status::error;
  if (r.stopped != sweep_stop::none)  // on stderr even with -q: the report is partial
    std::fputs(
        fmt::format("settle: {}: {} of {} corners finished\n", stop_words(r), r.corners, r.planned)
            .c_str(),
        stderr);
  if (!o.quiet && o.json != "-" && o.junit != "-" && o.html != "-")
    std::fputs(summary(*d, o, r, use_colour(1), races).c_str(), stdout);
  if (r.stopped == sweep_stop::interrupted) return exit_status::interrupted;
  return r.pass() ? exit_status::ok : exit_status::findings;
}

void add_sweep(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<sweep_cli_options>();
  auto* cmd =
      app.add_subcommand("sweep", "run the stimulus under many delay corners and judge every step");
  add_design_options(*cmd, o->design);
  add_corner_options(*cmd, o->corners, o->seed, o->threads,
                     "corner spec: extremes, exhaustive, random:N, gauss:N, interval joined by '+' "
                     "(default extremes+random:1000)");
  add_json_option(*cmd, o->json);
  check_output_path(cmd->add_option(
      "--vcd-dir", o->vcd_dir,
      "write one VCD per outcome of every step that is not deterministic, replaying its witness, "
      "as DIR/step<k>_outcome<r>_<corner>.vcd"));
  add_run_limit_options(*cmd, o->horizon, &o->max_events,
                        "stop each corner after N events (0: no limit)");
  add_timeout_option(*cmd, o->timeout_s,
                     "wall-clock budget in seconds: past it the sweep stops, reports the corners "
                     "finished and exits 1 (0: none)");
  add_max_memory_option(*cmd, o->max_memory_mib);
  add_junit_option(*cmd, o->junit);
  add_allow_x_flag(*cmd, o->allow_x);
  add_html_option(*cmd, o->html, "waveforms of the witnesses, histograms");
  cmd->add_flag("-q,--quiet", o->quiet,
                "print nothing on stdout and no progress; errors still go to stderr");
  cmd->callback([o, &status] { status = run_sweep_cmd(*o); });
}

}  // namespace

SETTLE_COMMAND(sweep, "sweep", add_sweep);

}  // namespace settle::cli
