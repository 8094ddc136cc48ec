// Truth tables of every gate kind, x included, against a reference built from
// the definition of the ternary extension.
#include "sim/kernel/eval.hpp"

#include <catch2/catch.hpp>
#include <functional>

#include "tests/unit/netlist_builder.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic O = logic::zero, I = logic::one, X = logic::x;

// The ternary extension of a binary function f (Eichelberger 1965): the lub
// of f over every binary resolution of the x arguments.
logic extension(const std::function<logic(const std::vector<bool>&, bool)>& f,
                const std::vector<logic>& in, logic present) {
  std::vector<logic> all = in;
  all.push_back(present);
  std::vector<int> xs;
  for (int i = 0; i < static_cast<int>(all.size()); ++i)
    if (all[i] == X) xs.push_back(i);
  logic r = X;
  for (unsigned m = 0; m < (1u << xs.size()); ++m) {
    std::vector<bool> b(all.size());
    for (std::size_t i = 0; i < all.size(); ++i) b[i] = all[i] == I;
    for (std::size_t k = 0; k < xs.size(); ++k) b[xs[k]] = m >> k & 1;
    std::vector<bool> args(b.begin(), b.end() - 1);
    logic v = f(args, b.back());
    if (v == X) return X;  // gc with set and reset both 1
    r = m == 0 ? v : lub(r, v);
  }
  return r;
}

// Evaluates `kind` over every ternary input vector of `arity` and present
// value, comparing with the extension of the binary function `f`.
void check_kind(gate_kind kind, int arity,
                const std::function<logic(const std::vector<bool>&, bool)>& f,
                std::vector<std::uint32_t> program = {}) {
  builder b;
  std::vector<std::string> names;
  for (int i = 0; i < arity; ++i) names.push_back(std::string("a") + std::to_string(i));
  for (auto& n : names) b.input(n);
  std::vector<net_id> fanin;
  design d = b.finish();
  for (auto& n : names) fanin.push_back(d.nets.find(n));
  net_id out = d.nets.add_net("y", 0);
  d.nets.add_gate(kind, out, fanin, program, gate_delay{});
  d.nets.finish();
  int combos = 1;
  for (int i = 0; i < arity; ++i) combos *= 3;
  std::vector<logic> v(d.nets.net_count(), X);
  v[0] = O, v[1] = I;
  for (int c = 0; c < combos; ++c) {
    std::vector<logic> in;
    int k = c;
    for (int i = 0; i < arity; ++i, k /= 3) in.push_back(static_cast<logic>(k % 3));
    for (int i = 0; i < arity; ++i) v[fanin[i]] = in[i];
    for (logic present : {O, I, X}) {
      v[out] = present;
      INFO("kind " << kind_name(kind) << " combo " << c << " present " << to_char(present));
      CHECK(eval_gate(d.nets, 0, v.data(), present) == extension(f, in, present));
    }
  }
}

bool all(const std::vector<bool>& a) {
  for (bool x : a)
    if (!x) return false;
  return true;
}
bool any(const std::vector<bool>& a) {
  for (bool x : a)
    if (x) return true;
  return false;
}
int ones(const std::vector<bool>& a) {
  int n = 0;
  for (bool x : a) n += x;
  return n;
}

}  // namespace

