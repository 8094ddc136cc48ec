// The .settle statement grammar (Boost.Spirit X3) and its DEFINE.
#pragma once

#include <boost/spirit/home/x3.hpp>
#include <boost/spirit/home/x3/support/ast/variant.hpp>
#include <string_view>

#include "parser/ast.hpp"
#include "parser/ast_adapted.hpp"
#include "parser/grammar.hpp"
#include "parser/keyword_x3.hpp"
#include "parser/lexical.hpp"
#include "parser/rule_x3.hpp"

namespace settle::grammar {
namespace x3 = boost::spirit::x3;

///////////////////////////////////////////////////////////////////////////////
// Keywords: a whole word, not the prefix of an identifier
///////////////////////////////////////////////////////////////////////////////
using kw_parser = lexical::keyword_parser<lexical::ident_char>;
inline constexpr kw_parser kw(const char* w) { return kw_parser(w); }

/// Words that cannot name a net, block or instance (they begin statements or delays).
inline bool is_reserved(std::string_view w) {
  return lexical::one_of(
      w, {"input", "output", "wire",  "default",  "delay",  "rise",  "fall",  "transport",
          "block", "inst",   "init",  "stimulus", "at",     "after", "clock", "settle",
          "run",   "expect", "watch", "when",     "always", "never", "gauge", "import"});
}

namespace detail {
using x3::_attr;
using x3::_pass;
using x3::_val;

inline auto const set_name = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
  // A dotted reference may not start with a keyword; a plain one may not be one.
  auto dot = _val(ctx).text.find('.');
  _pass(ctx) = !is_reserved(std::string_view(_val(ctx).text).substr(0, dot));
};
// A quoted name: the bytes between the quotes, looked up as they stand.
inline auto const set_quoted_name = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
  _val(ctx).quoted = true;
};
inline auto const set_const_name = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
};
inline auto const set_time = [](auto& ctx) {
  using boost::fusion::at_c;
  auto& a = _attr(ctx);
  auto& r = at_c<0>(a);
  _val(ctx).number.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
  _val(ctx).exponent = at_c<1>(a);
};
}  // namespace detail

struct time_units : x3::symbols<int> {
  time_units() { add("fs", 0)("ps", 3)("ns", 6)("us", 9)("ms", 12); }
};
inline time_units const time_unit_table;

template <typename P>
auto list(P const& p) {
  return p >> *(',' > p);
}

auto const ident_chars = x3::char_(lexical::ident_start_set) >> *x3::char_(lexical::ident_char_set);
auto const word_end = !x3::char_(lexical::ident_char_set);

///////////////////////////////////////////////////////////////////////////////
// Rules
///////////////////////////////////////////////////////////////////////////////
using raw_range = boost::iterator_range<const char*>;

// Names, constants and time literals: the raw spans of the source ...
SETTLE_X3_RULES((ident_raw, raw_range, "name_"), (ref_raw, raw_range, "ref_"),
                (const_raw, raw_range, "target_"), (quoted_raw, raw_range, "ref_"),
                (number_raw, raw_range, "time_"))

// ... and their values.
SETTLE_X3_RULES((name_, ast::name, "name_"), (ref_, ast::name, "ref_"), (net_, ast::name, "name_"),
                (const_name, ast::name, "target_"), (target_, ast::name, "target_"),
                (time_unit, int, "time_unit"), (time_, ast::time_lit, "time_"))

// Delays.
SETTLE_X3_RULES((range_, ast::range, "range_"), (rise_fall, std::vector<ast::range>, "rise_fall"),
                (delay_body, std::vector<ast::range>, "delay_body"))

// Gate expressions and gate statements.
SETTLE_X3_RULES((or_expr, ast::or_expr, "or_expr"), (xor_expr, ast::xor_expr, "xor_expr"),
                (and_expr, ast::and_expr, "and_expr"), (unary, ast::unary, "unary"),
                (primary, ast::primary, "primary"), (arg, ast::arg, "arg"),
                (call, ast::call, "call"), (rhs, ast::rhs, "rhs"), (gate, ast::gate_stmt, "gate"),
                (arc, ast::arc, "arc"), (arcs, std::vector<ast::arc>, "arcs"))

