// The single instantiation of the statement grammar, and the parse_statement facade.
#include "parser/config.hpp"
#include "parser/error_handler.hpp"
#include "parser/grammar_def.hpp"
#include "parser/parse.hpp"

namespace settle::grammar {

BOOST_SPIRIT_INSTANTIATE(statement_type, iterator_type, context_type)

bool is_reserved_word(std::string_view w) { return is_reserved(w); }

bool parse_statement(std::string_view text, ast::statement& out, syntax_error& err) {
  iterator_type first = text.data();
  iterator_type const last = text.data() + text.size();
  try {
    bool ok = x3::phrase_parse(first, last, statement(), x3::ascii::blank, out);
    while (first != last && (*first == ' ' || *first == '\t')) ++first;
    if (ok && first == last) return true;
    err.pos = first;
    if (!ok) {
      err.message = "unknown statement";
      return false;
    }
    const char* e = first;
    while (e != last && *e != ' ' && *e != '\t') ++e;
    err.message = "unexpected '" + std::string(first, e) + "'";
    return false;
  } catch (x3::expectation_failure<iterator_type> const& f) {
    const char* w = f.where();
    while (w != last && (*w == ' ' || *w == '\t')) ++w;
    err.pos = w;
    std::string found;
    const char* e = w;
    while (e != last && *e != ' ' && *e != '\t' && *e != ',' && *e != ')' && *e != '(') ++e;
    if (e == w && e != last) ++e;
    found.assign(w, e);
    err.message = "expected " + describe(f.which());
    if (found.empty())
      err.message += " at the end of the statement";
    else if (is_reserved(found))
      err.message += ", found keyword '" + found + "'";
    else
      err.message += ", found '" + found + "'";
    return false;
  }
}

}  // namespace settle::grammar
