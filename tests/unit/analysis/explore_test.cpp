// State-graph exploration (Muller and Bartky 1959; Brzozowski and Seger, Asynchronous Circuits,
// 1995).
#include "sim/analysis/explore.hpp"

#include <algorithm>
#include <catch2/catch.hpp>
#include <set>

#include "sim/kernel/run.hpp"
#include "tests/unit/netlist_builder.hpp"
#include "tests/unit/random_circuits.hpp"

using namespace settle;
using namespace settle::testing;

namespace {

constexpr logic L0 = logic::zero, L1 = logic::one, LX = logic::x;

explore_result explore_ok(const design& d, explore_options o = {}) {
  std::string err;
  auto r = explore_design(d, o, &err);
  INFO(err);
  REQUIRE(r);
  return *r;
}

// The value of `net` in stable state i of a step.
logic value_in(const design& d, const explore_step& s, std::size_t i, const char* net) {
  const net_id id = d.nets.find(net);
  const gate_id g = d.nets.driver[id];
  return g == no_id ? s.inputs[id] : from_bool(s.stable[i].gates[g]);
}

// A C-element whose inputs arrive through buffers, so the two input edges race.
design buffered_c_element() {
  builder b;
  b.input("a");
  b.input("b");
  b.gate(gate_kind::buf, "a_d", {"a"}, range(10 * ps, 90 * ps));
  b.gate(gate_kind::buf, "b_d", {"b"}, range(10 * ps, 90 * ps));
  b.gate(gate_kind::celem, "c", {"a_d", "b_d"}, range(20 * ps, 40 * ps));
  b.output("c");
  b.init("a_d", L0);
  b.init("b_d", L0);
  b.init("c", L0);
  b.at(0, {{"a", L0}, {"b", L0}}).settle().expect("c", L0);
  b.after(1000 * ps, {{"a", L1}}).settle().expect("c", L0);  // disagree: hold 0
  b.after(1000 * ps, {{"b", L1}}).settle().expect("c", L1);  // agree: follow
  b.after(1000 * ps, {{"a", L0}}).settle().expect("c", L1);  // disagree: hold 1
  b.after(1000 * ps, {{"b", L0}}).settle().expect("c", L0);  // agree on 0
  b.after(1000 * ps, {{"a", L1}, {"b", L1}})
      .settle()
      .expect("c", L1);                                      // both together: a race, one outcome
  b.after(1000 * ps, {{"a", L0}}).settle().expect("c", L1);  // hold 1
  // Swapping (0,1) to (1,0) passes through (0,0) or (1,1) depending on the buffers: a critical
  // race.
  b.after(1000 * ps, {{"a", L1}, {"b", L0}}).settle();
  return b.finish();
}

design nor_latch(bool both) {
  builder b;
  b.input("s");
  b.input("r");
  b.gate(gate_kind::nor, "q", {"r", "q_n"}, range(30 * ps, 50 * ps));
  b.gate(gate_kind::nor, "q_n", {"s", "q"}, range(30 * ps, 50 * ps));
  b.output("q");
  b.output("q_n");
  b.init("q", L0);
  b.init("q_n", L0);
  b.at(0, {{"s", L1}, {"r", L1}}).settle();
  if (both)
    b.after(1000 * ps, {{"s", L0}, {"r", L0}}).settle();
  else
    b.after(1000 * ps, {{"s", L0}}).settle();
  return b.finish();
}

}  // namespace

