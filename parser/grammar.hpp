// Declaration of the statement rule (X3): included only by grammar.cpp and grammar_def.hpp.
#pragma once

#include <boost/spirit/home/x3.hpp>

#include "parser/ast.hpp"

namespace settle::grammar {
namespace x3 = boost::spirit::x3;

struct statement_class;
using statement_type = x3::rule<statement_class, ast::statement>;
BOOST_SPIRIT_DECLARE(statement_type)

/// The rule for one statement (without its `;` or end of line).
statement_type const& statement();

}  // namespace settle::grammar
