// The structural Verilog statement grammar (Boost.Spirit X3) and its DEFINE.
#pragma once

#include <boost/fusion/include/adapt_struct.hpp>
#include <boost/spirit/home/x3.hpp>

#include "parser/keyword_x3.hpp"
#include "parser/lexical.hpp"
#include "parser/rule_x3.hpp"
#include "parser/verilog_ast.hpp"
#include "parser/verilog_grammar.hpp"

BOOST_FUSION_ADAPT_STRUCT(settle::vast::port_item, dir, range, name)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::module_hdr, name, ports)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::decl_stmt, kind, range, names)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::assign_item, lhs, rhs)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::assign_stmt, delay, items)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::gate_inst, name, terms)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::gate_stmt, kind, delay, insts)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::port_conn, port, value)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::mod_inst, name, conns)
BOOST_FUSION_ADAPT_STRUCT(settle::vast::inst_stmt, module, insts)

namespace settle::vgrammar {
namespace x3 = boost::spirit::x3;

/// A keyword: the whole word, not the prefix of an identifier.
using vkw_parser = lexical::keyword_parser<lexical::verilog_ident_char>;
inline constexpr vkw_parser kw(const char* w) { return vkw_parser(w); }

/// The keywords of IEEE 1364-2005 that cannot name a net, module or instance
/// here (the ones the structural subset uses, and the common others).
inline bool is_keyword(std::string_view w) {
  return lexical::one_of(
      w, {"module",    "endmodule",  "input",    "output",      "inout",     "wire",
          "reg",       "assign",     "and",      "nand",        "or",        "nor",
          "xor",       "xnor",       "buf",      "not",         "always",    "initial",
          "begin",     "end",        "if",       "else",        "case",      "endcase",
          "parameter", "localparam", "generate", "endgenerate", "primitive", "endprimitive",
          "table",     "endtable",   "specify",  "endspecify",  "supply0",   "supply1",
          "tri",       "integer",    "function", "task",        "bufif0",    "bufif1",
          "notif0",    "notif1",     "posedge",  "negedge",     "defparam",  "genvar",
          "for",       "while"});
}

namespace detail {
using x3::_attr;
using x3::_pass;
using x3::_val;

inline auto const set_raw = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
};
inline auto const set_ident = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
  _pass(ctx) = !is_keyword(_val(ctx).text);
};
}  // namespace detail

struct primitive_kinds : x3::symbols<> {
  primitive_kinds() { add("and")("nand")("or")("nor")("xor")("xnor")("buf")("not"); }
};
inline primitive_kinds const primitive_table;

auto const id_chars = x3::char_(lexical::ident_start_set) >>
                      *x3::char_(lexical::verilog_ident_char_set);
auto const word_end = !x3::char_(lexical::verilog_ident_char_set);

using raw_range = boost::iterator_range<const char*>;

///////////////////////////////////////////////////////////////////////////////
// Rules (the names are turned into words by describe() in verilog_grammar.cpp)
///////////////////////////////////////////////////////////////////////////////
SETTLE_X3_RULES(
    (ident_raw, raw_range, "identifier"), (ident, vast::raw, "identifier"),
    (kind_raw, raw_range, "gate kind"), (gate_kind, vast::raw, "gate kind"),
    (number, x3::unused_type, "number"), (based, x3::unused_type, "based constant"),
    (select, x3::unused_type, "select"), (range_syn, x3::unused_type, "range"),
    (range_raw, raw_range, "range"), (range_, vast::raw, "range"), (term_raw, raw_range, "term"),
    (term, vast::raw, "term"), (conn, vast::conn, "connection"),
    (mtm, x3::unused_type, "delay value"), (delay_raw, raw_range, "delay"),
    (delay, vast::raw, "delay"), (primary, x3::unused_type, "operand"),
    (unary, x3::unused_type, "operand"), (and_e, x3::unused_type, "expression"),
    (xor_e, x3::unused_type, "expression"), (or_e, x3::unused_type, "expression"),
    (cond_e, x3::unused_type, "expression"), (expr_raw, raw_range, "expression"),
    (expr, vast::raw, "expression"), (dir_word, std::string, "direction"),
    (port_item, vast::port_item, "port"), (module_hdr, vast::module_hdr, "module header"),
    (decl_kind, std::string, "declaration"), (decl_stmt, vast::decl_stmt, "declaration"),
    (assign_item, vast::assign_item, "assignment"), (assign_stmt, vast::assign_stmt, "assign"),
    (gate_inst, vast::gate_inst, "gate terminals"), (gate_stmt, vast::gate_stmt, "gate"),
    (udp_stmt, vast::gate_stmt, "gate"), (port_conn, vast::port_conn, "port connection"),
    (mod_inst, vast::mod_inst, "instance"), (inst_stmt, vast::inst_stmt, "instance"))
