// The pieces of `fixed:` corners that corner.cpp calls: parsing, printing and the delay tables.
#pragma once

#include <memory>
#include <string>
#include <string_view>

#include "sim/model/corner.hpp"

namespace settle::detail {

/// Parses the entries after "fixed:" (no design needed); null with the reason
/// in `why` when an entry is malformed or a gate or rule is listed twice.
std::shared_ptr<const fixed_delays> parse_fixed(std::string_view entries, std::string& why);

/// "fixed:" and the entries, times exact, so parse_fixed reads them back.
std::string fixed_name(const fixed_delays& f);

/// Every gate's rise and fall under `f`: the resolved ones, or resolved here
/// against `n` (the caller has checked the names with corner_design_error).
void fill_fixed(const netlist& n, const fixed_delays& f, delay_table& out);

/// The delay of firing `firing` of rule `rule` (0-based) under `f`, typ
/// `written.typ` when the rule is not listed.
time_fs fixed_rule_delay(const fixed_delays& f, const delay_range& written, std::uint32_t rule,
                         std::uint64_t firing);

}  // namespace settle::detail
