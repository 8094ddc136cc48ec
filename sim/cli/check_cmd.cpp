// `settle check`: parse, elaborate and lint a design; print its counts and feedback loops.
#include <fmt/format.h>
#include <fmt/ranges.h>
#include <spdlog/spdlog.h>

#include <CLI/CLI.hpp>
#include <algorithm>
#include <array>
#include <memory>

#include "parser/sdf.hpp"
#include "sim/analysis/graph.hpp"
#include "sim/cli/command.hpp"
#include "sim/cli/report_common.hpp"
#include "waves/emit.hpp"

namespace settle::cli {
namespace {

struct check_options {
  design_options design;
  std::string json;
  std::string emit;  // the design written back as .settle
};

struct loop_info {
  std::size_t size = 0;
  std::vector<std::string> nets;  // every member's output net, sorted by name
  bool zero_delay = false;        // every member's delays are 0 on both edges
};

// Loops sorted by size (largest first), then by their first net name.
std::vector<loop_info> loops_of(const netlist& n) {
  std::vector<loop_info> loops;
  for (const auto& scc : feedback_loops(n)) {
    loop_info l;
    l.size = scc.size();
    l.zero_delay = true;
    for (gate_id g : scc) {
      l.nets.push_back(n.gate_name(g));
      l.zero_delay = l.zero_delay && n.delay[g].rise.max == 0 && n.delay[g].fall.max == 0;
    }
    std::sort(l.nets.begin(), l.nets.end());
    loops.push_back(std::move(l));
  }
  std::sort(loops.begin(), loops.end(), [](const loop_info& a, const loop_info& b) {
    return a.size != b.size ? a.size > b.size : a.nets.front() < b.nets.front();
  });
  return loops;
}

constexpr std::size_t shown_members = 4;

exit_status run_check(const check_options& o) {
  auto uses = design_inputs(o.design);
  uses.push_back({path_use::kind::output, "--json", o.json, ""});
  uses.push_back({path_use::kind::output, "--emit", o.emit, ""});
  if (!check_paths(uses)) return exit_status::error;
  if (o.json == "-" && o.emit == "-") {
    spdlog::error("--json and --emit cannot both write to stdout");
    return exit_status::error;
  }
  sdf_report sdf;
  auto d = load(o.design, true, &sdf);
  if (!d) return exit_status::error;
  output_set outputs;
  if (!o.emit.empty()) {
    const auto e = settle_text(*d, version_text());
    if (!e.error.empty()) {
      spdlog::error("{}: cannot write it as .settle: {}", d->path, e.error);
      return exit_status::error;
    }
    if (e.flat && d->nets.blocks > 0)
      spdlog::warn("{}: --emit writes the flat netlist: its blocks could not be rebuilt", d->path);
    if (!outputs.put(o.emit, e.text)) return exit_status::error;
  }
  const netlist& n = d->nets;
  std::array<std::size_t, gate_kind_count> by_kind{};
  for (auto k : n.kind) ++by_kind[static_cast<int>(k)];
  const auto loops = loops_of(n);
  const std::size_t nets = n.net_count() >= 2 ? n.net_count() - 2 : 0;
  const bool imported = !d->source.format.empty() && d->source.format != "settle";
  // A loop with no delay anywhere can change without end inside one instant:
  // no time passes between its changes, so no waveform or period means anything.
  for (const auto& l : loops)
    if (l.zero_delay)
      spdlog::warn(
          "{}: feedback loop of {} gate{} ({}{}) has zero delay on every gate; give one of them a "
          "delay",
          d->path, l.size, l.size == 1 ? "" : "s",
          fmt::join(l.nets.begin(), l.nets.begin() + std::min(l.nets.size(), shown_members), ", "),
          l.nets.size() > shown_members ? ", ..." : "");

  if (!o.json.empty()) {
    report_json j = report_head(d->path);
    j["blocks"] = n.blocks;
    j["instances"] = n.instances;
    j["gates"] = n.gate_count();
    j["nets"] = nets;
    j["inputs"] = n.inputs.size();
    j["outputs"] = n.outputs.size();
    j["by_kind"] = report_json::object();
    for (int k = 0; k < gate_kind_count; ++k)
      if (by_kind[k]) j["by_kind"][kind_name(static_cast<gate_kind>(k))] = by_kind[k];
    j["loops"] = report_json::array();
    for (const auto& l : loops) {
      report_json e;
      e["size"] = l.size;
      e["nets"] = std::vector<std::string>(l.nets.begin(),
                                           l.nets.begin() + std::min(l.nets.size(), shown_members));
      e["zero_delay"] = l.zero_delay;
      j["loops"].push_back(std::move(e));
    }
    if (imported) {
      const auto& s = d->source;
      j["source"] = {{"format", s.format}, {"inputs", s.inputs},       {"outputs", s.outputs},
                     {"dffs", s.dffs},     {"inverters", s.inverters}, {"buffers", s.buffers},
                     {"gates", s.gates}};
    }
    if (!o.design.sdf.empty())
      j["sdf"] = {{"files", sdf.files},
                  {"arcs_annotated", sdf.arcs_annotated},
                  {"gates_kept", sdf.gates_kept},
                  {"unmatched_instances", sdf.unmatched_instances}};
    if (!outputs.put(o.json, json_text(j))) return exit_status::error;
  }
  if (!outputs.commit()) return exit_status::error;
  // stdout carries the JSON or the design alone
  if (o.json == "-" || o.emit == "-") return exit_status::ok;

  std::string out = fmt::format("design     {}\n", d->path);
  out += fmt::format("blocks     {}\ninstances  {}\n", n.blocks, n.instances);
  std::string kinds;
  for (int k = 0; k < gate_kind_count; ++k)
    if (by_kind[k])
      kinds += fmt::format("{}{} {}", kinds.empty() ? "" : ", ",
                           kind_name(static_cast<gate_kind>(k)), by_kind[k]);
  out += fmt::format("gates      {}{}\n", n.gate_count(), kinds.empty() ? "" : "  (" + kinds + ")");
  out += fmt::format("nets       {}\ninputs     {}\noutputs    {}\n", nets, n.inputs.size(),
                     n.outputs.size());
  if (loops.empty()) {
    out += "loops      none\n";
  } else {
    out += fmt::format("loops      {}\n", loops.size());
    for (const auto& l : loops) {
      std::string members;
      for (std::size_t i = 0; i < l.nets.size() && i < shown_members; ++i)
        members += (i ? ", " : "") + l.nets[i];
      if (l.nets.size() > shown_members)
        members += fmt::format(", ... ({} more)", l.nets.size() - shown_members);
      out += fmt::format("  {:>5} gate{}: {}\n", l.size, l.size == 1 ? " " : "s", members);
    }
  }
  if (imported) {
    const auto& s = d->source;
    out += fmt::format(
        "source     {}: inputs {}, outputs {}, dffs {}, inverters {}, buffers {}, gates {}\n",
        s.format, s.inputs, s.outputs, s.dffs, s.inverters, s.buffers, s.gates);
  }
  if (!o.design.sdf.empty()) {
    out += fmt::format("sdf        {} file{}: {} arc{} annotated, {} gate{} kept netlist delays\n",
                       sdf.files, sdf.files == 1 ? "" : "s", sdf.arcs_annotated,
                       sdf.arcs_annotated == 1 ? "" : "s", sdf.gates_kept,
                       sdf.gates_kept == 1 ? "" : "s");
    if (!sdf.unmatched_instances.empty())
      out += fmt::format("  unmatched instances: {}\n", fmt::join(sdf.unmatched_instances, ", "));
  }
  std::fputs(out.c_str(), stdout);
  return exit_status::ok;
}

void add_check(CLI::App& app, exit_status& status) {
  auto o = std::make_shared<check_options>();
  auto* cmd = app.add_subcommand(
      "check", "parse, elaborate and lint a design; print counts and feedback loops");
  add_design_options(*cmd, o->design);
  check_output_path(
      cmd->add_option("--json", o->json, "write the counts as JSON to PATH ('-' for stdout)"));
  check_output_path(cmd->add_option(
      "--emit", o->emit, "write the elaborated design as a .settle file to PATH ('-' for stdout)"));
  cmd->callback([o, &status] { status = run_check(*o); });
}

}  // namespace

SETTLE_COMMAND(check, "check", add_check);

}  // namespace settle::cli
