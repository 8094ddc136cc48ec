// The structural IEEE 1364 (Verilog) netlist reader: the facade load.cpp calls (no X3 here).
#pragma once

#include <optional>
#include <string>
#include <string_view>

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

}  // namespace settle