// Declarations, blocks and instances.
SETTLE_X3_RULES((decl, ast::decl, "decl"), (default_, ast::default_stmt, "default_"),
                (port_group, ast::port_group, "port_group"),
                (block_head, ast::block_head, "block_head"), (binding, ast::binding, "binding"),
                (inst, ast::inst_stmt, "inst"))

// Stimulus: input changes, clocks and steps.
SETTLE_X3_RULES((value_, char, "value_"), (assign, ast::assign, "assign"),
                (assigns, std::vector<ast::assign>, "assigns"), (init, ast::init_stmt, "init"),
                (timed, ast::timed_stmt, "timed"), (clock, ast::clock_stmt, "clock"),
                (cycles_count, unsigned long long, "cycles_count"),
                (settle_, ast::settle_stmt, "settle_"), (run, ast::run_stmt, "run"))

// Expectations.
SETTLE_X3_RULES((expect_within, ast::expect_within, "expect_within"),
                (expect_glitch, ast::expect_glitch, "expect_glitch"),
                (expect_word, ast::expect_word, "expect_word"),
                (expect_body, ast::expect_body, "expect_body"),
                (expect, ast::expect_stmt, "expect"))

// Conditions of reaction rules and properties.
SETTLE_X3_RULES((cond_or, ast::cond_or, "cond_or"), (cond_xor, ast::cond_xor, "cond_xor"),
                (cond_and, ast::cond_and, "cond_and"), (cond_unary, ast::cond_unary, "cond_unary"),
                (cond_primary, ast::cond_primary, "cond_primary"),
                (cond_atom, ast::cond_atom, "cond_atom"))

// Reaction rules and properties.
SETTLE_X3_RULES((count_, ast::name, "count_"), (count_raw, raw_range, "count_"),
                (when_, ast::when_stmt, "when_"), (edge_part, ast::edge_part, "edge_part"),
                (property, ast::property_stmt, "property"))

// Gauges and their expectations.
SETTLE_X3_RULES((gauge_period, ast::gauge_period, "gauge_period"),
                (gauge_pulse, ast::gauge_pulse, "gauge_pulse"),
                (gauge_latency, ast::gauge_latency, "gauge_latency"),
                (gauge_body, ast::gauge_body, "gauge_body"), (gauge, ast::gauge_stmt, "gauge"),
                (expect_gauge, ast::expect_gauge, "expect_gauge"),
                (expect_resolves, ast::expect_resolves, "expect_resolves"))

// Comma-separated lists.
SETTLE_X3_RULES((ref_list, std::vector<ast::name>, "ref_list"),
                (name_list, std::vector<ast::name>, "name_list"),
                (port_groups, std::vector<ast::port_group>, "port_groups"),
                (bindings, std::vector<ast::binding>, "bindings"),
                (args, std::vector<ast::arg>, "args"))

// Imports of Verilog files.
SETTLE_X3_RULES((import_path, ast::name, "import_path"), (import_, ast::import_stmt, "import_"))
statement_type const statement_rule = "statement";
auto const ref_list_def = list(ref_);
auto const name_list_def = list(name_);
auto const port_groups_def = port_group >> *(';' > port_group);
auto const bindings_def = binding >> *(',' > binding);
auto const args_def = arg >> *(',' > arg);

// ---- lexemes
auto const ident_raw_def = x3::raw[x3::lexeme[ident_chars]];
auto const ref_raw_def = x3::raw[x3::lexeme[ident_chars >> *('.' >> ident_chars)]];
// "NAME": any bytes but a quote, a line break or a control byte, at least one.
auto const quoted_raw_def =
    x3::lexeme['"' >> x3::raw[+(x3::char_ - x3::char_('"') - x3::char_('\x00', '\x1f'))] >> '"'];
