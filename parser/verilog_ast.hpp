// The abstract syntax of one statement of a structural IEEE 1364 netlist, as
// the Verilog grammar (parser/verilog_grammar.cpp) produces it. Terms, delays
// and expressions are kept as the text written (checked by the grammar) with
// their position; parser/verilog.cpp decodes them.
#pragma once

#include <boost/optional.hpp>
#include <boost/spirit/home/x3/support/ast/variant.hpp>
#include <string>
#include <vector>

namespace settle::vast {
namespace x3 = boost::spirit::x3;

/// A piece of text as written; `pos` points into the source text.
struct raw {
  std::string text;
  const char* pos = nullptr;
};

/// A connection: one term, or the terms of a concatenation `{a, b[3:0], 1'b0}`.
using conn = std::vector<raw>;

/// One entry of a module's port list: a name (non-ANSI), or an ANSI
/// declaration whose direction and range carry over to the names after it.
struct port_item {
  boost::optional<std::string> dir;  ///< "input" or "output"
  boost::optional<raw> range;        ///< "[msb:lsb]"
  raw name;
};

struct module_hdr {
  raw name;
  std::vector<port_item> ports;
};

/// `input`, `output` or `wire` with an optional range and a list of names.
struct decl_stmt {
  std::string kind;
  boost::optional<raw> range;
  std::vector<raw> names;
};

struct assign_item {
  conn lhs;
  raw rhs;
};
struct assign_stmt {
  boost::optional<raw> delay;
  std::vector<assign_item> items;
};

struct gate_inst {
  boost::optional<raw> name;
  std::vector<conn> terms;
};
struct gate_stmt {
  raw kind;
  boost::optional<raw> delay;
  std::vector<gate_inst> insts;
};

/// `.port(conn)` (port set) or a positional connection (port empty).
struct port_conn {
  boost::optional<raw> port;
  conn value;
};
struct mod_inst {
  raw name;
  std::vector<port_conn> conns;
};
struct inst_stmt {
  raw module;
  std::vector<mod_inst> insts;
};

struct statement : x3::variant<module_hdr, decl_stmt, assign_stmt, gate_stmt, inst_stmt> {
  using base_type::base_type;
  using base_type::operator=;
};

}  // namespace settle::vast
