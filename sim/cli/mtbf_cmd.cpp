// `settle mtbf`: the MTBF of a mutex or synchronizing flip-flop for a
// resolution budget, by the first-order formula and checked by simulation.
#include <fmt/format.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <charconv>
#include <cmath>
#include <memory>

#include "sim/analysis/mtbf.hpp"
#include "sim/cli/command.hpp"
#include "sim/cli/report_common.hpp"
#include "sim/model/time_parse.hpp"
#include "waves/html.hpp"
#include "waves/json.hpp"

namespace settle::cli {
namespace {

constexpr std::uint64_t max_events = 1'000'000'000'000;

struct mtbf_cli {
  design_options design;
  std::string element, budget, corner = "typ", json, html, min_mtbf;
  std::vector<std::string> rates;
  std::uint64_t events = 1'000'000, seed = 1;
};

// "100MHz", "1.5GHz", "20kHz", "50Hz": a frequency in Hz, or nullopt.
std::optional<double> parse_frequency(std::string_view s) {
  static constexpr std::pair<std::string_view, double> units[] = {
      {"GHz", 1e9}, {"MHz", 1e6}, {"kHz", 1e3}, {"Hz", 1.0}};
  for (auto [u, scale] : units) {
    if (s.size() <= u.size() || s.substr(s.size() - u.size()) != u) continue;
    const auto num = s.substr(0, s.size() - u.size());
    double v = 0;
    auto [p, ec] = std::from_chars(num.data(), num.data() + num.size(), v);
    if (ec != std::errc{} || p != num.data() + num.size() || !(v > 0) || !std::isfinite(v))
      return std::nullopt;
    return v * scale;
  }
  return std::nullopt;
}

// A duration in seconds: "3600", "2.5s", "10y" (years of 365.25 days), "1d", "12h".
std::optional<double> parse_seconds(std::string_view s) {
  double scale = 1;
  if (!s.empty() && (s.back() == 'y' || s.back() == 'd' || s.back() == 'h' || s.back() == 's')) {
    scale = s.back() == 'y'   ? seconds_per_year
            : s.back() == 'd' ? 86400
            : s.back() == 'h' ? 3600
                              : 1;
    s.remove_suffix(1);
  }
  double v = 0;
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), v);
  if (ec != std::errc{} || p != s.data() + s.size() || v < 0 || !std::isfinite(v))
    return std::nullopt;
  return v * scale;
}

std::string seconds_text(double s) {
  if (std::isinf(s)) return "unbounded";
  return fmt::format("{:.3g} s ({:.3g} years)", s, s / seconds_per_year);
}

