// The elaborated design written back as `.settle` text: hierarchy, gates, exact delays, stimulus.
#pragma once

#include <string>
#include <string_view>

#include "sim/model/design.hpp"

namespace settle {

/// What settle_text writes and why it could not.
struct emit_result {
  std::string text;   ///< the `.settle` file
  std::string error;  ///< non-empty when the design holds what the language cannot say
  bool flat = false;  ///< the hierarchy could not be rebuilt; every net is at top level
};

/// Writes `d` as a `.settle` file that reads back to the same netlist: a header
/// comment naming `d.path` and `version` ("settle 0.1.0"), the blocks and
/// instances rebuilt from the netlist's scopes and aliases (or, when they do
/// not give one consistent block body per block, the flat netlist with its
/// full names), every gate with its kind, fan-in and exact delays, the
/// initial values and the stimulus. A flip-flop primitive (`.bench` with
/// `--dff primitive`) has no `.settle` form: `error` says so.
emit_result settle_text(const design& d, const std::string& version);

/// True when `name` can be written bare where the language takes a name: an
/// identifier ([A-Za-z_][A-Za-z0-9_]*) that is not a reserved word.
bool settle_identifier(std::string_view name);

/// `name` bare when settle_identifier allows it, otherwise in double quotes.
std::string settle_name(std::string_view name);

}  // namespace settle
