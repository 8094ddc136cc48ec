// Round trips of every .settle construct into the netlist and stimulus model.
#include <catch2/catch.hpp>

#include "parser/load.hpp"

using namespace settle;

namespace {

/// Loads text that must be free of errors; fails the test with the diagnostics otherwise.
design load_ok(const std::string& text) {
  diagnostics diags;
  auto d = load_design_text(text, "t.settle", load_options{}, diags);
  std::string all;
  for (auto& x : diags.items)
    if (x.severity == diagnostic::level::error) all += format_diagnostic(x);
  INFO(all);
  REQUIRE(d);
  return std::move(*d);
}

std::vector<std::string> fanin_names(const netlist& nl, gate_id g) {
  std::vector<std::string> out;
  for (auto i = nl.fanin_begin[g]; i < nl.fanin_begin[g + 1]; ++i)
    out.push_back(nl.net_name[nl.fanin[i]]);
  return out;
}

std::vector<std::uint32_t> program(const netlist& nl, gate_id g) {
  return {nl.code.begin() + nl.code_begin[g], nl.code.begin() + nl.code_begin[g + 1]};
}

gate_id gate_of(const netlist& nl, const std::string& out) {
  net_id n = nl.find(out);
  REQUIRE(n != no_id);
  REQUIRE(nl.driver[n] != no_id);
  return nl.driver[n];
}

constexpr time_fs ps = 1000;

const char* const debouncer = R"(# panel-switch debouncer: a set/reset latch of two NAND gates
default delay 40ps..60ps

block srlatch(in s_n, r_n; out q, q_n) {
    q   = nand(s_n, q_n)  delay 35ps..55ps
    q_n = nand(r_n, q)    delay 35ps..55ps
}

input  contact_a, contact_b
output clean
wire   clean_n
inst deb srlatch(s_n: contact_a, r_n: contact_b, q: clean, q_n: clean_n)
init clean = 0, clean_n = 1

stimulus {
    at 0ns      contact_a = 1, contact_b = 0
    settle
    expect clean = 0
    after 5ns   contact_b = 1
    settle within 2ns
    after 5ns   contact_a = 0
    settle
    expect clean = 1
}
)";

}  // namespace

TEST_CASE("the debouncer elaborates into two NAND gates with port aliases", "[parser]") {
  auto d = load_ok(debouncer);
  const auto& nl = d.nets;
  CHECK(nl.gate_count() == 2);
  CHECK(nl.net_count() == 6);  // two constants + contact_a, contact_b, clean, clean_n
  CHECK(nl.blocks == 1);
  CHECK(nl.instances == 1);
  REQUIRE(nl.scopes.size() == 2);
  CHECK(nl.scopes[1].name == "deb");
  CHECK(nl.scopes[1].block == "srlatch");
  CHECK(nl.scopes[1].parent == 0);
  // Ports alias the parent's nets: no buffer, the same net id.
  CHECK(nl.find("deb.q") == nl.find("clean"));
  CHECK(nl.find("deb.q_n") == nl.find("clean_n"));
  CHECK(nl.find("deb.s_n") == nl.find("contact_a"));
  auto q = gate_of(nl, "clean");
  CHECK(nl.kind[q] == gate_kind::nand);
  CHECK(fanin_names(nl, q) == std::vector<std::string>{"contact_a", "clean_n"});
  CHECK(nl.delay[q].rise == delay_range{35 * ps, 45 * ps, 55 * ps});
  CHECK(nl.delay[q].fall == delay_range{35 * ps, 45 * ps, 55 * ps});
  CHECK_FALSE(nl.delay[q].transport);
  CHECK(nl.gate_loc[q].line == 5);
  CHECK(nl.gate_loc[q].col == 5);
  CHECK(nl.init[nl.find("clean")] == logic::zero);
  CHECK(nl.init[nl.find("clean_n")] == logic::one);
  CHECK(nl.init[nl.find("contact_a")] == logic::x);
  CHECK(nl.inputs == std::vector<net_id>{nl.find("contact_a"), nl.find("contact_b")});
  CHECK(nl.outputs == std::vector<net_id>{nl.find("clean")});
  bool alias_found = false;
  for (auto& a : nl.aliases)
    alias_found = alias_found || (a.scope == 1 && a.local == "q_n" && a.net == nl.find("clean_n"));
  CHECK(alias_found);
  CHECK(d.source.format == "settle");
  CHECK(d.source.inputs == 2);
  CHECK(d.source.outputs == 1);
  CHECK(d.source.gates == 2);

  const auto& st = d.stim.steps;
  REQUIRE(st.size() == 3);
  CHECK(st[0].label == "at 0ns      contact_a = 1, contact_b = 0");
  CHECK(st[0].end == step_spec::end_kind::settle);
  CHECK(st[0].loc.line == 17);
  REQUIRE(st[0].actions.size() == 1);
  CHECK(st[0].actions[0].what == stim_action::kind::at);
  CHECK(st[0].actions[0].time == 0);
  REQUIRE(st[0].actions[0].assigns.size() == 2);
  CHECK(st[0].actions[0].assigns[1].net == nl.find("contact_b"));
  CHECK(st[0].actions[0].assigns[1].value == logic::zero);
  REQUIRE(st[0].expects.size() == 1);
  CHECK(st[0].expects[0].what == expectation::kind::value);
  CHECK(st[0].expects[0].ref == "clean");
  CHECK(st[0].expects[0].want == logic::zero);
  CHECK(st[1].actions[0].what == stim_action::kind::after);
  CHECK(st[1].actions[0].time == 5'000'000);
  REQUIRE(st[1].expects.size() == 1);
  CHECK(st[1].expects[0].what == expectation::kind::within);
  CHECK(st[1].expects[0].hi == 2'000'000);
  CHECK(st[2].expects[0].want == logic::one);
}

