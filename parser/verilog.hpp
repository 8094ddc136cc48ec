// The structural IEEE 1364 (Verilog) netlist reader: the facade load.cpp calls (no X3 here).
#pragma once

#include <memory>
#include <optional>
#include <string>
#include <string_view>

#include "parser/ir.hpp"
#include "parser/load.hpp"
#include "sim/model/design.hpp"
#include "sim/model/diagnostic.hpp"

namespace settle {

/// Reads a structural Verilog text (see parser/VERILOG.md for the subset),
/// flattens its top module into a netlist and returns the design, with no
/// stimulus (a --stim file supplies one). Gates and assigns written without a
/// delay take `opt.bench_delay` (--delay). Errors go to `diags`; nullopt when
/// there is any.
std::optional<design> load_verilog_text(std::string_view text, const std::string& name,
                                        const load_options& opt, diagnostics& diags);

/// The modules of a Verilog file a .settle file imports (`import "ctrl.v"`).
class verilog_library {
 public:
  virtual ~verilog_library() = default;
  /// Every module of the file and of the files it includes, lowered as
  /// blocks. Each scope's `rep` is the reporter of the file it is written in,
  /// and its names view into this object, which must outlive elaboration.
  std::vector<ir::scope_def> modules;
  /// Where each module is defined, as FILE:LINE:COL.
  std::vector<std::string> module_where;
  /// The errors found so far in the file and the files it includes (reading,
  /// and the elaboration of its modules).
  virtual std::size_t errors() const = 0;
};

/// Reads `text` (the file `name`) as structural Verilog for an import: every
/// module, no top module, gates without a delay taking `opt.bench_delay`.
/// Errors go to `diags` under the Verilog file's own name; `modules` is empty
/// when there is any.
std::unique_ptr<verilog_library> read_verilog_library(std::string text, const std::string& name,
                                                      const load_options& opt, diagnostics& diags);

}  // namespace settle
