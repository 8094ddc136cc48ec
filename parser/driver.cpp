// The statement driver: splits lines into statements, tracks block/stimulus nesting, recovers per
// statement.
#include <fmt/format.h>

#include <algorithm>
#include <deque>

#include "parser/lexical.hpp"
#include "parser/lower.hpp"
#include "parser/parse.hpp"

namespace settle::ir {

reporter::reporter(std::string_view text, std::string file, diagnostics& out)
    : text_(text), file_(std::move(file)), out_(out) {
  line_start_.push_back(0);
  for (std::size_t i = 0; i < text.size(); ++i)
    if (text[i] == '\n') line_start_.push_back(static_cast<std::uint32_t>(i + 1));
}

source_loc reporter::loc_of(const char* p) const {
  if (!p || p < text_.data() || p > text_.data() + text_.size()) return {};
  auto off = static_cast<std::uint32_t>(p - text_.data());
  auto it = std::upper_bound(line_start_.begin(), line_start_.end(), off);
  auto line = static_cast<std::uint32_t>(it - line_start_.begin());
  return {line, off - line_start_[line - 1] + 1};
}

void reporter::report(diagnostic::level lv, source_loc at, const std::string& msg) {
  if (!seen_.insert(fmt::format("{}:{}:{}", at.line, at.col, msg)).second) return;
  add(make(lv, at, msg));
}

void reporter::error_with_note(source_loc at, const std::string& msg, source_loc note_at,
                               const std::string& note) {
  if (!seen_.insert(fmt::format("{}:{}:{}", at.line, at.col, msg)).second) return;
  diagnostic d = make(diagnostic::level::error, at, msg);
  d.notes.push_back(make(diagnostic::level::note, note_at, note));
  add(std::move(d));
}

diagnostic reporter::make(diagnostic::level lv, source_loc at, const std::string& msg) const {
  diagnostic d;
  d.severity = lv;
  d.file = file_;
  d.line = at.line;
  d.col = at.col;
  d.message = msg;
  if (at.line >= 1 && at.line <= line_start_.size()) {
    std::size_t b = line_start_[at.line - 1];
    std::size_t e = at.line < line_start_.size() ? line_start_[at.line] - 1 : text_.size();
    while (e > b && (text_[e - 1] == '\r' || text_[e - 1] == '\n')) --e;
    set_source_line(d, text_.substr(b, e - b));
  }
  return d;
}

void reporter::add(diagnostic d) {
  const auto lv = d.severity;
  if (holding_) {
    held_.push_back(std::move(d));
    return;
  }
  if (lv == diagnostic::level::error) ++errors_;
  out_.add(std::move(d));
}

void reporter::release() {
  for (auto& d : held_) {
    if (d.severity == diagnostic::level::error) ++errors_;
    out_.add(std::move(d));
  }
  held_.clear();
}

std::string reporter::line_text(std::uint32_t line) const {
  if (line < 1 || line > line_start_.size()) return {};
  std::size_t b = line_start_[line - 1];
  std::size_t e = line < line_start_.size() ? line_start_[line] - 1 : text_.size();
  while (e > b && (text_[e - 1] == '\r' || text_[e - 1] == '\n')) --e;
  return std::string(text_.substr(b, e - b));
}

namespace {

enum class where { top, block, stim };

/// Compiles a condition or property expression to postfix code (the encoding
/// of complex gates), its distinct nets into `reads`.
class cond_compiler {
 public:
  cond_compiler(std::vector<std::uint32_t>& code, std::vector<ref>& reads, const reporter& rep)
      : code_(code), reads_(reads), rep_(rep) {}
  void expr(const ast::cond_or& e) {
    lower_chain(e, op::or2, code_, [&](const auto& t) { xor_term(t); });
  }

