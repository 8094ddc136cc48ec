// How both X3 grammars declare their rules (included only by the *_grammar_def.hpp files).
#pragma once

#include <boost/preprocessor/seq/for_each.hpp>
#include <boost/preprocessor/variadic/to_seq.hpp>
#include <boost/spirit/home/x3/nonterminal/rule.hpp>

/// Declares one rule: its ID class is its name, and `description` is the
/// name a diagnostic translates into words (describe()).
#define SETTLE_X3_RULE(name, attribute, description) \
  ::boost::spirit::x3::rule<class name, attribute> const name = description;

#define SETTLE_X3_RULE_EACH(r, data, rule) SETTLE_X3_RULE rule

/// Declares the rules of a grammar from a list of `(name, attribute,
/// "description")`, as BOOST_SPIRIT_DEFINE defines them from a list of names;
/// `x3::unused_type` stands for no attribute.
#define SETTLE_X3_RULES(...) \
  BOOST_PP_SEQ_FOR_EACH(SETTLE_X3_RULE_EACH, _, BOOST_PP_VARIADIC_TO_SEQ(__VA_ARGS__))
