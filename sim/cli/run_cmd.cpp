// `settle run`: one delay corner through the stimulus; a table per step, JSON and VCD.
#include <fmt/color.h>
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <chrono>
#include <memory>

#include "sim/cli/command.hpp"
#include "sim/cli/interrupt.hpp"
#include "sim/cli/report_common.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/time.hpp"
#include "sim/model/time_parse.hpp"
#include "waves/html.hpp"
#include "waves/json.hpp"
#include "waves/junit.hpp"
#include "waves/vcd.hpp"

namespace settle::cli {
namespace {

struct run_cli_options {
  design_options design;
  std::string corner = "typ";
  std::string vcd, vcd_nets = "all", json, horizon;
  std::string junit, html;
  std::uint64_t max_events = 0;
  bool allow_x = false;  ///< --allow-x
  bool verbose = false, quiet = false;
};

std::string expect_text(const netlist& n, const step_result& s, const expect_result& x) {
  const auto& e = *x.spec;
  const std::string words = expectation_words(n, e);
  if (e.what == expectation::kind::value) return fmt::format("{}: got {}", words, to_char(x.got));
  if (e.what == expectation::kind::within)
    return fmt::format("{}: took {}", words, format_time(s.settle));
  return words;
}

std::string gauge_nets(const netlist& n, const gauge& g) {
  if (g.what != gauge::kind::latency) return n.net_name[g.nets[0]];
  return fmt::format("{} {} to {} {}", n.net_name[g.nets[0]], g.from_rises ? "rises" : "falls",
                     n.net_name[g.nets[1]], g.to_rises ? "rises" : "falls");
}

std::string table(const design& d, const run_result& r, const std::string& corner_name, bool colour,
                  bool verbose, double wall) {
  const netlist& n = d.nets;
  auto paint = [colour](std::string_view text, bool good) { return mark(text, good, colour); };
  std::string out = fmt::format("design {}, corner {}, {} step{}\n", d.path,
                                r.corner.empty() ? corner_name : r.corner, r.steps.size(),
                                r.steps.size() == 1 ? "" : "s");
  std::size_t width = 3;
  for (net_id id : r.reported) width = std::max(width, n.net_name[id].size());
  for (const auto& s : r.steps) {
    out += "\n" + step_title(s.index, s.label) + "\n";
    const bool good_status = s.status == step_status::settled || s.status == step_status::running;
    // The status word is the verdict, marked; the words after it explain.
    const bool expected_osc = s.status == step_status::oscillating && s.pass();
    std::string word = status_name(s.status), status;
    if (s.status == step_status::settled) status += fmt::format(" after {}", format_time(s.settle));
    if (s.status == step_status::running)
      status += fmt::format(", last change after {}", format_time(s.settle));
    if (s.status == step_status::oscillating) {
      status += fmt::format(", period {}, repeat detected at {}, toggling", format_time(s.period),
                            format_time(s.end));
      for (std::size_t i = 0; i < s.toggling.size() && i < 8; ++i)
        status += " " + n.net_name[s.toggling[i]];
      if (s.toggling.size() > 8) status += fmt::format(" ... ({} nets)", s.toggling.size());
    }
    if (s.end_of_time)
      status = " at the end of representable time";
    else if (s.status == step_status::timeout || s.status == step_status::event_limit)
      status += fmt::format(" at {}", format_time(s.end));
    if (s.status == step_status::deadlock)
      status += fmt::format(" after {}, {} rule{} owed", format_time(s.settle), s.owed.size(),
                            s.owed.size() == 1 ? "" : "s");
    out += fmt::format("  status  {}{}   ({} .. {})\n", paint(word, good_status || expected_osc),
                       status, format_time(s.start), format_time(s.end));
    if (s.status == step_status::timeout && !s.end_of_time)
      out += fmt::format("  reason  {}\n", timeout_words(s.end - s.start, s.events,
                                                         s.values_repeat_at, s.values_period));
    for (const auto& o : s.owed)
      out += fmt::format("  owed    {}: fired {} of {}, condition {}\n", d.stim.rules[o.rule].text,
                         o.fired, o.times, to_char(o.condition));
    if (!s.unknown.empty())
      out += fmt::format("  {}  {} {}\n", paint("UNKNOWN", false), n.names_of(s.unknown),
                         unknown_words);
    if (!r.reported.empty()) {
      out += fmt::format("  {:<{}}  start  end  transitions  glitches\n", "net", width);
      for (std::size_t i = 0; i < r.reported.size(); ++i)
        out += fmt::format("  {:<{}}  {:<5}  {:<3}  {:<11}  {}\n", n.net_name[r.reported[i]], width,
                           to_char(s.start_values[i]), to_char(s.values[i]), s.transitions[i],
                           glitches(d.nets, r, s, i));
    }
    for (const auto& res : s.resolutions) {
      const bool mutex = n.kind[res.gate] == gate_kind::mutex;
      std::string how =
          !res.near ? (mutex ? "uncontested" : "outside the window")
                    : fmt::format("{} {}{}", mutex ? "delta" : "lead",
                                  res.gap < 0 ? "-" + format_time(static_cast<time_fs>(-res.gap))
                                              : format_time(static_cast<time_fs>(res.gap)),
                                  res.drawn ? " (a tie, drawn)" : "");
      out +=
          fmt::format("  resolve {} {} at {}: {}, {} {}, resolved after {}\n",
                      kind_name(n.kind[res.gate]), n.gate_name(res.gate), format_time(res.first),
                      how, mutex ? "granted" : "took", to_char(res.value), format_time(res.time()));
    }
    for (const auto& x : s.expects) {
      std::string line = expect_text(n, s, x);
      if (!x.pass && !x.detail.empty()) line += " (" + x.detail + ")";
      out += fmt::format("  {}  {}\n", paint(x.pass ? "pass" : "FAIL", x.pass), line);
    }
  }
  if (!r.properties.empty()) out += "\nproperties\n";
  for (const auto& p : r.properties) {
    const auto& spec = d.stim.properties[p.property];
    if (p.holds) {
      out += fmt::format("  {}  {}\n", paint("holds", true), spec.text);
      continue;
    }
    std::string vals;
    for (const auto& [net, v] : p.values)
      vals += fmt::format("{}{}={}", vals.empty() ? "" : " ", n.net_name[net], to_char(v));
    out += fmt::format("  {}  {}: first at {} in step {} ({})\n", paint("FAIL", false), spec.text,
                       format_time(p.first_violation), p.step, vals);
  }
  if (!r.gauges.empty()) out += "\ngauges\n";
  for (const auto& g : r.gauges) {
    const auto& spec = d.stim.gauges[g.gauge];
    if (!g.count) {
      out += fmt::format("  {}  {} {}: no sample\n", spec.name, gauge_kind_name(spec.what),
                         gauge_nets(n, spec));
      continue;
    }
    out += fmt::format("  {}  {} {}: {} sample{}, min {}, mean {}, max {}\n", spec.name,
                       gauge_kind_name(spec.what), gauge_nets(n, spec), g.count,
                       g.count == 1 ? "" : "s", format_time(g.min),
                       format_time(static_cast<time_fs>(g.mean + 0.5)), format_time(g.max));
  }
  const bool pass = r.pass();
  out += fmt::format("\nresult  {}", paint(pass ? "pass" : "findings", pass));
  std::size_t bad = 0, broken = 0;
  for (const auto& s : r.steps) bad += s.pass() ? 0 : 1;
  for (const auto& p : r.properties) broken += p.holds ? 0 : 1;
  if (!pass) {
    out += fmt::format(" ({} of {} steps", bad, r.steps.size());
    if (broken) out += fmt::format(", {} of {} properties", broken, r.properties.size());
    out += ")";
  }
  out += "\n";
  if (verbose)
    out += fmt::format("events  {} in {:.3f} s ({:.3g} events/s)\n", r.events, wall,
                       wall > 0 ? static_cast<double>(r.events) / wall : 0.0);
  return out;
}

exit_status run_run(const run_cli_options& o) {
  if (o.verbose && !o.quiet) spdlog::set_level(spdlog::level::debug);
  if (o.quiet) spdlog::set_level(spdlog::level::err);
  auto uses = design_inputs(o.design);
  for (const auto& [opt, path] : {std::pair{"--vcd", &o.vcd},
                                  {"--json", &o.json},
                                  {"--junit", &o.junit},
                                  {"--html", &o.html}})
    uses.push_back({path_use::kind::output, opt, *path, ""});
  if (!check_paths(uses)) return exit_status::error;
  std::string err;
  auto c = corner_option(o.corner);
  if (!c) return exit_status::error;
  run_options ro;
  ro.max_events = o.max_events;
  ro.allow_x = o.allow_x;
  if (!parse_horizon_option(o.horizon, ro.horizon)) return exit_status::error;
  auto d = load(o.design);
  if (!d || !fits_kernel(*d)) return exit_status::error;
  if (!corner_fits(*d, *c, o.corner)) return exit_status::error;

  delay_table delays;
  fill_delays(*d, *c, delays);
  // Every output is opened before the run (a bad path fails at once) and put
  // in place only when all of them are written.
  output_set outs;
  std::FILE* vcd_file = nullptr;
  std::unique_ptr<vcd_writer> vcd;
  if (!o.vcd.empty()) {
    vcd_options vo;
    vo.top = file_stem(d->path);
    vo.version = version_text();
    vo.timescale = design_timescale(*d, ro.horizon);  // the same under every corner
    if (o.vcd_nets == "outputs") {
      vo.only = d->nets.outputs;
      vo.only.insert(vo.only.end(), d->stim.watch.begin(), d->stim.watch.end());
      if (vo.only.empty()) vo.only.push_back(netlist::const0);  // nothing to show: an empty dump
    }
    vcd = std::make_unique<vcd_writer>(d->nets, std::move(vo));
    if (!(vcd_file = outs.open(o.vcd))) return exit_status::error;
  }
  install_interrupt_handlers();
  ro.stop = interrupt_flag();
  const auto t0 = std::chrono::steady_clock::now();
  const run_result r = run_stimulus(*d, delays, ro, vcd.get());
  const double wall = seconds_since(t0);
  spdlog::debug("{} events in {:.3f} s", r.events, wall);
  if (r.error) {
    // The stimulus itself is wrong: an error, and no output is written.
    std::fputs(format_diagnostic(*r.error).c_str(), stderr);
    return exit_status::error;
  }
  const bool stopped = interrupted();

  if (vcd && !vcd->write(vcd_file, &err)) {
    spdlog::error("cannot write '{}': {}", o.vcd, err);
    return exit_status::error;
  }
  const report_json result =
      o.json.empty() && o.html.empty() ? report_json() : run_json(*d, r, c->name(), wall, stopped);
  if (!o.json.empty() && !outs.put(o.json, json_text(result))) return exit_status::error;
  if (!o.junit.empty()) {
    const auto replay = [&](const std::string& corner) {
      return replay_command(o.design, corner, o.horizon, o.max_events, o.allow_x);
    };
    if (!outs.put(o.junit, junit_xml({junit_of_run(*d, r, c->name(), replay, wall)})))
      return exit_status::error;
  }
  if (!o.html.empty() && !outs.put(o.html, html_report_run(*d, *c, ro, {"run", result, ""})))
    return exit_status::error;
  if (!outs.commit()) return exit_status::error;
  if (stopped)  // on stderr even with -q: the report is partial
    std::fputs(fmt::format(
                   "settle: run interrupted by {}: {} of {} steps reached; the report is partial\n",
                   interrupt_signal_name(), r.steps.size(), d->stim.steps.size())
                   .c_str(),
               stderr);
  if (!o.quiet && o.json != "-" && o.vcd != "-" && o.junit != "-" && o.html != "-")
    std::fputs(table(*d, r, c->name(), use_colour(1), o.verbose, wall).c_str(), stdout);
  if (stopped) return exit_status::interrupted;
  return r.pass() ? exit_status::ok : exit_status::findings;
}

void add_run(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<run_cli_options>();
  auto* cmd = app.add_subcommand("run", "simulate the stimulus under one delay corner");
  add_design_options(*cmd, o->design);
  cmd->add_option("--corner", o->corner,
                  "min, typ, max, random:SEED or any corner name (default typ)");
  check_output_path(
      cmd->add_option("--vcd", o->vcd, "write the waveforms as IEEE 1364 VCD to PATH"));
  cmd->add_option("--vcd-nets", o->vcd_nets,
                  "nets in the VCD: all (default) or outputs (outputs and watched nets)")
      ->check(one_of({"all", "outputs"}));
  add_json_option(*cmd, o->json);
  add_run_limit_options(*cmd, o->horizon, &o->max_events, "stop after N events (0: no limit)");
  add_junit_option(*cmd, o->junit);
  add_allow_x_flag(*cmd, o->allow_x);
  add_html_option(*cmd, o->html, "the waveforms of every step");
  cmd->add_flag("-v,--verbose", o->verbose, "also print events and events per second");
  add_quiet_flag(*cmd, o->quiet);
  cmd->callback([o, &status] { status = run_run(*o); });
}

}  // namespace

SETTLE_COMMAND(run, "run", add_run);

}  // namespace settle::cli