 private:
  void xor_term(const ast::cond_xor& e) {
    lower_chain(e, op::xor2, code_, [&](const auto& t) { and_term(t); });
  }
  void and_term(const ast::cond_and& e) {
    lower_chain(e, op::and2, code_, [&](const auto& t) { unary(t); });
  }
  void unary(const ast::cond_unary& u) {
    if (auto a = boost::get<ast::cond_atom>(&u.operand)) {
      std::uint32_t i = 0;
      while (i < reads_.size() && reads_[i].name != a->net.text) ++i;
      if (i == reads_.size()) reads_.push_back(lower_ref(a->net, rep_));
      code_.push_back(encode(op::input, i));
      if (a->eq && *a->eq == '0') code_.push_back(encode(op::inv));
    } else if (auto c = boost::get<char>(&u.operand)) {
      code_.push_back(encode(*c == '1' ? op::const1 : op::const0));
    } else {
      expr(boost::get<boost::spirit::x3::forward_ast<ast::cond_or>>(u.operand).get());
    }
    if (u.nots.size() % 2) code_.push_back(encode(op::inv));
  }

  std::vector<std::uint32_t>& code_;
  std::vector<ref>& reads_;
  const reporter& rep_;
};

/// The text of a condition as written: from `from` to the end of its last name,
/// digit or parenthesis before `stop` (or the end of `text`).
std::string span_text(std::string_view text, const char* from, const char* stop) {
  const char* end = stop ? stop : text.data() + text.size();
  while (end > from && (end[-1] == ' ' || end[-1] == '\t')) --end;
  return std::string(from, static_cast<std::size_t>(end - from));
}

/// Lowers each parsed statement into the file, checking it is allowed where it stands.
struct visitor {
  using result_type = void;
  file& f;
  reporter& rep;
  file_mode mode;
  where& at;
  scope_def*& scope;            // the open block, or &f.top
  stim_block*& stim;            // the open stimulus block
  std::deque<scope_def>& dead;  // statements of rejected blocks land here
  const char* start;            // the statement's first character
  std::string_view text;        // the statement as written

  source_loc loc() const { return rep.loc_of(start); }
  stim_stmt make(stim_stmt::kind k) const {
    stim_stmt s;
    s.what = k;
    s.text = std::string(text);
    s.loc = loc();
    return s;
  }

  bool design_only(const char* what) {
    if (mode == file_mode::stimulus_only && at == where::top) {
      rep.error(loc(), "a stimulus file holds one stimulus { } block and nothing else");
      return false;
    }
    if (at == where::stim) {
      rep.error(loc(), fmt::format("{} not allowed inside stimulus {{ }}", what));
      return false;
    }
    return true;
  }
  bool stim_only(const std::string& kw) {
    if (at == where::stim) return true;
    rep.error(loc(), fmt::format("'{}' is only allowed inside stimulus {{ }}", kw));
    return false;
  }
  // Quoted names name nets at top level and in gates; a block's wires, ports
  // and inits and an instance's bindings take plain names.
  bool unquoted(const ast::name& n) {
    if (!n.quoted || at == where::top) return true;
    rep.error(
        rep.loc_of(n.pos),
        "a quoted name can only refer to a net at top level, in a gate or inside stimulus { }");
    return false;
  }
  bool plain(const ast::name& n) {
    if (!unquoted(n)) return false;
    if (n.quoted || n.text.find('.') == std::string::npos) return true;
    rep.error(rep.loc_of(n.pos), fmt::format("'{}': declared names cannot contain '.'", n.text));
    return false;
  }