statement_type const statement_rule = "statement";

auto const ident_raw_def = x3::raw[x3::lexeme[id_chars]];
auto const ident_def = ident_raw[detail::set_ident];
auto const kind_raw_def = x3::raw[x3::lexeme[primitive_table >> word_end]];
auto const gate_kind_def = kind_raw[detail::set_raw];
auto const number_def = x3::lexeme[+x3::digit >> -('.' >> +x3::digit)];
auto const based_def =
    x3::lexeme[*x3::digit >> '\'' >> x3::char_("bBoOdDhH") > +x3::char_("0-9a-fA-FxXzZ_")];
auto const select_def = '[' > x3::int_ > -(':' > x3::int_) > ']';
auto const range_syn_def = '[' > x3::int_ > ':' > x3::int_ > ']';
auto const range_raw_def = x3::raw[range_syn];
auto const range__def = range_raw[detail::set_raw];
auto const term_raw_def = x3::raw[based | (ident_raw >> -select)];
auto const term_def = term_raw[detail::set_raw];
auto const conn_def = ('{' > (term % ',') > '}') | x3::repeat(1)[term];
auto const mtm_def = number >> -(':' > number > ':' > number);
auto const delay_raw_def = x3::raw['#' > (number | ('(' > (mtm % ',') > ')'))];
auto const delay_def = delay_raw[detail::set_raw];
auto const primary_def = term | ('(' > cond_e > ')') | ('{' > (term % ',') > '}');
auto const unary_def = *x3::lit('~') >> primary;
auto const and_e_def = unary >> *((x3::lit('&') >> !x3::lit('&')) > unary);
auto const xor_e_def = and_e >> *((x3::lit("~^") | x3::lit("^~") | x3::lit('^')) > and_e);
auto const or_e_def = xor_e >> *((x3::lit('|') >> !x3::lit('|')) > xor_e);
auto const cond_e_def = or_e >> -('?' > cond_e > ':' > cond_e);
auto const expr_raw_def = x3::raw[cond_e];
auto const expr_def = expr_raw[detail::set_raw];

auto const dir_word_def = x3::lexeme[(x3::string("input") | x3::string("output")) >> word_end];
auto const port_item_def = -dir_word >> x3::omit[-kw("wire")] >> -range_ >> ident;
auto const module_hdr_def = kw("module") > ident > -('(' > -(port_item % ',') > ')');
auto const decl_kind_def =
    x3::lexeme[(x3::string("input") | x3::string("output") | x3::string("wire")) >> word_end];
auto const decl_stmt_def = decl_kind >> x3::omit[-kw("wire")] >> -range_ > (ident % ',');
auto const assign_item_def = conn > '=' > expr;
auto const assign_stmt_def = kw("assign") > -delay > (assign_item % ',');
auto const gate_inst_def = -ident >> '(' > (conn % ',') > ')';
auto const gate_stmt_def = gate_kind > -delay > (gate_inst % ',');
// An instance of a user-defined primitive with a delay (without one it reads as a module instance).
auto const udp_stmt_def = ident >> &x3::lit('#') >> -delay > (gate_inst % ',');
auto const port_conn_def =
    ('.' > ident > '(' > -conn > ')') | (x3::attr(boost::optional<vast::raw>()) >> conn);
auto const mod_inst_def = ident > '(' > -(port_conn % ',') > ')';
auto const inst_stmt_def = ident >> &(x3::alpha | '_') > (mod_inst % ',');
auto const statement_rule_def =
    module_hdr | decl_stmt | assign_stmt | gate_stmt | udp_stmt | inst_stmt;

BOOST_SPIRIT_DEFINE(ident_raw, ident, kind_raw, gate_kind, number, based, select, range_syn,
                    range_raw, range_, term_raw, term, conn, mtm, delay_raw, delay, primary, unary,
                    and_e, xor_e, or_e, cond_e, expr_raw, expr, dir_word, port_item, module_hdr,
                    decl_kind, decl_stmt, assign_item, assign_stmt, gate_inst, gate_stmt, udp_stmt,
                    port_conn, mod_inst, inst_stmt, statement_rule)

}  // namespace settle::vgrammar

namespace settle::vgrammar {
inline statement_type const& statement() { return statement_rule; }
}  // namespace settle::vgrammar