TEST_CASE(
    "a C-element holds on disagreeing inputs and follows agreeing ones, in every interleaving",
    "[explore]") {
  // Muller and Bartky 1959: c = 1 when all inputs are 1, 0 when all are 0, else hold.
  design d = buffered_c_element();
  for (auto m : {explore_model::gmw, explore_model::single}) {
    explore_options o;
    o.model = m;
    auto r = explore_ok(d, o);
    REQUIRE(r.steps.size() == 8);
    for (const auto& s : r.steps) {
      if (s.index == 8) break;
      INFO("step " << s.index);
      CHECK(s.complete);
      CHECK(s.stable.size() == 1);
      CHECK(s.critical_race == answer::no);
      CHECK(s.may_oscillate == answer::no);
      CHECK(s.hazards.empty());  // c never glitches, whatever the buffer delays
      for (const auto& e : s.expects) CHECK(e.pass);
    }
    // The simultaneous change races the two buffers: several paths, one outcome.
    CHECK(r.steps[5].noncritical_race == answer::yes);
    CHECK(r.steps[5].states == 5);  // (a_d, b_d, c) = 000, 100, 010, 110, 111
    CHECK(r.steps[7].critical_race == answer::yes);
    CHECK(r.steps[7].stable.size() == 2);
    CHECK_FALSE(r.pass());
  }
}

TEST_CASE("NOR latch released from (1,1) to (0,0): two stable states and a cycle", "[explore]") {
  // Handbook behaviour: releasing both inputs at once is a critical race; METHODS.md section 5,
  // derived check: 00 goes to {10, 01, 11} and 11 to {01, 10, 00}.
  design d = nor_latch(true);
  explore_options o;
  o.keep_graphs = true;
  auto r = explore_ok(d, o);
  REQUIRE(r.steps.size() == 2);
  CHECK(r.steps[0].stable.size() == 1);
  const auto& s = r.steps[1];
  CHECK(s.complete);
  CHECK(s.states == 4);
  REQUIRE(s.stable.size() == 2);
  std::set<std::pair<logic, logic>> outcomes;
  for (std::size_t i = 0; i < 2; ++i)
    outcomes.insert({value_in(d, s, i, "q"), value_in(d, s, i, "q_n")});
  CHECK(outcomes == std::set<std::pair<logic, logic>>{{L1, L0}, {L0, L1}});
  CHECK(s.critical_race == answer::yes);
  CHECK(s.may_oscillate == answer::yes);
  CHECK(s.must_oscillate == answer::no);  // the 00 <-> 11 cycle can always leave
  CHECK(s.nontrivial_sccs == 1);
  CHECK(s.largest_scc == 2);
  CHECK(s.ternary[d.nets.find("q")] == LX);
  CHECK(s.ternary[d.nets.find("q_n")] == LX);
  const state_graph& g = *s.graph;
  REQUIRE(g.starts == 1);
  CHECK(g.edge_begin[1] - g.edge_begin[0] == 3);
  CHECK_FALSE(r.pass());
}

TEST_CASE("NOR latch released on one input: one stable state", "[explore]") {
  // Handbook behaviour: releasing S alone leaves the latch reset (q = 0, q_n = 1).
  design d = nor_latch(false);
  auto r = explore_ok(d);
  const auto& s = r.steps[1];
  REQUIRE(s.stable.size() == 1);
  CHECK(value_in(d, s, 0, "q") == L0);
  CHECK(value_in(d, s, 0, "q_n") == L1);
  CHECK(s.may_oscillate == answer::no);
  CHECK(s.critical_race == answer::no);
  CHECK(r.pass());
}

TEST_CASE("a ring of three inverters has no stable state and must oscillate", "[explore]") {
  // Common practice: an odd ring of inverting stages oscillates. With no init values, every
  // one of the 2^3 power-up states is a start state.
  for (bool with_init : {true, false}) {
    builder b;
    b.input("unused");
    b.gate(gate_kind::inv, "r1", {"r3"}, fixed(20 * ps));
    b.gate(gate_kind::inv, "r2", {"r1"}, fixed(20 * ps));
    b.gate(gate_kind::inv, "r3", {"r2"}, fixed(20 * ps));
    b.output("r3");
    if (with_init) {
      b.init("r1", L0);
      b.init("r2", L1);
      b.init("r3", L0);
    }
    b.at(0, {{"unused", L0}}).settle();
    design d = b.finish();
    auto r = explore_ok(d);
    const auto& s = r.steps[0];
    CHECK(s.complete);
    CHECK(s.stable.empty());
    CHECK(s.must_oscillate == answer::yes);
    CHECK(s.may_oscillate == answer::yes);
    CHECK(s.hazards == std::vector<net_id>{d.nets.find("r3")});
    CHECK(s.start_states == (with_init ? 1u : 8u));
    CHECK_FALSE(r.pass());
  }
}