// Boolean algebra for the binary rows; Eichelberger (1965) for the x rows.
TEST_CASE("primitive gates are the ternary extension of their Boolean functions", "[eval]") {
  for (int n = 1; n <= 3; ++n) {
    check_kind(gate_kind::and_, n, [](auto& a, bool) { return from_bool(all(a)); });
    check_kind(gate_kind::nand, n, [](auto& a, bool) { return from_bool(!all(a)); });
    check_kind(gate_kind::or_, n, [](auto& a, bool) { return from_bool(any(a)); });
    check_kind(gate_kind::nor, n, [](auto& a, bool) { return from_bool(!any(a)); });
    check_kind(gate_kind::xor_, n, [](auto& a, bool) { return from_bool(ones(a) % 2); });
    check_kind(gate_kind::xnor, n, [](auto& a, bool) { return from_bool(ones(a) % 2 == 0); });
  }
  check_kind(gate_kind::buf, 1, [](auto& a, bool) { return from_bool(a[0]); });
  check_kind(gate_kind::inv, 1, [](auto& a, bool) { return from_bool(!a[0]); });
  check_kind(gate_kind::mux, 3, [](auto& a, bool) { return from_bool(a[0] ? a[2] : a[1]); });
  check_kind(gate_kind::maj, 3, [](auto& a, bool) { return from_bool(ones(a) >= 2); });
}

// Muller and Bartky (1959): the C-element follows agreeing inputs and holds
// otherwise.
TEST_CASE("C-element follows agreeing inputs and holds on disagreeing ones", "[eval]") {
  for (int n = 1; n <= 3; ++n)
    check_kind(gate_kind::celem, n, [](auto& a, bool q) {
      return all(a) ? I : !any(a) ? O : from_bool(q);
    });
  // The handbook rows, spelled out (Muller and Bartky 1959; METHODS.md §7).
  builder b;
  b.input("a"), b.input("b");
  b.gate(gate_kind::celem, "y", {"a", "b"}, fixed(0));
  design d = b.finish();
  std::vector<logic> v(d.nets.net_count(), X);
  const net_id a = d.nets.find("a"), bb = d.nets.find("b");
  auto eval = [&](logic x, logic y, logic q) {
    v[a] = x, v[bb] = y;
    return eval_gate(d.nets, 0, v.data(), q);
  };
  CHECK(eval(O, O, I) == O);
  CHECK(eval(I, I, O) == I);
  CHECK(eval(O, I, I) == I);
  CHECK(eval(I, O, O) == O);
  CHECK(eval(I, X, I) == I);  // issue 2: a C-element with inputs (1, x) holding 1 stays 1
  CHECK(eval(I, X, O) == X);
}

TEST_CASE("complex and generalised C-element gates are exact over repeated x inputs", "[eval]") {
  // y = (a0 & a1) | (a0 & ~a1) = a0: exact evaluation sees through the reconvergence.
  std::vector<std::uint32_t> p = {encode(op::input, 0), encode(op::input, 1), encode(op::and2),
                                  encode(op::input, 0), encode(op::input, 1), encode(op::inv),
                                  encode(op::and2),     encode(op::or2)};
  check_kind(
      gate_kind::expr, 2, [](auto& a, bool) { return from_bool(a[0]); }, p);
  // gc(set: a0 & a1, reset: ~a0 & ~a1): a C-element written as set/reset.
  std::vector<std::uint32_t> q = {encode(op::input, 0), encode(op::input, 1), encode(op::and2),
                                  encode(op::input, 0), encode(op::inv),      encode(op::input, 1),
                                  encode(op::inv),      encode(op::and2)};
  check_kind(
      gate_kind::gc, 2,
      [](auto& a, bool q) { return a[0] && a[1]     ? I
                                   : !a[0] && !a[1] ? O
                                                    : from_bool(q); }, q);
  // gc(set: a0, reset: a1): x when both.
  std::vector<std::uint32_t> r = {encode(op::input, 0), encode(op::input, 1)};
  check_kind(
      gate_kind::gc, 2,
      [](auto& a, bool q) { return a[0] && a[1] ? X
                                   : a[0]       ? I
                                   : a[1]       ? O
                                                : from_bool(q); }, r);
  // and(0, x) = 0, or(1, x) = 1 (issue 2, Eichelberger 1965).
  check_kind(gate_kind::expr, 2, [](auto& a, bool) { return from_bool(a[0] && a[1]); },
             {encode(op::input, 0), encode(op::input, 1), encode(op::and2)});
}
