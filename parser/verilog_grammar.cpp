// The single instantiation of the Verilog statement grammar, and its parse facade.
#include <unordered_map>

#include "parser/verilog_grammar_def.hpp"
#include "parser/verilog_parse.hpp"

namespace settle::vgrammar {

using iterator_type = const char*;
using skipper_type = x3::ascii::space_type;
using context_type = x3::phrase_parse_context<skipper_type>::type;

BOOST_SPIRIT_INSTANTIATE(statement_type, iterator_type, context_type)

namespace {

/// Rule names and parser descriptions -> the words a diagnostic uses.
std::string describe(const std::string& which) {
  static const std::unordered_map<std::string, std::string> words = {
      {"identifier", "an identifier"},
      {"gate kind", "a gate kind"},
      {"number", "a number"},
      {"based constant", "a constant such as 1'b0"},
      {"select", "a bit-select [N] or part-select [M:L]"},
      {"range", "a range [MSB:LSB]"},
      {"term", "a net, a bit-select or a constant"},
      {"connection", "a net, a constant or a concatenation {...}"},
      {"delay value", "a delay value (D or MIN:TYP:MAX)"},
      {"delay", "a delay #D, #(D) or #(RISE, FALL)"},
      {"operand", "an operand"},
      {"expression", "an expression"},
      {"port", "a port"},
      {"declaration", "a declaration"},
      {"assignment", "an assignment NET = EXPRESSION"},
      {"gate terminals", "gate terminals (OUT, IN, ...)"},
      {"port connection", "a port connection"},
      {"instance", "an instance NAME (...)"},
      {"int_", "an integer"},
  };
  auto it = words.find(which);
  if (it != words.end()) return it->second;
  if (which.size() == 3 && which.front() == '\'' && which.back() == '\'') return which;
  return which;
}

}  // namespace

bool parse_statement(std::string_view text, vast::statement& out, syntax_error& err) {
  iterator_type first = text.data();
  iterator_type const last = text.data() + text.size();
  auto skip = [&](const char* p) {
    while (p != last && std::isspace(static_cast<unsigned char>(*p))) ++p;
    return p;
  };
  auto word_at = [&](const char* p) {
    const char* e = p;
    while (e != last &&
           (std::isalnum(static_cast<unsigned char>(*e)) || *e == '_' || *e == '$' || *e == '\''))
      ++e;
    if (e == p && e != last) ++e;
    return std::string(p, e);
  };
  try {
    bool ok = x3::phrase_parse(first, last, statement(), x3::ascii::space, out);
    first = skip(first);
    if (ok && first == last) return true;
    err.pos = first;
    if (!ok) {
      err.message = "unknown statement '" + word_at(first) + "'";
      return false;
    }
    // A whole statement parsed and text is left: the ';' before it is missing.
    err.message = "expected ';' before '" + word_at(first) + "'";
    return false;
  } catch (x3::expectation_failure<iterator_type> const& f) {
    const char* w = skip(f.where());
    err.pos = w;
    const std::string found = word_at(w);
    err.message = "expected " + describe(f.which());
    if (found.empty())
      err.message += " before ';'";
    else
      err.message += ", found '" + found + "'";
    return false;
  }
}

}  // namespace settle::vgrammar