TEST_CASE("every primitive kind keeps its fan-in order; constants are nets 0 and 1", "[parser]") {
  auto d = load_ok(R"(default delay 10ps
input s, a, b, c
output o1, o2, o3, o4, o5, o6, o7, o8, o9, o10, o11
o1 = not(a)
o2 = buf(b)
o3 = and(a, b, c)
o4 = or(a, 1)
o5 = nand(a, b)
o6 = nor(c, 0)
o7 = xor(a, b, c)
o8 = xnor(a, b)
o9 = mux(s, a, b)
o10 = maj(a, b, c)
o11 = c(a, b)
)");
  const auto& nl = d.nets;
  const std::pair<const char*, gate_kind> kinds[] = {
      {"o1", gate_kind::inv},  {"o2", gate_kind::buf},    {"o3", gate_kind::and_},
      {"o4", gate_kind::or_},  {"o5", gate_kind::nand},   {"o6", gate_kind::nor},
      {"o7", gate_kind::xor_}, {"o8", gate_kind::xnor},   {"o9", gate_kind::mux},
      {"o10", gate_kind::maj}, {"o11", gate_kind::celem},
  };
  for (auto& [name, k] : kinds) {
    INFO(name);
    CHECK(nl.kind[gate_of(nl, name)] == k);
    CHECK(program(nl, gate_of(nl, name)).empty());
  }
  CHECK(fanin_names(nl, gate_of(nl, "o9")) == std::vector<std::string>{"s", "a", "b"});
  auto o4 = gate_of(nl, "o4");
  CHECK(nl.fanin[nl.fanin_begin[o4] + 1] == netlist::const1);
  auto o6 = gate_of(nl, "o6");
  CHECK(nl.fanin[nl.fanin_begin[o6] + 1] == netlist::const0);
  CHECK(nl.delay[o6].rise == delay_range{10 * ps, 10 * ps, 10 * ps});
}

TEST_CASE("expressions compile to postfix with precedence ~ & ^ |", "[parser]") {
  auto d = load_ok(R"(input a, b, c, e
output y, z, k, g
y = a | b ^ c & e delay 20ps
z = ~(a & b) | ~~c delay 20ps
k = a & 1 delay 20ps
g = gc(set: a & b, reset: ~a & ~b) delay 30ps
)");
  const auto& nl = d.nets;
  using o = op;
  auto y = gate_of(nl, "y");
  CHECK(nl.kind[y] == gate_kind::expr);
  CHECK(fanin_names(nl, y) == std::vector<std::string>{"a", "b", "c", "e"});
  // a | (b ^ (c & e))
  CHECK(program(nl, y) == std::vector<std::uint32_t>{encode(o::input, 0), encode(o::input, 1),
                                                     encode(o::input, 2), encode(o::input, 3),
                                                     encode(o::and2), encode(o::xor2),
                                                     encode(o::or2)});
  auto z = gate_of(nl, "z");
  CHECK(fanin_names(nl, z) == std::vector<std::string>{"a", "b", "c"});
  CHECK(program(nl, z) == std::vector<std::uint32_t>{encode(o::input, 0), encode(o::input, 1),
                                                     encode(o::and2), encode(o::inv),
                                                     encode(o::input, 2), encode(o::or2)});
  auto k = gate_of(nl, "k");
  CHECK(program(nl, k) ==
        std::vector<std::uint32_t>{encode(o::input, 0), encode(o::const1), encode(o::and2)});
  // gc: the set program, then the reset program; fan-in is the distinct nets read.
  auto g = gate_of(nl, "g");
  CHECK(nl.kind[g] == gate_kind::gc);
  CHECK(fanin_names(nl, g) == std::vector<std::string>{"a", "b"});
  CHECK(program(nl, g) == std::vector<std::uint32_t>{encode(o::input, 0), encode(o::input, 1),
                                                     encode(o::and2), encode(o::input, 0),
                                                     encode(o::inv), encode(o::input, 1),
                                                     encode(o::inv), encode(o::and2)});
}

