// The abstract syntax of one .settle statement, as the X3 grammar produces it.
#pragma once

#include <boost/optional.hpp>
#include <boost/spirit/home/x3/support/ast/variant.hpp>
#include <string>
#include <vector>

namespace settle::ast {
namespace x3 = boost::spirit::x3;

/// An identifier or a dotted reference; `pos` points into the source text so
/// diagnostics can name its line and column.
struct name {
  std::string text;
  const char* pos = nullptr;
  bool quoted = false;  ///< written "in double quotes": `text` is taken as it stands
};

/// A time literal: the digits as written ("1.5") and the unit as a power of
/// ten of femtoseconds (ns = 6). Converted exactly by sim/model/time_parse.hpp.
struct time_lit {
  std::string number;
  int exponent = 0;
  const char* pos = nullptr;
};

/// TIME, TIME..TIME or TIME..TIME..TIME.
struct range {
  time_lit a;
  boost::optional<time_lit> b, c;
};

struct or_expr;
/// A net, a constant character '0'/'1', or a parenthesised expression.
struct primary : x3::variant<name, char, x3::forward_ast<or_expr>> {
  using base_type::base_type;
  using base_type::operator=;
};
struct unary {
  std::string nots;  ///< the '~' written before the operand
  primary operand;
};
struct and_expr : std::vector<unary> {};
struct xor_expr : std::vector<and_expr> {};
struct or_expr : std::vector<xor_expr> {};

/// One argument of a gate call: `a`, `0`, or `set: EXPR`.
struct arg {
  boost::optional<name> label;
  or_expr value;
};
struct call {
  name kind;
  std::vector<arg> args;
};
struct rhs : x3::variant<call, or_expr> {
  using base_type::base_type;
  using base_type::operator=;
};

/// `from NET DELAY`: the delay of the output changes a change of NET causes.
struct arc {
  name from;
  std::vector<range> delay;
};

/// `net = KIND(...)|EXPR [delay ...] [from NET DELAY, ...] [transport]`; one
/// range = both edges, two = rise then fall.
struct gate_stmt {
  name out;
  std::vector<name> more_outs;  ///< `ga, gb = mutex(...)`: the outputs after the first
  rhs value;
  boost::optional<std::vector<range>> delay;
  boost::optional<range> tau, window;  ///< metastable elements: `tau RANGE window RANGE`
  std::vector<arc> arcs;
  bool transport = false;
};

/// `input|output|wire|watch name, ...`
struct decl {
  std::string keyword;
  std::vector<name> names;
};

struct default_stmt {
  std::vector<range> delay;
  bool transport = false;
};

struct port_group {
  std::string dir;  ///< "in" or "out"
  std::vector<name> names;
};
struct block_head {
  name id;
  std::vector<port_group> groups;
};

struct binding {
  name port;
  std::vector<name> targets;  ///< a net name or "0"/"1"; a list {a, b} for a vector port
};
struct inst_stmt {
  name id;
  name block;
  std::vector<binding> binds;
};

struct assign {
  name net;
  char value = 'x';
};
struct init_stmt {
  std::string keyword;
  std::vector<assign> assigns;
};
/// `at TIME ...` or `after TIME ...`
struct timed_stmt {
  std::string keyword;
  time_lit time;
  std::vector<assign> assigns;
};
struct clock_stmt {
  name net;
  time_lit period;
  boost::optional<time_lit> high;
  boost::optional<unsigned long long> cycles;
  boost::optional<time_lit> at;  ///< `at T`: the clock's absolute reference time
};

/// Condition and property expressions: the gate expression operators over
/// nets, where a net may be written `NET = 1` (NET) or `NET = 0` (~NET).
struct cond_or;
struct cond_atom {
  name net;
  boost::optional<char> eq;  ///< '0' or '1' after '='
};
struct cond_primary : x3::variant<cond_atom, char, x3::forward_ast<cond_or>> {
  using base_type::base_type;
  using base_type::operator=;
};
struct cond_unary {
  std::string nots;
  cond_primary operand;
};
struct cond_and : std::vector<cond_unary> {};
struct cond_xor : std::vector<cond_and> {};
struct cond_or : std::vector<cond_xor> {};

/// A whole number as written (`times N`), with its position.
using count_lit = name;

/// `when COND [after RANGE] : ASSIGN {, ASSIGN} [times N]`
struct when_stmt {
  cond_or cond;
  boost::optional<range> delay;
  std::vector<assign> assigns;
  boost::optional<count_lit> times;
};
/// `NET rises|falls while` in `never NET rises while EXPR`.
struct edge_part {
  name net;
  std::string edge;
};
/// `always EXPR`, `never EXPR`, `never NET rises|falls while EXPR`.
struct property_stmt {
  std::string keyword;
  boost::optional<edge_part> edge;
  cond_or expr;
};
struct gauge_period {
  std::string word;  ///< "period"
  name net;
};
struct gauge_pulse {
  name net;
  std::string level;  ///< "high" or "low"
};
struct gauge_latency {
  name from;
  std::string from_edge;  ///< "rises" or "falls"
  name to;
  std::string to_edge;
};
struct gauge_body : x3::variant<gauge_period, gauge_pulse, gauge_latency> {
  using base_type::base_type;
  using base_type::operator=;
};
/// `gauge NAME = period of NET | pulse of NET high|low | latency from NET rises|falls to NET
/// rises|falls`
struct gauge_stmt {
  name id;
  gauge_body body;
};
struct settle_stmt {
  std::string keyword;
  boost::optional<time_lit> within;
};
struct run_stmt {
  std::string keyword;
  time_lit time;
};

struct expect_within {
  std::string word;
  time_lit time;
};
struct expect_glitch {
  std::string word;
  std::vector<name> nets;
};
/// `stable`, `deterministic`, or `oscillating [period A..B]`.
struct expect_word {
  std::string word;
  boost::optional<range> period;
};
/// `expect NAME within A..B` (a gauge).
struct expect_gauge {
  name gauge;
  range within;
};
/// `expect resolves NET within T` (a metastable element, by one of its outputs).
struct expect_resolves {
  std::string word;
  name net;
  time_lit time;
};
struct expect_body : x3::variant<std::vector<assign>, expect_within, expect_glitch, expect_resolves,
                                 expect_gauge, expect_word> {
  using base_type::base_type;
  using base_type::operator=;
};
struct expect_stmt {
  std::string keyword;
  expect_body body;
};

/// `import "PATH"`: the modules of a Verilog file become blocks.
struct import_stmt {
  std::string keyword;
  name path;  ///< quoted: the bytes between the quotes
};

struct statement : x3::variant<gate_stmt, decl, default_stmt, block_head, inst_stmt, init_stmt,
                               timed_stmt, clock_stmt, settle_stmt, run_stmt, expect_stmt,
                               when_stmt, property_stmt, gauge_stmt, import_stmt> {
  using base_type::base_type;
  using base_type::operator=;
};

}  // namespace settle::ast