TEST_CASE("a static hazard is found on the state graph", "[explore]") {
  // Boolean algebra: out = a & ~a is 0 in every stable state but can pulse when a rises.
  builder b;
  b.input("a");
  b.gate(gate_kind::inv, "a_n", {"a"}, fixed(20 * ps));
  b.gate(gate_kind::and_, "out", {"a", "a_n"}, fixed(20 * ps));
  b.output("out");
  b.init("a_n", L1);
  b.init("out", L0);
  b.at(0, {{"a", L0}}).settle();
  b.after(1000 * ps, {{"a", L1}}).settle().expect("out", L0);
  design d = b.finish();
  auto r = explore_ok(d);
  const auto& s = r.steps[1];
  REQUIRE(s.stable.size() == 1);
  CHECK(s.hazards == std::vector<net_id>{d.nets.find("out")});
  CHECK(s.noncritical_race == answer::yes);
  CHECK(s.expects[0].pass);
  CHECK(r.steps[0].hazards.empty());
}

TEST_CASE("the state budget stops cleanly and falls back to ternary", "[explore]") {
  // A chain of buffers released together has 2^n interleaving states (Boolean counting).
  builder b;
  b.input("go");
  for (int i = 0; i < 10; ++i) {
    const std::string n = "b" + std::to_string(i);
    b.gate(gate_kind::buf, n, {"go"}, range(10 * ps, 20 * ps));
    b.init(n, L0);
  }
  b.output("b9");
  b.at(0, {{"go", L0}}).settle();
  b.after(1000 * ps, {{"go", L1}}).settle().expect("b9", L1);
  design d = b.finish();
  explore_options o;
  o.max_states = 100;
  auto r = explore_ok(d, o);
  const auto& s = r.steps[1];
  CHECK_FALSE(s.complete);
  CHECK(s.stop.find("state budget") != std::string::npos);
  CHECK(s.exact);  // ternary settles binary, which is exact
  CHECK(s.ternary[d.nets.find("b9")] == L1);
  CHECK(s.expects[0].pass);
  o.max_states = 2000;
  auto full = explore_ok(d, o);
  CHECK(full.steps[1].states == 1024);
  CHECK(full.steps[1].complete);
  o.max_excited = 4;  // ten excited buffers exceed it
  auto capped = explore_ok(d, o);
  CHECK_FALSE(capped.steps[1].complete);
  CHECK(capped.steps[1].stop.find("excited gates") != std::string::npos);
}

TEST_CASE("explore refuses clocks and inputs left x", "[explore]") {
  builder b;
  b.input("clk");
  b.input("d");
  b.gate(gate_kind::buf, "q", {"d"}, fixed(10 * ps));
  b.output("q");
  b.at(0, {{"d", L0}}).clock("clk", 100 * ps, 50 * ps, 4).settle();
  design d = b.finish();
  std::string err;
  CHECK_FALSE(explore_design(d, {}, &err));
  CHECK(err.find("clocks") != std::string::npos);
  d.stim.steps[0].actions.pop_back();
  CHECK_FALSE(explore_design(d, {}, &err));
  CHECK(err.find("input 'clk' is still x") != std::string::npos);
}

namespace {

// Gate outputs of every stable state of a step, as strings of 0/1 in gate order.
std::set<std::string> outcomes(const explore_step& s) {
  std::set<std::string> out;
  for (const auto& st : s.stable) {
    std::string t;
    for (auto b : st.gates) t += b ? '1' : '0';
    out.insert(t);
  }
  return out;
}

}  // namespace