TEST_CASE("delay forms, rise/fall, transport and default scoping", "[parser]") {
  auto d = load_ok(R"(default delay 40ps..60ps
block cell(in a; out q) {
  default delay 5ps transport
  q = not(a)
}
input a
output d1, d2, d3, d4, d5, d6, d7, d8
d1 = buf(a) delay 40ps
d2 = buf(a) delay 1fs..2fs
d3 = buf(a) delay 35ps..45ps..55ps
d4 = buf(a) rise 10ps fall 20ps..30ps
d5 = buf(a) delay rise 1ps..3ps fall 2ps transport
d6 = buf(a)
d7 = buf(a) transport
inst u cell(a: a, q: d8)
)");
  const auto& nl = d.nets;
  auto dl = [&](const char* n) { return nl.delay[gate_of(nl, n)]; };
  CHECK(dl("d1").rise == delay_range{40 * ps, 40 * ps, 40 * ps});
  CHECK(dl("d2").rise == delay_range{1, 1, 2});  // typ = midpoint rounded down
  CHECK(dl("d3").fall == delay_range{35 * ps, 45 * ps, 55 * ps});
  CHECK(dl("d4").rise == delay_range{10 * ps, 10 * ps, 10 * ps});
  CHECK(dl("d4").fall == delay_range{20 * ps, 25 * ps, 30 * ps});
  CHECK(dl("d5").rise == delay_range{1 * ps, 2 * ps, 3 * ps});
  CHECK(dl("d5").fall == delay_range{2 * ps, 2 * ps, 2 * ps});
  CHECK(dl("d5").transport);
  CHECK(dl("d6").rise == delay_range{40 * ps, 50 * ps, 60 * ps});
  CHECK_FALSE(dl("d6").transport);
  CHECK(dl("d7").transport);
  CHECK(dl("d7").fall == delay_range{40 * ps, 50 * ps, 60 * ps});
  // The block's own default, not the file's.
  CHECK(dl("d8").rise == delay_range{5 * ps, 5 * ps, 5 * ps});
  CHECK(dl("d8").transport);
}

TEST_CASE("nested blocks defined after use flatten to inst.inner.net", "[parser]") {
  auto d =
      load_ok(R"(# sensor FIFO handshake: two stages, each a C-element with an inverted acknowledge
default delay 50ps..80ps
input req, ack_in
output ack_out
inst fifo pair(r: req, a: ack_in, q: ack_out)
block pair(in r, a; out q) {
  wire mid, mid_ack
  inst s1 stage(req: r, ack: mid_ack, done: mid)
  inst s2 stage(req: mid, ack: a, done: q, ack_n: mid_ack)
}
block stage(in req, ack; out done, ack_n) {
  wire an
  an = not(ack)
  done = c(req, an)
  ack_n = not(done)
}
init fifo.s1.done = 0
)");
  const auto& nl = d.nets;
  CHECK(nl.blocks == 2);
  CHECK(nl.instances == 3);
  REQUIRE(nl.scopes.size() == 4);
  CHECK(nl.find("fifo.s1.an") != no_id);
  CHECK(nl.net_name[nl.find("fifo.s1.an")] == "fifo.s1.an");
  CHECK(nl.find("fifo.s1.done") == nl.find("fifo.mid"));
  CHECK(nl.find("fifo.s2.done") == nl.find("ack_out"));
  CHECK(nl.find("fifo.s2.ack_n") == nl.find("fifo.mid_ack"));
  // An unbound out port gets its own net.
  net_id own = nl.find("fifo.s1.ack_n");
  REQUIRE(own != no_id);
  CHECK(nl.net_name[own] == "fifo.s1.ack_n");
  CHECK(nl.kind[nl.driver[own]] == gate_kind::inv);
  CHECK(nl.init[nl.find("fifo.mid")] == logic::zero);
  // Scope links: s1 and s2 hang below fifo, fifo below the top.
  std::uint32_t fifo = no_id;
  for (std::uint32_t i = 0; i < nl.scopes.size(); ++i)
    if (nl.scopes[i].name == "fifo") fifo = i;
  REQUIRE(fifo != no_id);
  CHECK(nl.scopes[fifo].parent == 0);
  CHECK(nl.scopes[fifo].block == "pair");
  int children = 0;
  for (auto& s : nl.scopes) children += s.parent == fifo;
  CHECK(children == 2);
  CHECK(nl.scopes[nl.net_scope[nl.find("fifo.s1.an")]].name == "s1");
  CHECK(nl.gate_count() == 6);
}

