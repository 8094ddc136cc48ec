// Lowering gates and delays: kind and arity checks, postfix programs, exact delay ranges.
#include "parser/lower.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <unordered_map>

#include "parser/lexical.hpp"
#include "parser/parse.hpp"
#include "sim/model/time.hpp"
#include "sim/model/time_parse.hpp"

namespace settle::ir {
namespace {

struct kind_entry {
  const char* word;
  gate_kind kind;
};
constexpr kind_entry kinds[] = {
    {"not", gate_kind::inv},  {"buf", gate_kind::buf},   {"and", gate_kind::and_},
    {"or", gate_kind::or_},   {"nand", gate_kind::nand}, {"nor", gate_kind::nor},
    {"xor", gate_kind::xor_}, {"xnor", gate_kind::xnor}, {"mux", gate_kind::mux},
    {"maj", gate_kind::maj},  {"c", gate_kind::celem},   {"gc", gate_kind::gc},
};

/// What a primitive of kind `k` with `n` inputs lacks ("exactly 1 input"), or null when n is right.
const char* arity_problem(gate_kind k, std::size_t n) {
  switch (k) {
    case gate_kind::inv:
    case gate_kind::buf:
      return n != 1 ? "exactly 1 input" : nullptr;
    case gate_kind::mux:
      return n != 3 ? "exactly 3 inputs (sel, a0, a1)" : nullptr;
    case gate_kind::maj:
      return n < 3 || n % 2 == 0 ? "an odd number of inputs, at least 3" : nullptr;
    default:
      return n < 1 ? "at least 1 input" : nullptr;
  }
}

bool is_blank(char c) { return c == ' ' || c == '\t'; }

/// Finds the position of the first name in an expression (for diagnostics).
const char* first_pos(const ast::or_expr& e);
const char* first_pos(const ast::primary& p) {
  if (auto n = boost::get<ast::name>(&p)) return n->pos;
  if (auto f = boost::get<boost::spirit::x3::forward_ast<ast::or_expr>>(&p))
    return first_pos(f->get());
  return nullptr;
}
const char* first_pos(const ast::or_expr& e) {
  for (auto& x : e)
    for (auto& a : x)
      for (auto& u : a)
        if (auto p = first_pos(u.operand)) return p;
  return nullptr;
}

/// Compiles an expression to postfix code, collecting the distinct nets it reads.
class compiler {
 public:
  compiler(std::vector<ref>& reads, std::vector<std::uint32_t>& code, const reporter& rep)
      : reads_(reads), code_(code), rep_(rep), base_(reads.size()) {}

  void expr(const ast::or_expr& e) {
    lower_chain(e, op::or2, code_, [&](const auto& t) { xor_term(t); });
  }

 private:
  void xor_term(const ast::xor_expr& e) {
    lower_chain(e, op::xor2, code_, [&](const auto& t) { and_term(t); });
  }
  void and_term(const ast::and_expr& e) {
    lower_chain(e, op::and2, code_, [&](const auto& t) { unary(t); });
  }
  void unary(const ast::unary& u) {
    if (auto n = boost::get<ast::name>(&u.operand)) {
      code_.push_back(encode(op::input, index_of(*n)));
    } else if (auto c = boost::get<char>(&u.operand)) {
      code_.push_back(encode(*c == '1' ? op::const1 : op::const0));
    } else {
      expr(boost::get<boost::spirit::x3::forward_ast<ast::or_expr>>(u.operand).get());
    }
    if (u.nots.size() % 2) code_.push_back(encode(op::inv));
  }
  std::uint32_t index_of(const ast::name& n) {
    auto [it, fresh] = index_.emplace(n.text, static_cast<std::uint32_t>(reads_.size() - base_));
    if (fresh) reads_.push_back(lower_ref(n, rep_));
    return it->second;
  }