  void operator()(const ast::gate_stmt& g) {
    if (!design_only("gates are")) return;
    if (is_element(g)) {
      lower_element(g, *scope, rep);
      return;
    }
    gate out;
    if (lower_gate(g, out, *scope, rep)) scope->gates.push_back(std::move(out));
  }
  void operator()(const ast::decl& d) {
    if (d.keyword == "watch") {
      if (!stim_only(d.keyword)) return;
      stim_stmt s = make(stim_stmt::kind::watch);
      for (auto& n : d.names) s.nets.push_back(lower_ref(n, rep));
      stim->stmts.push_back(std::move(s));
      return;
    }
    if (!design_only(fmt::format("'{}' is", d.keyword).c_str())) return;
    if (at == where::block && d.keyword != "wire") {
      rep.error(
          loc(),
          fmt::format("'{}' is not allowed inside a block; blocks declare ports in their header",
                      d.keyword));
      return;
    }
    auto& list = d.keyword == "input"    ? f.top.ins
                 : d.keyword == "output" ? f.top.outs
                                         : scope->wires;
    for (auto& n : d.names)
      if (plain(n)) list.push_back(lower_ref(n, rep));
  }
  void operator()(const ast::default_stmt& d) {
    if (!design_only("'default' is")) return;
    gate_delay gd;
    if (!lower_delay(d.delay, d.transport, gd, rep)) return;
    if (scope->default_delay) {
      rep.error(loc(), "a default delay is already set in this scope");
      return;
    }
    scope->default_delay = gd;
  }
  void operator()(const ast::block_head& b) {
    dead.emplace_back();
    scope_def* target = &dead.back();
    if (!design_only("'block' is")) {
    } else if (at == where::block) {
      rep.error(loc(), fmt::format("blocks cannot be nested; define '{}' at top level", b.id.text));
    } else {
      f.blocks.emplace_back();
      target = &f.blocks.back();
    }
    target->id = lower_ref(b.id, rep);
    for (auto& g : b.groups)
      for (auto& n : g.names)
        (g.dir == "in" ? target->ins : target->outs).push_back(lower_ref(n, rep));
    at = where::block;
    scope = target;
  }
  void operator()(const ast::inst_stmt& i) {
    if (!design_only("'inst' is")) return;
    inst out{lower_ref(i.id, rep), lower_ref(i.block, rep), {}};
    for (auto& b : i.binds) {
      const auto parts = static_cast<std::uint32_t>(b.targets.size());
      for (std::uint32_t k = 0; k < parts; ++k)
        if (unquoted(b.targets[k]))
          out.binds.push_back(
              {lower_ref(b.port, rep), lower_ref(b.targets[k], rep), k, parts > 1 ? parts : 0});
    }
    scope->insts.push_back(std::move(out));
  }
  void operator()(const ast::init_stmt& i) {
    if (!design_only("'init' is")) return;
    for (auto& a : i.assigns) {
      if ((at == where::block && !plain(a.net)) || !unquoted(a.net)) continue;
      scope->inits.push_back({lower_ref(a.net, rep), lower_value(a.value)});
    }
  }
  void operator()(const ast::timed_stmt& t) {
    if (!stim_only(t.keyword)) return;
    stim_stmt s = make(t.keyword == "at" ? stim_stmt::kind::at : stim_stmt::kind::after);
    if (!lower_time(t.time, s.time, rep)) return;
    s.has_time = true;
    s.time_loc = rep.loc_of(t.time.pos);
    for (auto& a : t.assigns)
      s.nets.push_back(lower_ref(a.net, rep)), s.values.push_back(lower_value(a.value));
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::clock_stmt& c) {
    if (!stim_only("clock")) return;
    stim_stmt s = make(stim_stmt::kind::clock);
    s.nets.push_back(lower_ref(c.net, rep));
    if (!lower_time(c.period, s.time, rep)) return;
    if (s.time == 0)
      return rep.error(rep.loc_of(c.period.pos), "a clock period must be greater than zero");
    s.time_loc = s.time2_loc = rep.loc_of(c.period.pos);
    if (c.high) {
      if (!lower_time(*c.high, s.time2, rep)) return;
      if (s.time2 == 0 || s.time2 >= s.time)
        return rep.error(rep.loc_of(c.high->pos),
                         "a clock's high time must be greater than zero and shorter "
                         "than its period");
      s.has_time2 = true;
      s.time2_loc = rep.loc_of(c.high->pos);
    }
    s.cycles = c.cycles.value_or(0ULL);
    if (c.at) {
      if (!lower_time(*c.at, s.at, rep)) return;
      s.has_at = true;
      s.at_loc = rep.loc_of(c.at->pos);
    }
    stim->stmts.push_back(std::move(s));
  }
  // Finds a keyword (a whole word) in the statement after `from`; null if absent.
  const char* find_word(const char* from, std::string_view w) const {
    const char* end = text.data() + text.size();
    for (const char* p = from; p + w.size() <= end; ++p) {
      if (std::string_view(p, w.size()) != w) continue;
      const bool left = p == text.data() || !lexical::ident_char(p[-1]);
      const bool right = p + w.size() == end || !lexical::ident_char(p[w.size()]);
      if (left && right) return p;
    }
    return nullptr;
  }
  void operator()(const ast::when_stmt& w) {
    if (!stim_only("when")) return;
    stim_stmt s = make(stim_stmt::kind::when);
    cond_compiler(s.code, s.reads, rep).expr(w.cond);
    // The condition runs from after `when` to `after` or ':'.
    const char* cb = text.data() + 4;
    while (*cb == ' ' || *cb == '\t') ++cb;
    const char* colon = std::find(text.data(), text.data() + text.size(), ':');
    const char* after = find_word(cb, "after");
    s.expr_text = span_text(text, cb, after && after < colon ? after : colon);
    if (w.delay) {
      gate_delay gd;
      if (!lower_delay({*w.delay}, false, gd, rep)) return;
      s.range = gd.rise;
      s.has_time = true;
    }
    for (auto& a : w.assigns)
      s.nets.push_back(lower_ref(a.net, rep)), s.values.push_back(lower_value(a.value));
    if (w.times) {
      const auto at = rep.loc_of(w.times->pos);
      std::uint64_t n = 0;
      bool big = false;
      for (char c : w.times->text) {
        if (n > (UINT64_MAX - 9) / 10) big = true;
        n = n * 10 + static_cast<std::uint64_t>(c - '0');
      }
      if (big) return rep.error(at, "'times' takes a count below 2^64");
      if (n == 0)
        return rep.error(
            at, "'times 0' would never fire; give a count of at least 1 or leave 'times' out");
      s.count = n;
      // The rule's text is written without its `times N`.
      s.text = span_text(text, text.data(), find_word(colon, "times"));
    }
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::property_stmt& p) {
    if (!stim_only(p.keyword)) return;
    stim_stmt s = make(stim_stmt::kind::property);
    s.word = p.keyword;
    if (p.edge) {
      if (p.keyword == "always")
        return rep.error(rep.loc_of(p.edge->net.pos),
                         "'always' takes an expression; write 'never NET rises while "
                         "EXPR' for an edge");
      s.word = p.edge->edge;
      s.nets.push_back(lower_ref(p.edge->net, rep));
    }
    cond_compiler(s.code, s.reads, rep).expr(p.expr);
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::gauge_stmt& g) {
    if (!stim_only("gauge")) return;
    stim_stmt s = make(stim_stmt::kind::gauge);
    s.name = lower_ref(g.id, rep);
    if (auto p = boost::get<ast::gauge_period>(&g.body)) {
      s.word = "period";
      s.nets.push_back(lower_ref(p->net, rep));
    } else if (auto u = boost::get<ast::gauge_pulse>(&g.body)) {
      s.word = u->level == "high" ? "pulse_high" : "pulse_low";
      s.nets.push_back(lower_ref(u->net, rep));
    } else {
      auto& l = boost::get<ast::gauge_latency>(g.body);
      s.word = "latency";
      s.nets.push_back(lower_ref(l.from, rep));
      s.nets.push_back(lower_ref(l.to, rep));
      s.from_rises = l.from_edge == "rises";
      s.to_rises = l.to_edge == "rises";
    }
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::settle_stmt& st) {
    if (!stim_only(st.keyword)) return;
    stim_stmt s = make(stim_stmt::kind::settle);
    if (st.within) {
      if (!lower_time(*st.within, s.time, rep)) return;
      s.has_time = true;
    }
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::run_stmt& r) {
    if (!stim_only(r.keyword)) return;
    stim_stmt s = make(stim_stmt::kind::run);
    if (!lower_time(r.time, s.time, rep)) return;
    s.has_time = true;
    s.time_loc = rep.loc_of(r.time.pos);
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::expect_stmt& e) {
    if (!stim_only(e.keyword)) return;
    stim_stmt s = make(stim_stmt::kind::expect_value);
    if (auto v = boost::get<std::vector<ast::assign>>(&e.body)) {
      s.what = stim_stmt::kind::expect_value;
      for (auto& a : *v)
        s.nets.push_back(lower_ref(a.net, rep)), s.values.push_back(lower_value(a.value));
    } else if (auto w = boost::get<ast::expect_within>(&e.body)) {
      s.what = stim_stmt::kind::expect_within;
      if (!lower_time(w->time, s.time, rep)) return;
      s.has_time = true;
    } else if (auto rs = boost::get<ast::expect_resolves>(&e.body)) {
      s.what = stim_stmt::kind::expect_resolves;
      s.nets.push_back(lower_ref(rs->net, rep));
      if (!lower_time(rs->time, s.time, rep)) return;
      s.has_time = true;
    } else if (auto g = boost::get<ast::expect_glitch>(&e.body)) {
      s.what = stim_stmt::kind::expect_no_glitch;
      for (auto& n : g->nets) s.nets.push_back(lower_ref(n, rep));
    } else if (auto gg = boost::get<ast::expect_gauge>(&e.body)) {
      s.what = stim_stmt::kind::expect_gauge;
      s.name = lower_ref(gg->gauge, rep);
      auto& r = gg->within;
      if (r.c || !r.b) return rep.error(rep.loc_of(r.a.pos), "a gauge's range is written A..B");
      if (!lower_time(r.a, s.range.min, rep) || !lower_time(*r.b, s.range.max, rep)) return;
      if (s.range.max < s.range.min)
        return rep.error(rep.loc_of(r.a.pos), "a gauge's range needs A <= B");
    } else {
      auto& word = boost::get<ast::expect_word>(e.body);
      s.what = word.word == "stable"          ? stim_stmt::kind::expect_stable
               : word.word == "deterministic" ? stim_stmt::kind::expect_deterministic
                                              : stim_stmt::kind::expect_oscillating;
      if (word.period) {
        auto& r = *word.period;
        if (s.what != stim_stmt::kind::expect_oscillating)
          return rep.error(rep.loc_of(r.a.pos),
                           fmt::format("'period' only follows 'oscillating', not '{}'", word.word));
        if (r.c)
          return rep.error(rep.loc_of(r.a.pos), "an oscillation period range is written A..B");
        if (!lower_time(r.a, s.time, rep)) return;
        s.time2 = s.time;
        if (r.b && !lower_time(*r.b, s.time2, rep)) return;
        if (s.time2 < s.time)
          return rep.error(rep.loc_of(r.a.pos), "an oscillation period range needs A <= B");
        s.has_time = s.has_time2 = true;
      }
    }
    stim->stmts.push_back(std::move(s));
  }
  void operator()(const ast::import_stmt& i) {
    if (!design_only("'import' is")) return;
    if (at == where::block)
      return rep.error(loc(), "'import' belongs at top level, not inside a block");
    // The location is the opening quote's.
    f.imports.push_back({i.path.text, rep.loc_of(i.path.pos - 1)});
  }
};

bool blank(char c) { return c == ' ' || c == '\t' || c == '\r'; }

/// True for `NAME[.NAME...] = ...` whose first word is not a keyword: only a
/// gate statement can parse from it (every other statement starts with a
/// keyword). A piece ending in '{' is left to the full driver, which opens a
/// block for a broken header.
bool looks_like_gate(std::string_view piece) {
  std::size_t i = 0;
  const std::size_t n = piece.size();
  if (n > 2 && piece[0] == '"' && piece.back() != '{') {  // a quoted net: "22" = nand(...)
    i = piece.find('"', 1);
    if (i == std::string_view::npos || i == 1) return false;
    for (++i; i < n && blank(piece[i]);) ++i;
    return i < n && piece[i] == '=';
  }
  if (n == 0 || piece.back() == '{' || !lexical::ident_start(piece[0])) return false;
  while (i < n && lexical::ident_char(piece[i])) ++i;
  if (grammar::is_reserved_word(piece.substr(0, i))) return false;
  while (i < n && piece[i] == '.' && i + 1 < n && lexical::ident_start(piece[i + 1])) {
    ++i;
    while (i < n && lexical::ident_char(piece[i])) ++i;
  }
  while (i < n && blank(piece[i])) ++i;
  if (i == n || piece[i] != '=') return false;
  // A metastable element goes through the visitor, which lowers its gates together.
  for (++i; i < n && blank(piece[i]);) ++i;
  if (i == n || (piece[i] != 'm' && piece[i] != 's')) return true;  // the common case, at once
  std::size_t e = i;
  while (e < n && lexical::ident_char(piece[e])) ++e;
  const auto kind = piece.substr(i, e - i);
  return kind != "mutex" && kind != "syncff";
}

/// Calls `each(piece)` for every statement of `text`, in order: each line up
/// to its '#' comment, cut at ';' outside parentheses (a block header has ';'
/// between its port groups), blanks trimmed, empty pieces skipped. A piece
/// views the text.
template <typename Each>
void split_statements(std::string_view text, Each&& each) {
  const char* p = text.data();
  const char* const end = text.data() + text.size();
  while (p < end) {
    const char* eol = std::find(p, end, '\n');
    const char* stop = std::find(p, eol, '#');
    const char* b = p;
    int depth = 0;
    for (const char* q = p;; ++q) {
      if (q < stop && *q == '(') ++depth;
      if (q < stop && *q == ')') --depth;
      if (q < stop && !(*q == ';' && depth <= 0)) continue;
      const char* s = b;
      const char* e = q;
      b = q + 1;
      while (s < e && blank(*s)) ++s;
      while (e > s && blank(e[-1])) --e;
      if (s < e) each(std::string_view(s, static_cast<std::size_t>(e - s)));
      if (q >= stop) break;
    }
    p = eol + 1;
  }
}

/// An upper bound of the nets a gate statement reads.
std::size_t reads_bound(std::string_view piece) {
  std::size_t k = 1;
  for (char c : piece) k += c == ',' || c == '&' || c == '|' || c == '^';
  return k;
}

/// True when the expression nesting is within the limit; otherwise reports it.
bool depth_ok(std::string_view s, reporter& rep) {
  int depth = 0;
  for (const char& c : s) {
    if (c == '(' && ++depth > max_expr_depth) {
      rep.error(rep.loc_of(&c),
                fmt::format("expression nested deeper than {} levels", max_expr_depth));
      return false;
    }
    if (c == ')') --depth;
  }
  return true;
}

}  // namespace

void parse_file(std::string_view text, file_mode mode, file& f, reporter& rep) {
  if (text.size() >= UINT32_MAX) {
    rep.error({}, "the file is too large (4 GB or more)");
    return;
  }
  f.text = text;
  where at = where::top;
  scope_def* scope = &f.top;
  stim_block spare;  // a second stimulus block is parsed here and dropped
  stim_block* stim = &f.stim;
  std::deque<scope_def> dead;  // blocks in the wrong place are parsed here and dropped
  source_loc open_loc;
  std::string open_name;

  ast::statement st;
  split_statements(text, [&](std::string_view piece) {
    const char* const s = piece.data();
    const auto here = rep.loc_of(s);
    if (piece == "}") {
      if (at == where::top) {
        rep.error(here, "'}' without an open block or stimulus");
      } else {
        if (at == where::stim) stim->close_loc = here;
        at = where::top;
        scope = &f.top;
        stim = &f.stim;
      }
    } else if (piece.substr(0, 8) == "stimulus" &&
               (piece.size() == 8 || blank(piece[8]) || piece[8] == '{')) {
      auto rest = piece.substr(8);
      while (!rest.empty() && blank(rest.front())) rest.remove_prefix(1);
      if (rest != "{") {
        rep.error(rest.empty() ? rep.loc_of(s + 8) : rep.loc_of(rest.data()),
                  "expected '{' after 'stimulus'");
      } else if (at != where::top) {
        rep.error(here, "a stimulus block belongs at top level");
      } else {
        if (f.stim.present) {
          rep.error(here, "only one stimulus block is allowed");
          stim = &spare;
        }
        stim->present = true;
        stim->loc = here;
        at = where::stim;
        open_loc = here;
      }
    } else if (mode == file_mode::stimulus_only && at == where::top) {
      rep.error(here, "a stimulus file holds one stimulus { } block and nothing else");
    } else if (at == where::top && looks_like_gate(piece)) {
      f.top_gates.push_back(
          {static_cast<std::uint32_t>(s - text.data()), static_cast<std::uint32_t>(piece.size())});
      f.top_reads += reads_bound(piece);
    } else if (depth_ok(piece, rep)) {
      grammar::syntax_error err;
      st = ast::statement{};
      if (grammar::parse_statement(piece, st, err)) {
        visitor v{f, rep, mode, at, scope, stim, dead, s, piece};
        boost::apply_visitor(v, st);
        if (boost::get<ast::block_head>(&st))
          open_loc = here, open_name = std::string(scope->id.name);
      } else {
        rep.error(rep.loc_of(err.pos), err.message);
        // A broken block header still opens a block, so its '}' is not reported again.
        if (piece.back() == '{' && at == where::top) {
          dead.emplace_back();
          scope = &dead.back();
          at = where::block;
          open_loc = here;
          open_name.clear();
        }
      }
    }
  });
  if (at == where::block)
    rep.error(open_loc, open_name.empty()
                            ? std::string("block is not closed with '}'")
                            : fmt::format("block '{}' is not closed with '}}'", open_name));
  if (at == where::stim) rep.error(open_loc, "stimulus block is not closed with '}'");
}

}  // namespace settle::ir

