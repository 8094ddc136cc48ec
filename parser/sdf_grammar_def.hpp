// The SDF list grammar (Boost.Spirit X3) and its DEFINE. An SDF file (IEEE
// 1497-2001) is a tree of parenthesised lists; this grammar reads the tree,
// and parser/sdf.cpp reads its meaning, so a misplaced keyword is reported
// in words of the construct rather than as a failed alternative.
#pragma once

#include <boost/spirit/home/x3.hpp>

#include "parser/rule_x3.hpp"
#include "parser/sdf_grammar.hpp"

namespace settle::sdfgrammar {
namespace x3 = boost::spirit::x3;

namespace detail {
using x3::_attr;
using x3::_val;

inline auto const set_atom = [](auto& ctx) {
  auto& r = _attr(ctx);
  _val(ctx).text.assign(r.begin(), r.end());
  _val(ctx).pos = &*r.begin();
};
inline auto const set_string = [](auto& ctx) {
  auto& r = _attr(ctx);
  // r spans the quotes
  _val(ctx).text.assign(r.begin() + 1, r.end() - 1);
  _val(ctx).pos = &*r.begin();
  _val(ctx).quoted = true;
};
inline auto const open_list = [](auto& ctx) {
  _val(ctx).is_list = true;
  _val(ctx).pos = &*_attr(ctx).begin();
};
inline auto const add_kid = [](auto& ctx) { _val(ctx).kids.push_back(std::move(_attr(ctx))); };
inline auto const take = [](auto& ctx) { _val(ctx) = std::move(_attr(ctx)); };
}  // namespace detail

using raw_range = boost::iterator_range<const char*>;

/// An atom's bytes: anything but white space, parentheses and quotes; a
/// backslash escapes the next byte (IEEE 1497 escaped identifiers).
auto const atom_chars = +(('\\' >> x3::char_) | (x3::char_ - x3::space - '(' - ')' - '"' - '\\'));

///////////////////////////////////////////////////////////////////////////////
// Rules (the names are turned into words by describe() in sdf_grammar.cpp)
///////////////////////////////////////////////////////////////////////////////
SETTLE_X3_RULES((atom_raw, raw_range, "atom"), (string_raw, raw_range, "string"),
                (atom, node, "atom"), (open_raw, raw_range, "'('"), (list, node, "list"),
                (item, node, "item"))
file_type const file_rule = "file";
skipper_type const skipper_rule = "skipper";

auto const skipper_rule_def = x3::space | x3::lexeme["//" >> *(x3::char_ - x3::eol)] |
                              x3::lexeme["/*" > *(x3::char_ - "*/") > "*/"];
auto const atom_raw_def = x3::raw[x3::lexeme[atom_chars]];
auto const string_raw_def = x3::raw[x3::lexeme['"' > *(x3::char_ - '"' - x3::eol) > '"']];
auto const atom_def = string_raw[detail::set_string] | atom_raw[detail::set_atom];
auto const open_raw_def = x3::raw[x3::lit('(')];
auto const list_def = open_raw[detail::open_list] > *(item[detail::add_kid]) > ')';
auto const item_def = list[detail::take] | atom[detail::take];
auto const file_rule_def = list[detail::take];

BOOST_SPIRIT_DEFINE(atom_raw, string_raw, atom, open_raw, list, item, file_rule, skipper_rule)

inline file_type const& file() { return file_rule; }
inline skipper_type const& skipper() { return skipper_rule; }

}  // namespace settle::sdfgrammar