  std::vector<ref>& reads_;
  std::vector<std::uint32_t>& code_;
  const reporter& rep_;
  std::size_t base_;
  std::unordered_map<std::string, std::uint32_t> index_;
};

/// The single net or constant an argument must be for a primitive gate.
bool simple_arg(const ast::arg& a, ref& out, const reporter& rep) {
  if (a.label || a.value.size() != 1 || a.value[0].size() != 1 || a.value[0][0].size() != 1)
    return false;
  const auto& u = a.value[0][0][0];
  if (!u.nots.empty()) return false;
  if (auto n = boost::get<ast::name>(&u.operand)) {
    out = lower_ref(*n, rep);
    return true;
  }
  if (auto c = boost::get<char>(&u.operand)) {
    out = ref{*c == '1' ? std::string_view("1") : std::string_view("0"), {}};
    return true;
  }
  return false;
}

/// Appends the arguments of `c` to `out`, each a net or a constant; false
/// (after reporting the first that is not) otherwise.
bool simple_args(const ast::call& c, std::vector<ref>& out, reporter& rep) {
  for (auto& a : c.args) {
    ref r;
    if (!simple_arg(a, r, rep)) {
      const char* p = a.label ? a.label->pos : first_pos(a.value);
      rep.error(
          p ? rep.loc_of(p) : rep.loc_of(c.kind.pos),
          fmt::format("arguments of '{}' must be nets or the constants 0 and 1", c.kind.text));
      return false;
    }
    out.push_back(std::move(r));
  }
  return true;
}

bool lower_call(const ast::call& c, gate& out, scope_def& pools, reporter& rep) {
  const auto at = rep.loc_of(c.kind.pos);
  auto k = std::find_if(std::begin(kinds), std::end(kinds),
                        [&](auto& e) { return c.kind.text == e.word; });
  if (k == std::end(kinds)) {
    rep.error(at, fmt::format("unknown gate kind '{}'", c.kind.text));
    return false;
  }
  out.kind = k->kind;
  const auto n = c.args.size();
  if (out.kind == gate_kind::gc) {
    const ast::arg* set = nullptr;
    const ast::arg* reset = nullptr;
    bool bad = false;
    for (auto& a : c.args) {
      if (a.label && a.label->text == "set" && !set)
        set = &a;
      else if (a.label && a.label->text == "reset" && !reset)
        reset = &a;
      else
        bad = true;
    }
    if (bad || !set || !reset) {
      rep.error(at, "'gc' takes exactly two arguments, set: EXPR and reset: EXPR");
      return false;
    }
    compiler comp(pools.read_pool, pools.code_pool, rep);
    comp.expr(set->value);
    comp.expr(reset->value);
    return true;
  }
  if (!simple_args(c, pools.read_pool, rep)) return false;
  const char* want = arity_problem(out.kind, n);
  if (want) {
    rep.error(at, fmt::format("'{}' takes {}, found {}", c.kind.text, want, n));
    return false;
  }
  return true;
}

bool lower_range(const ast::range& r, delay_range& out, reporter& rep) {
  time_fs a = 0, b = 0, c = 0;
  // A delay reaches at least that far past time 0, so one past the last
  // representable instant (2^64 - 1 fs, the value meaning never) is refused.
  auto delay_time = [&](const ast::time_lit& t, time_fs& v) {
    if (!lower_time(t, v, rep)) return false;
    if (v <= time_last) return true;
    rep.error(
        rep.loc_of(t.pos),
        fmt::format("a delay of {}fs passes the end of representable time ({}fs)", v, time_last));
    return false;
  };
  if (!delay_time(r.a, a)) return false;
  if (r.b && !delay_time(*r.b, b)) return false;
  if (r.c && !delay_time(*r.c, c)) return false;
  if (!r.b) {
    out = {a, a, a};
  } else if (!r.c) {
    if (b < a) {
      rep.error(rep.loc_of(r.a.pos), "delay range needs min <= max");
      return false;
    }
    out = {a, a + (b - a) / 2, b};
  } else {
    if (b < a || c < b) {
      rep.error(rep.loc_of(r.a.pos), "delay range needs min <= typ <= max");
      return false;
    }
    out = {a, b, c};
  }
  return true;
}

}  // namespace

// The name's characters are the source's own (the grammar takes them raw), so
// the ref views the source text, which outlives the IR.
ref lower_ref(const ast::name& n, const reporter& rep) {
  return ref{std::string_view(n.pos, n.text.size()), rep.loc_of(n.pos), n.quoted};
}

logic lower_value(char c) { return c == '0' ? logic::zero : c == '1' ? logic::one : logic::x; }

bool lower_time(const ast::time_lit& t, time_fs& out, reporter& rep) {
  std::string why;
  if (time_to_fs(t.number, t.exponent, out, why)) return true;
  rep.error(rep.loc_of(t.pos), why);
  return false;
}

bool lower_delay(const std::vector<ast::range>& ranges, bool transport, gate_delay& out,
                 reporter& rep) {
  out.transport = transport;
  if (!lower_range(ranges[0], out.rise, rep)) return false;
  if (ranges.size() == 1) {
    out.fall = out.rise;
    return true;
  }
  return lower_range(ranges[1], out.fall, rep);
}

bool lower_gate(const ast::gate_stmt& g, gate& out, scope_def& pools, reporter& rep) {
  const auto* c = boost::get<ast::call>(&g.value);
  const bool meta = c && (c->kind.text == "mutex" || c->kind.text == "syncff");
  if (!meta && !g.more_outs.empty()) {
    rep.error(rep.loc_of(g.more_outs.front().pos),
              "only a mutex has two outputs (ga, gb = mutex(ra, rb) ...)");
    return false;
  }
  if (!meta && (g.tau || g.window)) {
    rep.error(rep.loc_of((g.tau ? *g.tau : *g.window).a.pos),
              "'tau' and 'window' belong to the metastable elements mutex and syncff");
    return false;
  }
  out.out = lower_ref(g.out, rep);
  out.reads_begin = static_cast<std::uint32_t>(pools.read_pool.size());
  out.code_begin = static_cast<std::uint32_t>(pools.code_pool.size());
  bool ok = true;
  if (auto c = boost::get<ast::call>(&g.value)) {
    ok = lower_call(*c, out, pools, rep);
  } else {
    out.kind = gate_kind::expr;
    compiler comp(pools.read_pool, pools.code_pool, rep);
    comp.expr(boost::get<ast::or_expr>(g.value));
  }
  out.reads_end = static_cast<std::uint32_t>(pools.read_pool.size());
  out.code_end = static_cast<std::uint32_t>(pools.code_pool.size());
  if (g.delay) {
    out.has_delay = true;
    ok = lower_delay(*g.delay, g.transport, out.delay, rep) && ok;
  } else {
    out.delay.transport = g.transport;
  }
  out.arcs_begin = static_cast<std::uint32_t>(pools.arc_pool.size());
  for (const auto& a : g.arcs) {
    arc lowered{lower_ref(a.from, rep), {}};
    ok = lower_delay(a.delay, g.transport, lowered.delay, rep) && ok;
    pools.arc_pool.push_back(lowered);
  }
  out.arcs_end = static_cast<std::uint32_t>(pools.arc_pool.size());
  if (!ok) {
    pools.read_pool.resize(out.reads_begin);
    pools.code_pool.resize(out.code_begin);
    pools.arc_pool.resize(out.arcs_begin);
  }
  return ok;
}

bool is_element(const ast::gate_stmt& g) {
  const auto* c = boost::get<ast::call>(&g.value);
  return c && (c->kind.text == "mutex" || c->kind.text == "syncff");
}

bool lower_element(const ast::gate_stmt& g, scope_def& scope, reporter& rep) {
  const auto& c = boost::get<ast::call>(g.value);
  const bool mutex = c.kind.text == "mutex";
  const auto at = rep.loc_of(c.kind.pos);
  const char* form = mutex ? "ga, gb = mutex(ra, rb) delay D tau T window W"
                           : "q = syncff(d, ck) delay D tau T window W";
  const std::size_t outs = 1 + g.more_outs.size();
  if (outs != (mutex ? 2u : 1u)) {
    rep.error(rep.loc_of(g.out.pos), fmt::format("'{}' has {} output{}, found {}: {}", c.kind.text,
                                                 mutex ? 2 : 1, mutex ? "s" : "", outs, form));
    return false;
  }
  std::vector<ref> args;
  if (!simple_args(c, args, rep)) return false;
  if (args.size() != 2) {
    rep.error(at, fmt::format("'{}' takes exactly 2 inputs ({}), found {}", c.kind.text,
                              mutex ? "ra, rb" : "d, ck", args.size()));
    return false;
  }
  if (!g.tau || !g.window) {
    rep.error(at, fmt::format("'{}' needs its resolution time constant and window: {}", c.kind.text,
                              form));
    return false;
  }
  if (!g.arcs.empty() || g.transport) {
    rep.error(at, fmt::format("'{}' takes one delay, neither arcs ('from') nor 'transport'",
                              c.kind.text));
    return false;
  }
  gate proto;
  if (g.delay) {
    proto.has_delay = true;
    if (!lower_delay(*g.delay, false, proto.delay, rep)) return false;
  }
  if (!lower_range(*g.tau, proto.tau, rep) || !lower_range(*g.window, proto.window, rep))
    return false;
  if (proto.window.min == 0) {
    rep.error(rep.loc_of(g.window->a.pos), "a window must be longer than 0fs");
    return false;
  }
  auto add = [&](const ast::name& out, std::vector<ref> reads, gate::meta_role role) {
    gate x = proto;
    x.out = lower_ref(out, rep);
    x.kind = mutex ? gate_kind::mutex : gate_kind::syncff;
    x.meta = role;
    x.reads_begin = static_cast<std::uint32_t>(scope.read_pool.size());
    scope.read_pool.insert(scope.read_pool.end(), reads.begin(), reads.end());
    x.reads_end = static_cast<std::uint32_t>(scope.read_pool.size());
    x.code_begin = x.code_end = static_cast<std::uint32_t>(scope.code_pool.size());
    x.arcs_begin = x.arcs_end = static_cast<std::uint32_t>(scope.arc_pool.size());
    scope.gates.push_back(x);
  };
  if (!mutex) {
    add(g.out, args, gate::meta_role::syncff);
    return true;
  }
  // Each grant reads its own request, the other request and the other grant.
  const ref ga = lower_ref(g.out, rep), gb = lower_ref(g.more_outs[0], rep);
  add(g.out, {args[0], args[1], gb}, gate::meta_role::first_grant);
  add(g.more_outs[0], {args[1], args[0], ga}, gate::meta_role::second_grant);
  return true;
}

}  // namespace settle::ir