namespace settle::ir {

void for_each_statement(std::string_view text, const std::function<void(std::string_view)>& each) {
  split_statements(text, each);
}

bool parse_top_gate(const file& f, piece p, gate& out, scope_def& pools, reporter& rep) {
  const std::string_view text = f.text.substr(p.begin, p.size);
  return lower_simple_gate(text, rep.loc_of(text.data()), out, pools) ||
         parse_gate_by_grammar(text, out, pools, rep);
}

bool parse_gate_by_grammar(std::string_view text, gate& out, scope_def& pools, reporter& rep) {
  if (!depth_ok(text, rep)) return false;
  ast::statement st;
  grammar::syntax_error err;
  if (!grammar::parse_statement(text, st, err)) {
    rep.error(rep.loc_of(err.pos), err.message);
    return false;
  }
  auto* g = boost::get<ast::gate_stmt>(&st);
  if (!g) {
    rep.error(rep.loc_of(text.data()), "unknown statement");
    return false;
  }
  return lower_gate(*g, out, pools, rep);
}

void check_top_gates(const file& f, reporter& rep) {
  scope_def pools;
  for (auto p : f.top_gates) {
    gate g;
    pools.read_pool.clear();
    pools.code_pool.clear();
    pools.arc_pool.clear();
    parse_top_gate(f, p, g, pools, rep);
  }
}

}  // namespace settle::ir
