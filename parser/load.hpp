// Loading a design: the one entry point sim/ and the command line use (no X3 here).
#pragma once

#include <optional>
#include <string>
#include <string_view>

#include "sim/model/design.hpp"
#include "sim/model/diagnostic.hpp"

namespace settle {

struct load_options {
  std::string stim_path;        ///< --stim FILE: replaces the embedded stimulus
  std::string format = "auto";  ///< auto (by extension), settle, bench, verilog
  std::string top;  ///< verilog: the top module (empty: the one no other module instantiates)
  // .bench import
  std::string dff = "gates";  ///< gates: six-NAND flip-flops; primitive: an edge-triggered gate
  delay_range bench_delay{40000, 50000,
                          60000};  ///< --delay MIN..MAX for imported gates (.bench, and
                                   ///< Verilog gates written without a delay) (fs)
};

/// Reads, parses and elaborates `path`. Errors and warnings go to `diags`;
/// returns nullopt when there is any error.
std::optional<design> load_design(const std::string& path, const load_options& opt,
                                  diagnostics& diags);

/// The same from text in memory; `name` is used in diagnostics.
std::optional<design> load_design_text(std::string_view text, const std::string& name,
                                       const load_options& opt, diagnostics& diags);

/// The .bench (ISCAS-85/89) importer; load_design dispatches to it.
std::optional<design> load_bench_text(std::string_view text, const std::string& name,
                                      const load_options& opt, diagnostics& diags);

}  // namespace settle