auto const const_raw_def = x3::raw[x3::lexeme[x3::char_("01") >> word_end]];
auto const number_raw_def = x3::raw[x3::lexeme[+x3::digit >> -('.' >> +x3::digit)]];
auto const name__def = ident_raw[detail::set_name];
auto const ref__def = ref_raw[detail::set_name] | quoted_raw[detail::set_quoted_name];
// A net in a gate: a plain name, or a quoted one (any net's full name as it stands).
auto const net__def = ident_raw[detail::set_name] | quoted_raw[detail::set_quoted_name];
auto const const_name_def = const_raw[detail::set_const_name];
// No semantic action at this level, so the alternative's attribute propagates.
auto const target__def = ref_ | const_name;
auto const time_unit_def = x3::lexeme[time_unit_table >> word_end];
// The fraction needs a digit after the dot, so "35ps..55ps" and "1..2" keep their "..".
auto const time__def = (number_raw > time_unit)[detail::set_time];
auto const range__def = time_ >> -(x3::lit("..") > time_) >> -(x3::lit("..") > time_);
auto const rise_fall_def = kw("rise") > range_ > kw("fall") > range_;
auto const delay_body_def = rise_fall | x3::repeat(1)[range_];

// ---- expressions: precedence ~ > & > ^ > |
auto const or_expr_def = xor_expr >> *('|' > xor_expr);
auto const xor_expr_def = and_expr >> *('^' > and_expr);
auto const and_expr_def = unary >> *('&' > unary);
auto const unary_def = *x3::char_('~') > primary;
auto const primary_def = net_ | x3::lexeme[x3::char_("01") >> word_end] | ('(' > or_expr > ')');

// ---- gates
// The lookahead keeps a plain net argument from being taken for a label.
auto const arg_def = -(&(x3::lexeme[ident_chars] >> ':') >> name_ >> ':') >> or_expr;
auto const call_def = name_ >> '(' > -(!x3::lit(')') >> args) > ')';
auto const rhs_def = call | or_expr;
// `from NET DELAY, ...`: one delay per fan-in named (pin-to-pin arcs).
auto const arc_def = kw("from") > net_ > delay_body;
auto const arcs_def = -(arc >> *(',' > arc));
auto const gate_def = net_ >> *(',' > net_) >> '=' > rhs >>
                      -((kw("delay") > delay_body) | rise_fall) >> -(kw("tau") > range_) >>
                      -(kw("window") > range_) >> arcs >> x3::matches[kw("transport")];

// ---- declarations and structure
auto const decl_def = x3::raw[kw("input") | kw("output") | kw("wire") | kw("watch")] > ref_list;
auto const default__def = kw("default") > kw("delay") > delay_body >> x3::matches[kw("transport")];
auto const port_group_def = x3::raw[kw("in") | kw("out")] > name_list;
auto const block_head_def = kw("block") > name_ > '(' > -port_groups > ')' > '{';
auto const binding_def = name_ > ':' > (('{' > (target_ % ',') > '}') | x3::repeat(1)[target_]);
auto const inst_def = kw("inst") > name_ > name_ > '(' > -bindings > ')';
auto const value__def = x3::lexeme[x3::char_("01xX") >> word_end];
auto const assign_def = ref_ >> '=' > value_;
auto const assigns_def = list(assign);
auto const init_def = x3::raw[kw("init")] > assigns;

// ---- stimulus
auto const timed_def = x3::raw[kw("at") | kw("after")] > time_ > assigns;
auto const cycles_count_def = x3::lexeme[x3::ulong_long >> word_end];
auto const clock_def = kw("clock") > ref_ > kw("period") > time_ > -(kw("high") > time_) >
                       -(kw("cycles") > cycles_count) > -(kw("at") > time_);
