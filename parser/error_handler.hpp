// Rule names -> user words, for "expected ..." diagnostics from expectation points.
#pragma once

#include <string>
#include <unordered_map>

namespace settle::grammar {

/// Translates an X3 rule or parser description into the words a diagnostic uses.
inline std::string describe(const std::string& which) {
  static const std::unordered_map<std::string, std::string> id_map = {
      {"name_", "a name"},
      {"ref_", "a net name"},
      {"ref_list", "a net name"},
      {"name_list", "a name"},
      {"args", "a gate argument"},
      {"bindings", "a port binding PORT: NET"},
      {"port_groups", "'in' or 'out' followed by port names"},
      {"target_", "a net, 0 or 1"},
      {"time_", "a time with a unit (fs ps ns us ms)"},
      {"time_unit", "a time unit (fs ps ns us ms)"},
      {"range_", "a delay (TIME, TIME..TIME or TIME..TIME..TIME)"},
      {"delay_body", "a delay (TIME, TIME..TIME, TIME..TIME..TIME or rise R fall F)"},
      {"rise_fall", "rise R fall F"},
      {"primary", "a net, 0, 1 or '('"},
      {"unary", "a net, 0, 1 or '('"},
      {"or_expr", "an expression"},
      {"rhs", "a gate such as nand(a, b) or an expression"},
      {"arg", "a gate argument"},
      {"arc", "an arc: from NET DELAY"},
      {"value_", "a value 0, 1 or x"},
      {"assign", "NET = VALUE"},
      {"assigns", "NET = VALUE"},
      {"binding", "a port binding PORT: NET"},
      {"port_group", "'in' or 'out' followed by port names"},
      {"expect_body",
       "an expectation (NET = VALUE, stable, oscillating, settle within T, no glitch on NET, "
       "deterministic, GAUGE within A..B)"},
      {"cycles_count", "a cycle count"},
      {"cond_or", "a condition over nets"},
      {"cond_xor", "a condition over nets"},
      {"cond_and", "a condition over nets"},
      {"cond_unary", "a net, 0, 1 or '('"},
      {"cond_primary", "a net, 0, 1 or '('"},
      {"count_", "a count"},
      {"import_path", "a quoted file name such as \"ctrl.v\""},
      {"gauge_body",
       "period of NET, pulse of NET high|low, or latency from NET rises|falls to NET rises|falls"},
  };
  auto it = id_map.find(which);
  return it == id_map.end() ? which : it->second;
}

}  // namespace settle::grammar
