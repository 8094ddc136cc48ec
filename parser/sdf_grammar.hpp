// Declaration of the SDF list rule (X3): included only by sdf_grammar.cpp and sdf_grammar_def.hpp.
#pragma once

#include <boost/spirit/home/x3.hpp>

#include "parser/sdf_parse.hpp"

namespace settle::sdfgrammar {
namespace x3 = boost::spirit::x3;

struct file_class;
using file_type = x3::rule<file_class, node>;
BOOST_SPIRIT_DECLARE(file_type)

/// The rule for a whole SDF file: one list.
file_type const& file();

/// The skipper: white space and comments.
struct skipper_class;
using skipper_type = x3::rule<skipper_class, x3::unused_type>;
BOOST_SPIRIT_DECLARE(skipper_type)
skipper_type const& skipper();

}  // namespace settle::sdfgrammar