auto const settle__def = x3::raw[kw("settle")] >> -(kw("within") > time_);
auto const run_def = x3::raw[kw("run")] > time_;
auto const expect_within_def = x3::raw[kw("settle")] > kw("within") > time_;
auto const expect_glitch_def = x3::raw[kw("no")] > kw("glitch") > kw("on") > ref_list;
auto const expect_word_def = x3::raw[kw("stable") | kw("oscillating") | kw("deterministic")] >>
                             -(kw("period") > range_);
auto const expect_gauge_def = name_ >> kw("within") > range_;
auto const expect_resolves_def = x3::raw[kw("resolves")] > ref_ > kw("within") > time_;
auto const expect_body_def =
    assigns | expect_within | expect_glitch | expect_resolves | expect_gauge | expect_word;

// ---- closed-loop environments: conditions, reaction rules, properties, gauges
auto const cond_or_def = cond_xor >> *('|' > cond_xor);
auto const cond_xor_def = cond_and >> *('^' > cond_and);
auto const cond_and_def = cond_unary >> *('&' > cond_unary);
auto const cond_unary_def = *x3::char_('~') > cond_primary;
auto const cond_atom_def = ref_ >> -('=' > x3::lexeme[x3::char_("01") >> word_end]);
auto const cond_primary_def =
    cond_atom | x3::lexeme[x3::char_("01") >> word_end] | ('(' > cond_or > ')');
auto const count_raw_def = x3::raw[x3::lexeme[+x3::digit >> word_end]];
auto const count__def = count_raw[detail::set_const_name];
auto const when__def = kw("when") > cond_or > -(kw("after") > range_) > ':' > assigns >
                       -(kw("times") > count_);
auto const edge_part_def = ref_ >> x3::raw[kw("rises") | kw("falls")] >> kw("while");
auto const property_def = x3::raw[kw("always") | kw("never")] > -edge_part > cond_or;
auto const gauge_period_def = x3::raw[kw("period")] > kw("of") > ref_;
auto const gauge_pulse_def = kw("pulse") > kw("of") > ref_ > x3::raw[kw("high") | kw("low")];
auto const gauge_latency_def = kw("latency") > kw("from") > ref_
                               > x3::raw[kw("rises") | kw("falls")] > kw("to") > ref_
                               > x3::raw[kw("rises") | kw("falls")];
auto const gauge_body_def = gauge_period | gauge_pulse | gauge_latency;
auto const gauge_def = kw("gauge") > name_ > '=' > gauge_body;
auto const expect_def = x3::raw[kw("expect")] > expect_body;
auto const import_path_def = quoted_raw[detail::set_quoted_name];
auto const import__def = x3::raw[kw("import")] > import_path;

auto const statement_rule_def = decl | default_ | block_head | inst | init | timed | clock |
                                settle_ | run | expect | when_ | property | gauge | import_ | gate;

BOOST_SPIRIT_DEFINE(ident_raw, ref_raw, quoted_raw, const_raw, number_raw, const_name, name_, ref_,
                    net_, target_, time_unit, time_, range_, rise_fall, delay_body, or_expr,
                    xor_expr, and_expr, unary, primary, arg, call, rhs, gate, decl, default_,
                    port_group, block_head, binding, inst, value_, assign, assigns, init, timed,
                    clock, cycles_count, settle_, run, expect_within, expect_glitch, expect_word,
                    expect_body, expect, ref_list, name_list, port_groups, bindings, args,
                    statement_rule)
// The closed-loop statements (a second DEFINE: one takes a bounded number of rules).
BOOST_SPIRIT_DEFINE(cond_or, cond_xor, cond_and, cond_unary, cond_primary, cond_atom, count_raw,
                    count_, when_, edge_part, property, gauge_period, gauge_pulse, gauge_latency,
                    gauge_body, gauge, expect_gauge, expect_resolves)
BOOST_SPIRIT_DEFINE(import_path, import_, arc, arcs)

}  // namespace settle::grammar

namespace settle::grammar {
inline statement_type const& statement() { return statement_rule; }
}  // namespace settle::grammar
