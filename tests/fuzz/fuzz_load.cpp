// libFuzzer target: the .settle parser and elaborator, the .bench importer, the structural
// Verilog reader, the SDF reader (and its annotation onto a small Verilog design), diagnostics and
// a bounded run.
#include <cstddef>
#include <cstdint>
#include <string>
#include <string_view>

#include "parser/load.hpp"
#include "parser/sdf.hpp"
#include "parser/verilog.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/corner.hpp"

namespace {

// Formats every diagnostic (the caret code indexes the source line by column).
std::size_t format_all(const settle::diagnostics& diags) {
  std::size_t n = 0;
  for (const auto& d : diags.items) n += settle::format_diagnostic(d).size();
  return n;
}

// A small design that loaded is also run once, bounded, so the elaborated
// netlist is exercised by the kernel the way `settle run` would.
void run_small(const settle::design& d) {
  if (d.nets.gate_count() > 200) return;
  settle::delay_table delays;
  settle::fill_delays(d, settle::corner{}, delays);
  settle::run_options opt;
  opt.max_events = 5000;
  (void)settle::run_stimulus(d, delays, opt);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string_view text(reinterpret_cast<const char*>(data), size);
  // The text as each design format: parsed, its diagnostics formatted, and a small design run.
  auto as_design = [&](const char* format, const char* name, auto load) {
    settle::diagnostics diags;
    settle::load_options opt;
    opt.format = format;
    auto d = load(text, name, opt, diags);
    format_all(diags);
    if (d) run_small(*d);
  };
  as_design("settle", "fuzz.settle", settle::load_design_text);
  as_design("bench", "fuzz.bench", settle::load_bench_text);
  as_design("verilog", "fuzz.v", settle::load_verilog_text);
  {
    // The text as an SDF file, annotated onto a two-cell design whose names it may hit.
    settle::diagnostics diags;
    auto sdf = settle::read_sdf_text(std::string(text), "fuzz.sdf", diags);
    format_all(diags);
    if (sdf) {
      static constexpr std::string_view cells =
          "module inv(input a, output y); not (y, a); endmodule\n"
          "module top(input a, output y); wire m; inv u1(.a(a), .y(m)); inv u2(.a(m), .y(y));\n"
          "endmodule\n";
      settle::diagnostics dd;
      settle::load_options opt;
      opt.format = "verilog";
      if (auto d = settle::load_verilog_text(cells, "cells.v", opt, dd)) {
        settle::sdf_report report;
        if (settle::annotate_sdf(d->nets, *sdf, dd, report)) run_small(*d);
        format_all(dd);
      }
    }
  }
  return 0;
}
