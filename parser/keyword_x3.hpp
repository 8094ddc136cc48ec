// The keyword parser both X3 grammars share (included only by the *_grammar_def.hpp files).
#pragma once

#include <boost/spirit/home/x3.hpp>
#include <initializer_list>
#include <string>
#include <string_view>

namespace settle::lexical {
namespace x3 = boost::spirit::x3;

/// Matches the keyword `word` as a whole word: not when a character for
/// which `WordChar` holds follows it (so `inputs` is a name, not `input`).
template <bool (*WordChar)(char)>
struct keyword_parser : x3::parser<keyword_parser<WordChar>> {
  using attribute_type = x3::unused_type;
  static bool const has_attribute = false;
  const char* word;
  constexpr explicit keyword_parser(const char* w) : word(w) {}

  template <typename It, typename Ctx, typename RCtx, typename Attr>
  bool parse(It& first, It const& last, Ctx const& ctx, RCtx&, Attr&) const {
    x3::skip_over(first, last, ctx);
    It i = first;
    for (const char* p = word; *p; ++p, ++i)
      if (i == last || *i != *p) return false;
    if (i != last && WordChar(*i)) return false;
    first = i;
    return true;
  }
};

/// True when `w` is one of `words`.
inline bool one_of(std::string_view w, std::initializer_list<const char*> words) {
  for (const char* k : words)
    if (w == k) return true;
  return false;
}

}  // namespace settle::lexical

/// What an expectation failure on a keyword names: the word in quotes.
template <bool (*WordChar)(char)>
struct boost::spirit::x3::get_info<settle::lexical::keyword_parser<WordChar>> {
  using result_type = std::string;
  std::string operator()(settle::lexical::keyword_parser<WordChar> const& p) const {
    return "'" + std::string(p.word) + "'";
  }
};
