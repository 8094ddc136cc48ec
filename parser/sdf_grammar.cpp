// The single instantiation of the SDF list grammar, and its parse facade.
#include "parser/sdf_grammar_def.hpp"

namespace settle::sdfgrammar {

using iterator_type = const char*;
using context_type = x3::phrase_parse_context<skipper_type>::type;

BOOST_SPIRIT_INSTANTIATE(file_type, iterator_type, context_type)

namespace {

/// Skips white space and comments from p (an unclosed comment stops there).
const char* skip(const char* p, const char* last) {
  for (;;) {
    while (p != last && std::isspace(static_cast<unsigned char>(*p))) ++p;
    if (last - p >= 2 && p[0] == '/' && p[1] == '/') {
      while (p != last && *p != '\n') ++p;
    } else if (last - p >= 2 && p[0] == '/' && p[1] == '*') {
      const char* q = p + 2;
      while (last - q >= 2 && !(q[0] == '*' && q[1] == '/')) ++q;
      if (last - q < 2) return p;
      p = q + 2;
    } else {
      return p;
    }
  }
}

std::string found_at(const char* p, const char* last) {
  if (p == last) return "the end of the file";
  if (*p == '(' || *p == ')' || *p == '"') return std::string("'") + *p + "'";
  const char* e = p;
  while (e != last && !std::isspace(static_cast<unsigned char>(*e)) && *e != '(' && *e != ')' &&
         e - p < 40)
    ++e;
  return "'" + std::string(p, e) + "'";
}

/// The innermost '(' left open at the end of the text (strings and comments skipped).
const char* innermost_open(std::string_view text) {
  std::vector<const char*> open;
  const char* last = text.data() + text.size();
  for (const char* p = text.data(); p != last;) {
    const char* q = skip(p, last);
    if (q != p) {
      p = q;
      continue;
    }
    if (*p == '"') {
      ++p;
      while (p != last && *p != '"' && *p != '\n') ++p;
      if (p != last) ++p;
      continue;
    }
    if (*p == '\\') {
      p += last - p >= 2 ? 2 : 1;
      continue;
    }
    if (*p == '(') open.push_back(p);
    if (*p == ')' && !open.empty()) open.pop_back();
    ++p;
  }
  return open.empty() ? last : open.back();
}

}  // namespace

bool parse_tree(std::string_view text, node& out, syntax_error& err) {
  iterator_type first = text.data();
  iterator_type const last = text.data() + text.size();
  try {
    first = skip(first, last);
    if (first != last && *first != '(') {
      err.pos = first;
      err.message = "expected '(DELAYFILE', found " + found_at(first, last);
      return false;
    }
    bool ok = x3::phrase_parse(first, last, file(), skipper(), out);
    first = skip(first, last);
    if (!ok) {
      err.pos = first;
      if (first != last && last - first >= 2 && first[0] == '/' && first[1] == '*')
        err.message = "unterminated comment";
      else
        err.message = "expected '(DELAYFILE', found " + found_at(first, last);
      return false;
    }
    if (first != last) {
      err.pos = first;
      err.message = "text after the end of the DELAYFILE list: " + found_at(first, last);
      return false;
    }
    return true;
  } catch (x3::expectation_failure<iterator_type> const& f) {
    const char* w = f.where();
    const std::string which = f.which();
    if (which == "'\"'") {
      // an unterminated string: point at its opening quote
      const char* q = w;
      while (q != text.data() && *q != '"') --q;
      err.pos = q;
      err.message = "unterminated string";
      return false;
    }
    if (which == "\"*/\"" || which == "'*/'") {
      err.message = "unterminated comment";
      const char* q = w;
      while (q > text.data() + 1 && !(q[-1] == '/' && q[0] == '*')) --q;
      err.pos = q > text.data() ? q - 1 : q;
      return false;
    }
    w = skip(w, last);
    err.pos = w;
    if (w == last) {
      err.pos = innermost_open(text);
      err.message = "this list is not closed: expected ')' before the end of the file";
    } else
      err.message = "expected ')', found " + found_at(w, last);
    return false;
  }
}

}  // namespace settle::sdfgrammar
