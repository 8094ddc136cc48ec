// The one iterator type and the one context type every X3 rule is instantiated with.
#pragma once

#include <boost/spirit/home/x3.hpp>

namespace settle::grammar {
namespace x3 = boost::spirit::x3;

using iterator_type = const char*;
using skipper_type = x3::ascii::blank_type;
using context_type = x3::phrase_parse_context<skipper_type>::type;

}  // namespace settle::grammar