TEST_CASE("stimulus: clocks, run, watch, every expectation and the implicit last settle",
          "[parser]") {
  diagnostics diags;
  auto d = load_design_text(R"(default delay 10ps
input ck, en
output q
q = and(ck, en)
stimulus {
  watch q
  clock ck period 10ns cycles 4
  at 0ns en = 1; run 100ns
  expect oscillating period 9ns..11ns
  expect no glitch on q, en
  clock ck period 10ns high 3ns
  settle
  expect stable; expect deterministic
  expect settle within 1ns
  expect oscillating
  after 1ns en = x
}
)",
                            "t.settle", load_options{}, diags);
  REQUIRE(d);
  const auto& nl = d->nets;
  const auto& st = d->stim;
  CHECK(st.watch == std::vector<net_id>{nl.find("q")});
  REQUIRE(st.steps.size() == 3);
  auto& s0 = st.steps[0];
  CHECK(s0.label == "clock ck period 10ns cycles 4; at 0ns en = 1");
  CHECK(s0.end == step_spec::end_kind::run);
  CHECK(s0.run_for == 100'000'000);
  REQUIRE(s0.actions.size() == 2);
  CHECK(s0.actions[0].what == stim_action::kind::clock);
  CHECK(s0.actions[0].clock.net == nl.find("ck"));
  CHECK(s0.actions[0].clock.period == 10'000'000);
  CHECK(s0.actions[0].clock.high == 5'000'000);  // half the period by default
  CHECK(s0.actions[0].clock.cycles == 4);
  REQUIRE(s0.expects.size() == 3);
  CHECK(s0.expects[0].what == expectation::kind::oscillating);
  CHECK(s0.expects[0].has_range);
  CHECK(s0.expects[0].lo == 9'000'000);
  CHECK(s0.expects[0].hi == 11'000'000);
  CHECK(s0.expects[1].what == expectation::kind::no_glitch);
  CHECK(s0.expects[2].ref == "en");
  auto& s1 = st.steps[1];
  CHECK(s1.actions[0].clock.high == 3'000'000);
  CHECK(s1.actions[0].clock.cycles == 0);
  REQUIRE(s1.expects.size() == 4);
  CHECK(s1.expects[0].what == expectation::kind::stable);
  CHECK(s1.expects[1].what == expectation::kind::deterministic);
  CHECK(s1.expects[2].what == expectation::kind::within);
  CHECK(s1.expects[2].hi == 1'000'000);
  CHECK(s1.expects[3].what == expectation::kind::oscillating);
  CHECK_FALSE(s1.expects[3].has_range);
  auto& s2 = st.steps[2];
  CHECK(s2.label == "after 1ns en = x");
  CHECK(s2.end == step_spec::end_kind::settle);
  CHECK(s2.actions[0].assigns[0].value == logic::x);
  REQUIRE(diags.items.size() == 1);
  CHECK(diags.items[0].severity == diagnostic::level::warning);
  CHECK(diags.items[0].line == 16);
  CHECK(diags.items[0].message ==
        "input changes after the last settle or run: an implicit settle ends them");
}

TEST_CASE("a step with no action is labelled settle; statements may share a line with ';'",
          "[parser]") {
  auto d = load_ok(
      "default delay 1ps; input a; output q; q = buf(a)\nstimulus {\n settle\n at 1ns a = 1; "
      "settle\n}\n");
  REQUIRE(d.stim.steps.size() == 2);
  CHECK(d.stim.steps[0].label == "settle");
  CHECK(d.stim.steps[1].label == "at 1ns a = 1");
}