TEST_CASE("ternary, gmw, single winner and timed corners agree on random feedback circuits",
          "[explore][property]") {
  // Brzozowski and Seger 1995: a net ternary simulation leaves binary has that value in every
  // gmw stable state; single-winner runs are gmw runs, so their stable states are among gmw's;
  // a run with concrete inertial delays is one gmw interleaving, so each settled corner ends in
  // a gmw stable state (Muller and Bartky 1959 model of unbounded gate delays).
  int circuits = 0, compared_steps = 0, corner_steps = 0, races = 0, cycles = 0;
  for (std::uint64_t seed = 1; seed <= 240; ++seed) {
    const int gates = 3 + static_cast<int>(seed % 8);  // 3..10 gates
    design d = random_feedback_circuit(seed, gates);
    INFO("seed " << seed << ", " << gates << " gates");
    explore_options og, os;
    os.model = explore_model::single;
    const auto g = explore_ok(d, og);
    const auto s = explore_ok(d, os);
    ++circuits;
    for (std::size_t k = 0; k < g.steps.size(); ++k) {
      const auto& gs = g.steps[k];
      INFO("step " << k + 1);
      if (!gs.complete) break;  // later steps start from where this one rests
      ++compared_steps;
      if (gs.critical_race == answer::yes) ++races;
      if (gs.may_oscillate == answer::yes) ++cycles;
      const auto gmw_out = outcomes(gs);
      for (const auto& st : gs.stable)
        for (gate_id q = 0; q < d.nets.gate_count(); ++q) {
          const logic t = gs.ternary[d.nets.gate_out[q]];
          if (t != logic::x) CHECK(from_bool(st.gates[q]) == t);
        }
      // Single-winner starts from its own previous outcome, a subset of gmw's by induction.
      if (k < s.steps.size() && s.steps[k].complete) {
        const auto single_out = outcomes(s.steps[k]);
        CHECK(std::includes(gmw_out.begin(), gmw_out.end(), single_out.begin(), single_out.end()));
      }
    }
    // Timed corners: each step's final state must be a gmw stable state while every earlier
    // step settled (a free oscillation leaves the next step's start outside fundamental mode).
    for (const char* name : {"min", "max", "random:7", "random:99"}) {
      std::string err;
      const auto c = parse_corner(name, &err);
      REQUIRE(c);
      delay_table t;
      fill_delays(d, *c, t);
      const run_result rr = run_stimulus(d, t, run_options{});
      for (std::size_t k = 0; k < rr.steps.size() && k < g.steps.size(); ++k) {
        const auto& ks = rr.steps[k];
        if (ks.status != step_status::settled || !g.steps[k].complete) break;
        std::string state(d.nets.gate_count(), '?');
        bool binary = true;
        for (std::size_t j = 0; j < rr.reported.size(); ++j) {
          const gate_id q = d.nets.driver[rr.reported[j]];
          if (q == no_id) continue;
          if (ks.values[j] == logic::x) binary = false;
          state[q] = to_char(ks.values[j]);
        }
        if (!binary) break;
        INFO("corner " << name << " step " << k + 1 << " ended in " << state);
        CHECK(outcomes(g.steps[k]).count(state) == 1);
        for (gate_id q = 0; q < d.nets.gate_count(); ++q) {
          const logic tv = g.steps[k].ternary[d.nets.gate_out[q]];
          if (tv != logic::x) CHECK(state[q] == to_char(tv));
        }
        ++corner_steps;
      }
    }
  }
  CHECK(circuits >= 200);
  // The generator must exercise what the properties are about.
  CHECK(compared_steps > 600);
  CHECK(corner_steps > 1000);
  CHECK(races > 5);
  CHECK(cycles > 5);
}