exit_status run_mtbf(const mtbf_cli& o) {
  auto uses = design_inputs(o.design);
  uses.push_back({path_use::kind::output, "--json", o.json, ""});
  uses.push_back({path_use::kind::output, "--html", o.html, ""});
  if (!check_paths(uses)) return exit_status::error;
  std::string err;
  auto budget = parse_time(o.budget, &err);
  if (!budget) {
    spdlog::error("--budget {}: {}", o.budget, err);
    return exit_status::error;
  }
  auto c = corner_option(o.corner);
  if (!c) return exit_status::error;
  std::optional<double> floor;
  if (!o.min_mtbf.empty() && !(floor = parse_seconds(o.min_mtbf))) {
    spdlog::error("--min-mtbf {}: expected seconds, or a number with s, h, d or y (years)",
                  o.min_mtbf);
    return exit_status::error;
  }
  // The events are made as the simulation reaches them: memory does not grow with their count.
  if (o.events == 0 || o.events > max_events) {
    spdlog::error("--events {}: from 1 to {}", o.events, max_events);
    return exit_status::error;
  }
  auto d = load(o.design);
  if (!d || !fits_kernel(*d)) return exit_status::error;
  if (!corner_fits(*d, *c, o.corner)) return exit_status::error;
  mtbf_options mo;
  mo.element = o.element;
  mo.budget = *budget;
  mo.at = *c;
  mo.events = o.events;
  mo.seed = o.seed;
  for (const auto& r : o.rates) {
    const auto eq = r.find('=');
    const auto hz = eq == std::string::npos ? std::nullopt : parse_frequency(r.substr(eq + 1));
    if (!hz) {
      spdlog::error("--rate {}: expected NET=FREQ such as d=100MHz (Hz, kHz, MHz, GHz)", r);
      return exit_status::error;
    }
    const net_id net = d->nets.find(r.substr(0, eq));
    if (net == no_id) {
      spdlog::error("--rate {}: unknown net '{}'", r, r.substr(0, eq));
      return exit_status::error;
    }
    mo.rates.emplace_back(net, *hz);
  }
  auto res = mtbf(*d, mo, err);
  if (!res) {
    spdlog::error("{}", err);
    return exit_status::error;
  }
  const auto& n = d->nets;
  const bool pass = !floor || res->mtbf_worst_s >= *floor;

  output_set outputs;
  if (!o.json.empty() || !o.html.empty()) {
    report_json j = report_head(d->path);
    j["element"] = n.gate_name(res->first_gate);
    j["kind"] = res->mutex ? "mutex" : "syncff";
    j["budget_fs"] = *budget;
    j["rates_hz"] = report_json::object();
    for (int k = 0; k < 2; ++k) j["rates_hz"][n.net_name[res->inputs[k]]] = res->rate_hz[k];
    auto range = [](const delay_range& r) { return report_json{r.min, r.typ, r.max}; };
    j["tau_fs"] = range(res->tau);
    j["window_fs"] = range(res->window);
    auto secs = [](double s) { return std::isinf(s) ? report_json(nullptr) : report_json(s); };
    j["mtbf"] = {{"typ_s", secs(res->mtbf_typ_s)},
                 {"typ_years", secs(res->mtbf_typ_s / seconds_per_year)},
                 {"worst_s", secs(res->mtbf_worst_s)},
                 {"worst_years", secs(res->mtbf_worst_s / seconds_per_year)},
                 {"worst_tau_fs", res->tau.max},
                 {"worst_window_fs", res->window.max}};
    j["simulation"] = {{"corner", res->corner},
                       {"seed", o.seed},
                       {"delay_fs", res->delay},
                       {"tau_fs", res->sim_tau},
                       {"window_fs", res->sim_window},
                       {"events", res->events},
                       {"duration_s", res->duration_s},
                       {"resolutions", res->resolutions},
                       {"failures", res->failures},
                       {"observed_rate_hz", res->observed_hz},
                       {"interval_hz", {res->low_hz, res->high_hz}},
                       {"formula_rate_hz", res->formula_hz},
                       {"agrees", res->agrees()}};
    if (floor) j["min_mtbf_s"] = *floor;
    j["pass"] = pass;
    if (!o.json.empty() && !outputs.put(o.json, json_text(j))) return exit_status::error;
    if (!o.html.empty() && !outputs.put(o.html, html_report_mtbf(*d, {"mtbf", j, ""})))
      return exit_status::error;
  }
  if (!outputs.commit()) return exit_status::error;
  if (o.json != "-" && o.html != "-") {
    std::string out = fmt::format("element    {} ({}), tau {}..{}..{}, window {}..{}..{}\n",
                                  n.gate_name(res->first_gate), res->mutex ? "mutex" : "syncff",
                                  format_time(res->tau.min), format_time(res->tau.typ),
                                  format_time(res->tau.max), format_time(res->window.min),
                                  format_time(res->window.typ), format_time(res->window.max));
    out +=
        fmt::format("rates      {} {:.4g} Hz ({}), {} {:.4g} Hz ({})\n", n.net_name[res->inputs[0]],
                    res->rate_hz[0], res->mutex ? "requests" : "data", n.net_name[res->inputs[1]],
                    res->rate_hz[1], res->mutex ? "requests" : "clock");
    out += fmt::format("budget     {} beyond the element's delay\n", format_time(*budget));
    out += fmt::format("MTBF       typ {}\n", seconds_text(res->mtbf_typ_s));
    out += fmt::format("           worst {} (tau {}, window {})\n", seconds_text(res->mtbf_worst_s),
                       format_time(res->tau.max), format_time(res->window.max));
    out += fmt::format(
        "simulated  corner {}: {} {} over {:.4g} s, {} resolutions, {} longer than {} + {}\n",
        res->corner, res->events, res->mutex ? "requests" : "clock edges", res->duration_s,
        res->resolutions, res->failures, format_time(res->delay), format_time(*budget));
    out += fmt::format(
        "           failure rate {:.4g}/s (95% {:.4g} .. {:.4g}), formula {:.4g}/s: {}\n",
        res->observed_hz, res->low_hz, res->high_hz, res->formula_hz,
        res->agrees() ? "agree" : "DISAGREE");
    if (floor)
      out += fmt::format("result     {} (worst MTBF against --min-mtbf {})\n",
                         pass ? "pass" : "FAIL", seconds_text(*floor));
    std::fputs(out.c_str(), stdout);
  }
  return pass ? exit_status::ok : exit_status::findings;
}

void add_mtbf(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<mtbf_cli>();
  auto* cmd = app.add_subcommand(
      "mtbf",
      "MTBF of a mutex or syncff for a resolution budget: the formula, checked by "
      "simulation under random events");
  add_design_options(*cmd, o->design);
  cmd->add_option("--element", o->element, "the element, by one of its outputs")->required();
  cmd->add_option("--budget", o->budget,
                  "the time T allowed beyond the element's delay D (e.g. 200ps)")
      ->required();
  cmd->add_option("--rate", o->rates,
                  "NET=FREQ for each input: a syncff's D toggles at random at FREQ and its CK is "
                  "a clock of FREQ; a mutex's requests arrive at random at FREQ")
      ->required();
  cmd->add_option("--corner", o->corner, "the corner of the simulation (default typ)");
  cmd->add_option("--events", o->events,
                  "clock edges (syncff) or requests (mutex) to simulate (default 1000000)");
  cmd->add_option("--seed", o->seed, "seed of the random event streams (default 1)");
  cmd->add_option("--min-mtbf", o->min_mtbf,
                  "exit 1 when the worst MTBF is shorter (seconds, or with s, h, d or y)");
  check_output_path(
      cmd->add_option("--json", o->json, "write the figures as JSON to PATH ('-' for stdout)"));
  add_html_option(*cmd, o->html, "the MTBF against the budget, the simulation's check");
  cmd->callback([o, &status] { status = run_mtbf(*o); });
}

}  // namespace

SETTLE_COMMAND(mtbf, "mtbf", add_mtbf);

}  // namespace settle::cli
