// Declaration of the Verilog statement rule (X3): included only by
// verilog_grammar.cpp and verilog_grammar_def.hpp.
#pragma once

#include <boost/spirit/home/x3.hpp>

#include "parser/verilog_ast.hpp"

namespace settle::vgrammar {
namespace x3 = boost::spirit::x3;

struct statement_class;
using statement_type = x3::rule<statement_class, vast::statement>;
BOOST_SPIRIT_DECLARE(statement_type)

/// The rule for one statement of a module (without its `;`).
statement_type const& statement();

}  // namespace settle::vgrammar
