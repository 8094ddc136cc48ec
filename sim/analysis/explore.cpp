// The explore driver: fundamental-mode steps, start states, ternary first, then the state graph.
#include "sim/analysis/explore.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <fstream>
#include <sstream>

#include "sim/analysis/closed_system.hpp"
#include "sim/analysis/explore_steps.hpp"
#include "sim/analysis/ternary.hpp"
#include "sim/kernel/eval.hpp"

namespace settle {

std::vector<assignment> step_changes(const step_spec& s) {
  std::vector<assignment> out;
  for (const auto& a : s.actions)
    for (const auto& as : a.assigns) {
      auto it = std::find_if(out.begin(), out.end(),
                             [&](const assignment& o) { return o.net == as.net; });
      if (it == out.end())
        out.push_back(as);
      else
        it->value = as.value;  // the later assignment of the step wins
    }
  return out;
}

std::string join_names(const netlist& n, const std::vector<gate_id>& gates, std::size_t most) {
  std::string s;
  for (std::size_t i = 0; i < gates.size() && i < most; ++i)
    s += (i ? ", " : "") + n.gate_name(gates[i]);
  if (gates.size() > most) s += fmt::format(" and {} more", gates.size() - most);
  return s;
}

// The start states of step 1. Gate outputs take their init values. A gate left
// x by init is taken to follow what its inputs already force (a ternary settle
// over the x gates alone, with the step's inputs applied, binary gates kept as
// initialised); gates still x after that are enumerated over 0 and 1, up to
// `max_unknown` of them. Returns false (and says why) when there are more.
bool first_starts(const netlist& n, std::span<const logic> inputs, int max_unknown,
                  std::vector<packed>& starts, std::vector<std::string>& notes, std::string& stop) {
  std::vector<logic> y(inputs.begin(), inputs.end());
  for (gate_id g = 0; g < n.gate_count(); ++g) y[n.gate_out[g]] = n.init[n.gate_out[g]];
  std::vector<gate_id> forced, unknown;
  for (bool changed = true; changed;) {
    changed = false;
    for (gate_id g = 0; g < n.gate_count(); ++g) {
      const net_id o = n.gate_out[g];
      if (y[o] != logic::x) continue;
      const logic v = eval_gate(n, g, y.data(), logic::x);
      if (v != logic::x) {
        y[o] = v;
        forced.push_back(g);
        changed = true;
      }
    }
  }
  for (gate_id g = 0; g < n.gate_count(); ++g)
    if (y[n.gate_out[g]] == logic::x) unknown.push_back(g);
  if (!forced.empty())
    notes.push_back(
        fmt::format("{} gate output(s) without an init value start at what their inputs force: {}",
                    forced.size(), join_names(n, forced)));
  if (static_cast<int>(unknown.size()) > max_unknown) {
    stop = fmt::format(
        "{} gate outputs are x at the start ({}); explore enumerates at most {}: give them init "
        "values",
        unknown.size(), join_names(n, unknown), max_unknown);
    return false;
  }
  if (!unknown.empty())
    notes.push_back(
        fmt::format("{} gate output(s) without an init value are enumerated over 0 and 1: {}",
                    unknown.size(), join_names(n, unknown)));
  const std::size_t words = std::max<std::size_t>(1, (n.gate_count() + 63) / 64);
  packed base(words, 0);
  for (gate_id g = 0; g < n.gate_count(); ++g)
    if (y[n.gate_out[g]] == logic::one) base[g >> 6] |= std::uint64_t{1} << (g & 63);
  for (std::uint64_t m = 0; m < (std::uint64_t{1} << unknown.size()); ++m) {
    packed s = base;
    for (std::size_t j = 0; j < unknown.size(); ++j)
      if ((m >> j) & 1) s[unknown[j] >> 6] |= std::uint64_t{1} << (unknown[j] & 63);
    starts.push_back(std::move(s));
  }
  return true;
}

void check_expects(const netlist& n, const step_spec& spec, explore_step& st) {
  const bool exact = st.exact;
  for (const auto& e : spec.expects) {
    explore_expect r;
    r.spec = &e;
    switch (e.what) {
      case expectation::kind::value: {
        if (st.complete) {
          bool all = !st.stable.empty();
          logic seen = st.stable.empty() ? logic::x : stable_value(n, st, st.stable[0], e.net);
          for (const auto& s : st.stable) {
            const logic v = stable_value(n, st, s, e.net);
            if (v != e.want) all = false;
            if (v != seen) seen = logic::x;
          }
          r.got = seen;
          r.pass = all;
          if (st.stable.empty())
            r.detail = "no stable state is reachable";
          else if (!all)
            r.detail = seen == logic::x ? "differs between reachable stable states" : "";
        } else {
          r.got = st.ternary[e.net];
          r.pass = r.got == e.want;  // ternary is sound: a binary value holds in every stable state
          if (!r.pass)
            r.detail = "not proved: exploration incomplete and ternary simulation gives x";
        }
        break;
      }
      case expectation::kind::stable:
        r.pass = exact && st.may_oscillate == answer::no && !st.stable.empty();
        if (!r.pass) r.detail = exact ? "some interleaving does not settle" : "not proved";
        break;
      case expectation::kind::oscillating:
        r.pass = exact && st.stable.empty();
        r.detail =
            r.pass ? "period not checked: explore has no time" : "a stable state is reachable";
        break;
      case expectation::kind::no_glitch:
        r.pass =
            exact && std::find(st.hazards.begin(), st.hazards.end(), e.net) == st.hazards.end();
        if (!r.pass) r.detail = exact ? "a glitch is possible" : "not proved";
        break;
      case expectation::kind::deterministic:
        r.pass = exact && st.stable.size() == 1 && st.may_oscillate == answer::no;
        if (!r.pass) r.detail = exact ? "the outcome depends on the delays" : "not proved";
        break;
      case expectation::kind::within:
      case expectation::kind::gauge:
      case expectation::kind::resolves:
        r.checked = false;
        r.pass = true;
        r.detail = "timing is not checked by explore";
        break;
    }
    st.expects.push_back(std::move(r));
  }
}

std::vector<packed> analyse_graph(const netlist& n, const state_graph& g,
                                  const std::vector<net_id>& reported, explore_step& st,
                                  std::vector<std::uint32_t>* rest_ids) {
  const scc_info s = strongly_connected(g);
  st.sccs = s.count;
  bool may = false, must = false;
  for (std::uint32_t c = 0; c < s.count; ++c) {
    st.largest_scc = std::max(st.largest_scc, s.size[c]);
    if (s.terminal[c]) ++st.terminal_sccs;
    if (s.size[c] < 2) continue;
    ++st.nontrivial_sccs;
    if (s.nontransient[c]) may = true;
    if (s.terminal[c]) {
      must = true;
      ++st.oscillating_sccs;
    }
  }
  std::vector<packed> rest;
  for (std::uint32_t v = 0; v < g.size(); ++v) {
    if (!s.terminal[s.comp[v]]) continue;
    rest.emplace_back(g.state(v), g.state(v) + g.words());
    if (rest_ids) rest_ids->push_back(v);
    if (!g.is_stable(v)) continue;
    stable_state ss;
    ss.gates.resize(n.gate_count());
    for (gate_id k = 0; k < n.gate_count(); ++k) ss.gates[k] = g.bit(v, k);
    for (std::uint32_t u = v; g.parent[u] != no_id; u = g.parent[u]) {
      std::vector<gate_id> fired;
      for (gate_id k = 0; k < n.gate_count(); ++k)
        if (g.bit(u, k) != g.bit(g.parent[u], k)) fired.push_back(k);
      ss.path.push_back(std::move(fired));
    }
    std::reverse(ss.path.begin(), ss.path.end());
    st.stable.push_back(std::move(ss));
  }
  st.critical_race = st.stable.size() > 1 ? answer::yes : answer::no;
  st.noncritical_race = st.stable.size() == 1 && g.any_race ? answer::yes : answer::no;
  st.may_oscillate = may ? answer::yes : answer::no;
  st.must_oscillate = must ? answer::yes : answer::no;
  std::vector<gate_id> gates;
  std::vector<net_id> nets;
  for (net_id r : reported)
    if (n.driver[r] != no_id) {
      gates.push_back(n.driver[r]);
      nets.push_back(r);
    }
  const auto hz = hazard_gates(g, s, gates);
  for (std::size_t j = 0; j < hz.size(); ++j)
    if (hz[j]) st.hazards.push_back(nets[j]);
  return rest;
}

namespace {

// Answers from ternary simulation alone. A binary outcome over every gate is
// exact: all gmw stable states equal it and no cycle is reachable (every state
// of a reachable cycle is covered by B's result, so a varying gate would be x).
std::vector<packed> from_ternary(const netlist& n, const std::vector<net_id>& reported,
                                 std::span<const logic> before, explore_step& st) {
  std::vector<packed> rest;
  // Possible hazards only: A says the net may move, and B does not show a
  // clean change (it ends where it started, or x). Eichelberger 1965.
  for (net_id r : reported)
    if (n.driver[r] != no_id && st.ternary_a[r] == logic::x &&
        (st.ternary[r] == logic::x || st.ternary[r] == before[r]))
      st.hazards.push_back(r);
  bool binary = true;
  for (net_id o : n.gate_out) binary = binary && st.ternary[o] != logic::x;
  if (!binary) return rest;
  st.exact = true;
  stable_state ss;
  ss.gates.resize(n.gate_count());
  packed p(std::max<std::size_t>(1, (n.gate_count() + 63) / 64), 0);
  for (gate_id k = 0; k < n.gate_count(); ++k) {
    ss.gates[k] = st.ternary[n.gate_out[k]] == logic::one;
    if (ss.gates[k]) p[k >> 6] |= std::uint64_t{1} << (k & 63);
  }
  st.stable.push_back(std::move(ss));
  st.critical_race = st.may_oscillate = st.must_oscillate = answer::no;
  rest.push_back(std::move(p));
  return rest;
}

}  // namespace

const char* model_name(explore_model m) {
  return m == explore_model::gmw ? "gmw" : m == explore_model::single ? "single" : "ternary";
}

bool explore_step::pass() const {
  if (!std::all_of(expects.begin(), expects.end(), [](const explore_expect& e) { return e.pass; }))
    return false;
  if (!deadlocks.empty() || std::any_of(properties.begin(), properties.end(),
                                        [](const closed_property& p) { return !p.holds; }))
    return false;
  // A step that expects to oscillate, and does, is not a finding.
  for (const auto& e : expects)
    if (e.spec->what == expectation::kind::oscillating) return true;
  return critical_race == answer::no && may_oscillate == answer::no && stable.size() == 1;
}

bool explore_result::pass() const {
  return std::all_of(steps.begin(), steps.end(), [](const explore_step& s) { return s.pass(); });
}

std::uint64_t default_memory_guard() {
  std::ifstream in("/proc/meminfo");
  std::string line;
  while (std::getline(in, line)) {
    std::istringstream ls(line);
    std::string key;
    std::uint64_t kib = 0;
    if (ls >> key >> kib && key == "MemAvailable:")
      return std::min(kib * 1024 / 2, default_max_memory_mib << 20);
  }
  return default_max_memory_mib << 20;
}

std::optional<explore_result> explore_design(const design& d, const explore_options& o,
                                             std::string* error) {
  const netlist& n = d.nets;
  if (std::find(n.kind.begin(), n.kind.end(), gate_kind::dff) != n.kind.end()) {
    // An edge-triggered primitive has no state-graph meaning without its
    // clock's history; the six-NAND flip-flop does.
    if (error)
      *error = "explore does not take edge-triggered flip-flop primitives; import with --dff gates";
    return std::nullopt;
  }
  if (!n.meta.empty()) {
    // Their timing (who wins, how long resolution takes) is the point of
    // them; the untimed state graph could only call every contest undecided.
    if (error)
      *error = fmt::format(
          "explore does not take metastable elements (mutex, syncff: '{}'); "
          "run and sweep time them",
          n.gate_name(n.meta.front().gates[0]));
    return std::nullopt;
  }
  explore_result res;
  res.model = o.model;
  res.reported = n.outputs;
  for (net_id w : d.stim.watch)
    if (std::find(res.reported.begin(), res.reported.end(), w) == res.reported.end())
      res.reported.push_back(w);
  for (const auto& s : d.stim.steps)
    for (const auto& a : s.actions)
      if (a.what == stim_action::kind::clock) {
        *error = fmt::format(
            "{}:{}:{}: explore does not support clocks (input '{}'): it analyses one input change "
            "at a time in fundamental mode; drive the clock with explicit steps",
            d.path, a.loc.line, a.loc.col, n.net_name[a.clock.net]);
        return std::nullopt;
      }
  if (std::any_of(d.stim.steps.begin(), d.stim.steps.end(),
                  [](const step_spec& s) { return s.end == step_spec::end_kind::run; }))
    res.notes.push_back("run steps are explored like settle steps: explore has no time");
  if (!d.stim.rules.empty() || !d.stim.properties.empty())
    return explore_closed(d, o, std::move(res), error);

  graph_limits lim{o.max_states, o.max_bytes ? o.max_bytes : default_memory_guard(), 0,
                   o.max_excited};
  const race_model rm = o.model == explore_model::single ? race_model::single : race_model::gmw;
  std::vector<logic> inputs(n.net_count(), logic::x), tern(n.init.begin(), n.init.end());
  inputs[netlist::const0] = logic::zero;
  inputs[netlist::const1] = logic::one;
  for (net_id i : n.inputs) inputs[i] = n.init[i];
  std::vector<packed> rest;  // where the previous step can rest
  bool have_rest = false;

  for (std::size_t k = 0; k < d.stim.steps.size(); ++k) {
    const step_spec& spec = d.stim.steps[k];
    explore_step st;
    st.index = k + 1;
    st.label = spec.label;
    const auto changes = step_changes(spec);
    for (const auto& a : changes) inputs[a.net] = a.value;
    for (net_id i : n.inputs)
      if (inputs[i] == logic::x) {
        *error = fmt::format(
            "{}:{}:{}: input '{}' is still x in step {}: explore needs every input assigned "
            "0 or 1 from the first step on",
            d.path, spec.loc.line, spec.loc.col, n.net_name[i], k + 1);
        return std::nullopt;
      }
    st.inputs = inputs;

    // Ternary simulation first: cheap, and it says which nets are already certain.
    // Inputs without an init value take their first values before anything is
    // evaluated (as in the kernel), so they do not count as changing. From the
    // init values, which need not be stable, A still covers every reachable
    // state and B every reachable stable state and cycle.
    if (k == 0)
      for (const auto& a : changes)
        if (tern[a.net] == logic::x) tern[a.net] = a.value;
    const std::vector<logic> before = tern;
    auto t = ternary_change(n, tern, changes);
    st.ternary_a = std::move(t.after_a);
    st.ternary = std::move(t.after_b);
    tern = st.ternary;

    std::vector<packed> starts;
    bool can_explore = o.model != explore_model::ternary;
    if (can_explore && k == 0) {
      can_explore = first_starts(n, inputs, o.max_unknown, starts, res.notes, st.stop);
    } else if (can_explore) {
      can_explore = have_rest;
      if (!have_rest) st.stop = "not explored: the previous step's outcome is not known exactly";
      starts = rest;
    }
    if (o.model == explore_model::ternary) st.stop = "ternary model";
    have_rest = false;
    if (can_explore) {
      auto g = std::make_shared<state_graph>(n.gate_count());
      for (const auto& s : starts) g->intern(s.data(), no_id);
      st.explored = true;
      st.start_states = g->size();
      const bool done = g->explore(n, inputs, rm, lim, st.stop);
      st.states = g->size();
      st.edges = g->edge_to.size();
      if (done) {
        st.complete = st.exact = true;
        rest = analyse_graph(n, *g, res.reported, st);
        have_rest = true;
      }
      if (o.keep_graphs) {
        st.graph = g;
        lim.held_bytes += g->bytes();  // kept for --dot and --html: later steps share the guard
      }
    }
    if (!st.complete) {
      st.hazards.clear();
      rest = from_ternary(n, res.reported, before, st);
      have_rest = !rest.empty();
    }
    check_expects(n, spec, st);
    res.steps.push_back(std::move(st));
  }
  return res;
}

logic stable_value(const netlist& n, const explore_step& s, const stable_state& st, net_id net) {
  const gate_id g = n.driver[net];
  if (g != no_id) return from_bool(st.gates[g]);
  if (!st.inputs.empty()) {  // a closed system's environment moves the inputs
    const auto at = std::find(n.inputs.begin(), n.inputs.end(), net);
    if (at != n.inputs.end()) return st.inputs[at - n.inputs.begin()];
  }
  return s.inputs[net];
}

}  // namespace settle