namespace settle::ir {

// The grammar's reading of this form, done by hand: blanks are spaces and
// tabs, names are (alpha | _) (alnum | _)* and not keywords, a constant is a
// lone 0 or 1. Anything else (labels, expressions, dotted names, a delay,
// transport, a wrong arity, an unknown kind) is left to the grammar, which
// also words the diagnostics.
bool lower_simple_gate(std::string_view text, source_loc at, gate& out, scope_def& pools) {
  const char* const b = text.data();
  const char* p = b;
  const char* const e = b + text.size();
  auto skip = [&] {
    while (p < e && is_blank(*p)) ++p;
  };
  auto word = [&]() -> std::string_view {
    const char* s = p;
    if (p == e || !lexical::ident_start(*p)) return {};
    while (p < e && lexical::ident_char(*p)) ++p;
    return std::string_view(s, static_cast<std::size_t>(p - s));
  };
  auto loc = [&](const char* q) {
    return source_loc{at.line, at.col + static_cast<std::uint32_t>(q - b)};
  };
  const auto reads = pools.read_pool.size();
  auto fail = [&] {
    pools.read_pool.resize(reads);
    return false;
  };
  const char* out_pos = p;
  const auto out_name = word();
  if (out_name.empty() || grammar::is_reserved_word(out_name)) return false;
  skip();
  if (p == e || *p != '=') return false;
  ++p;
  skip();
  const auto kind = word();
  if (kind.empty() || kind == "gc" || grammar::is_reserved_word(kind)) return false;
  auto k =
      std::find_if(std::begin(kinds), std::end(kinds), [&](auto& x) { return kind == x.word; });
  if (k == std::end(kinds)) return false;
  skip();
  if (p == e || *p != '(') return false;
  ++p;
  for (;;) {
    skip();
    if (p == e) return fail();
    const char* s = p;
    if (*p == '0' || *p == '1') {
      ++p;
      if (p < e && lexical::ident_char(*p)) return fail();
      pools.read_pool.push_back(ref{*s == '1' ? std::string_view("1") : std::string_view("0"), {}});
    } else {
      const auto w = word();
      if (w.empty() || grammar::is_reserved_word(w)) return fail();
      pools.read_pool.push_back(ref{w, loc(s)});
    }
    skip();
    if (p == e) return fail();
    if (*p == ')') break;
    if (*p != ',') return fail();
    ++p;
  }
  ++p;
  skip();
  if (p != e || arity_problem(k->kind, pools.read_pool.size() - reads)) return fail();
  out.out = ref{out_name, loc(out_pos)};
  out.kind = k->kind;
  out.reads_begin = static_cast<std::uint32_t>(reads);
  out.reads_end = static_cast<std::uint32_t>(pools.read_pool.size());
  out.code_begin = out.code_end = static_cast<std::uint32_t>(pools.code_pool.size());
  out.arcs_begin = out.arcs_end = static_cast<std::uint32_t>(pools.arc_pool.size());
  out.has_delay = false;
  out.delay = gate_delay{};
  return true;
}

}  // namespace settle::ir
