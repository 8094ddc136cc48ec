// The closed-system explorer: states of circuit and environment, breadth-first,
// with deadlocks, properties and non-persistence found on the way.
#include "sim/analysis/closed_system.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <bit>

#include "sim/analysis/explore_steps.hpp"
#include "sim/analysis/timed_path.hpp"
#include "sim/kernel/eval.hpp"

namespace settle {
namespace {

// A rule holds at most this many pending firings in the explored state.
constexpr unsigned pending_bits = 2;
constexpr std::uint64_t pending_most = (1u << pending_bits) - 1;
// Findings of one kind listed per step.
constexpr std::size_t most_listed = 64;
// Paths kept per property and per gate: when the shortest is not feasible in
// time, the next ones are tried.
constexpr std::size_t candidates_kept = 16;
// The search for a path feasible in time (closed_explorer::timed_search).
constexpr std::size_t search_frontier = 512, search_depth = 64, search_checks = 8000;
// Corners run for a deadlock or a violation the search did not reach.
constexpr std::uint64_t sampled_corners = 1000;

// Where each part of a state lies among its bits: the gate outputs first (so
// the open explorer's analyses read them as they are), then the inputs, then
// per rule its pending firings and, for a `times N` rule, the firings it has
// scheduled so far.
struct layout {
  std::size_t gates = 0, bits = 0;
  std::vector<std::size_t> pend_at, count_at;
  std::vector<unsigned> count_width;
  explicit layout(const design& d) : gates(d.nets.gate_count()) {
    bits = gates + d.nets.inputs.size();
    for (const auto& r : d.stim.rules) {
      pend_at.push_back(bits);
      bits += pending_bits;
      count_at.push_back(bits);
      count_width.push_back(r.times ? std::bit_width(r.times) : 0u);
      bits += count_width.back();
    }
  }
  std::size_t words() const { return std::max<std::size_t>(1, (bits + 63) / 64); }
};

std::uint64_t get_bits(const std::uint64_t* s, std::size_t at, unsigned width) {
  std::uint64_t v = 0;
  for (unsigned i = 0; i < width; ++i) v |= ((s[(at + i) >> 6] >> ((at + i) & 63)) & 1) << i;
  return v;
}

void set_bits(std::uint64_t* s, std::size_t at, unsigned width, std::uint64_t v) {
  for (unsigned i = 0; i < width; ++i) {
    const std::uint64_t bit = std::uint64_t{1} << ((at + i) & 63);
    if ((v >> i) & 1)
      s[(at + i) >> 6] |= bit;
    else
      s[(at + i) >> 6] &= ~bit;
  }
}

// A state taken apart: every net's value, and per rule its pending firings
// and the firings scheduled so far (counted for `times N` rules only).
struct closed_state {
  std::vector<logic> v;
  std::vector<std::uint64_t> pending, scheduled;
};

struct transition_out {
  std::vector<std::uint32_t> triggered;
  bool overflow = false;  ///< a rule would hold more pending firings than the state keeps
};

// The environment and the circuit of one design, and how their states move.
class closed_model {
 public:
  closed_model(const design& d) : d_(d), n_(d.nets), lay_(d) {
    base_.assign(n_.net_count(), logic::x);
    base_[netlist::const0] = logic::zero;
    base_[netlist::const1] = logic::one;
  }

  const layout& lay() const { return lay_; }

  void decode(const std::uint64_t* s, closed_state& out) const {
    out.v = base_;
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      out.v[n_.gate_out[g]] = from_bool((s[g >> 6] >> (g & 63)) & 1);
    for (std::size_t i = 0; i < n_.inputs.size(); ++i)
      out.v[n_.inputs[i]] = from_bool(get_bits(s, lay_.gates + i, 1));
    const std::size_t rules = d_.stim.rules.size();
    out.pending.resize(rules);
    out.scheduled.resize(rules);
    for (std::size_t r = 0; r < rules; ++r) {
      out.pending[r] = get_bits(s, lay_.pend_at[r], pending_bits);
      out.scheduled[r] = get_bits(s, lay_.count_at[r], lay_.count_width[r]);
    }
  }

  void encode(const closed_state& c, packed& out) const {
    out.assign(lay_.words(), 0);
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      if (c.v[n_.gate_out[g]] == logic::one) out[g >> 6] |= std::uint64_t{1} << (g & 63);
    for (std::size_t i = 0; i < n_.inputs.size(); ++i)
      set_bits(out.data(), lay_.gates + i, 1, c.v[n_.inputs[i]] == logic::one);
    for (std::size_t r = 0; r < d_.stim.rules.size(); ++r) {
      set_bits(out.data(), lay_.pend_at[r], pending_bits, c.pending[r]);
      if (lay_.count_width[r])
        set_bits(out.data(), lay_.count_at[r], lay_.count_width[r], c.scheduled[r]);
    }
  }

  bool excited(const closed_state& c, gate_id g) const {
    const logic present = c.v[n_.gate_out[g]];
    return eval_gate(n_, g, c.v.data(), present) != present;
  }

  // Rules whose condition turns true from `before` to `after` schedule one
  // more firing, as the kernel's observation after each instant does; a rule
  // activated at this instant (`fresh`) triggers when its condition is true.
  transition_out trigger(const closed_state& before, closed_state& after,
                         const std::vector<std::uint8_t>& active,
                         const std::vector<std::uint8_t>* fresh) const {
    transition_out t;
    for (std::uint32_t r = 0; r < d_.stim.rules.size(); ++r) {
      if (!active[r]) continue;
      const auto& rule = d_.stim.rules[r];
      const logic c1 = eval_expr(rule.condition, after.v.data());
      const logic c0 = fresh && (*fresh)[r] ? logic::x : eval_expr(rule.condition, before.v.data());
      if (c1 != logic::one || c0 == logic::one) continue;
      if (rule.times && after.scheduled[r] >= rule.times) continue;
      if (after.pending[r] == pending_most) {
        t.overflow = true;
        continue;
      }
      ++after.pending[r];
      if (rule.times) ++after.scheduled[r];
      t.triggered.push_back(r);
    }
    return t;
  }

  // The instant in which `events` happen together.
  transition_out fire(const closed_state& cur, const std::vector<closed_event>& events,
                      const std::vector<std::uint8_t>& active, closed_state& next) const {
    next = cur;
    for (const auto& e : events) {
      if (e.what == closed_event::kind::gate) {
        next.v[n_.gate_out[e.id]] = from_bool(e.value);
        continue;
      }
      --next.pending[e.id];
      for (const auto& a : d_.stim.rules[e.id].assigns) next.v[a.net] = a.value;
    }
    return trigger(cur, next, active, nullptr);
  }

  // The step's boundary: its input changes, then its activations.
  transition_out enter_step(const closed_state& before, const std::vector<assignment>& changes,
                            const std::vector<std::uint8_t>& active,
                            const std::vector<std::uint8_t>& fresh, closed_state& next) const {
    next = before;
    for (const auto& a : changes) next.v[a.net] = a.value;
    return trigger(before, next, active, &fresh);
  }

  bool violates(const property& p, const closed_state& before, const closed_state& after) const {
    const logic e = eval_expr(p.expr, after.v.data());
    switch (p.what) {
      case property::kind::always:
        return e == logic::zero;
      case property::kind::never:
        return e == logic::one;
      case property::kind::never_rises_while:
        return before.v[p.net] == logic::zero && after.v[p.net] == logic::one && e == logic::one;
      case property::kind::never_falls_while:
        return before.v[p.net] == logic::one && after.v[p.net] == logic::zero && e == logic::one;
    }
    return false;
  }

 private:
  const design& d_;
  const netlist& n_;
  layout lay_;
  std::vector<logic> base_;
};

// Where a finding lies: at state `at` of its step, or on the instant `last`
// leaving it.
struct finding_at {
  std::uint32_t at = no_id;
  std::vector<closed_event> last;
};

// One explored step, kept for the paths of later steps' findings.
struct step_store {
  std::shared_ptr<state_graph> g;
  std::vector<std::uint32_t> via_at, via_len;  ///< per state: its tree edge's firings
  std::vector<closed_event> via;
  std::vector<std::uint32_t> origin;  ///< per start state: the previous step's state
  std::vector<assignment> changes;
  std::vector<std::uint8_t> active, fresh, props;  ///< rules active, activated here; properties
  std::vector<finding_at> deadlock_at;
  std::vector<std::vector<finding_at>> property_at, hazard_at;  ///< candidates, shortest first
};

class closed_explorer {
 public:
  closed_explorer(const design& d, const explore_options& o, explore_result& res)
      : d_(d), n_(d.nets), o_(o), res_(res), m_(d) {}

  bool run(std::string* error) {
    const std::size_t rules = d_.stim.rules.size(), props = d_.stim.properties.size();
    std::vector<std::uint8_t> active(rules, 0), prop_on(props, 0);
    lim_ = graph_limits{o_.max_states, o_.max_bytes ? o_.max_bytes : default_memory_guard(), 0,
                        o_.max_excited};
    single_ = o_.model == explore_model::single;
    std::vector<logic> inputs(n_.net_count(), logic::x);
    inputs[netlist::const0] = logic::zero;
    inputs[netlist::const1] = logic::one;
    for (net_id i : n_.inputs) inputs[i] = n_.init[i];
    std::vector<std::uint32_t> rest;  // indices into the previous step's graph
    bool have_rest = false;
    for (std::size_t k = 0; k < d_.stim.steps.size(); ++k) {
      const step_spec& spec = d_.stim.steps[k];
      step_store sk;
      sk.changes = step_changes(spec);
      sk.fresh.assign(rules, 0);
      for (const auto& a : spec.actions) {
        if (a.what == stim_action::kind::rule) active[a.index] = sk.fresh[a.index] = 1;
        if (a.what == stim_action::kind::property) prop_on[a.index] = 1;
      }
      sk.active = active;
      sk.props = prop_on;
      for (const auto& a : sk.changes) inputs[a.net] = a.value;
      if (k == 0)
        for (net_id i : n_.inputs)
          if (inputs[i] == logic::x) {
            *error = fmt::format(
                "{}:{}:{}: input '{}' is x at the start: explore needs every input assigned 0 or 1 "
                "in the first step or by init",
                d_.path, spec.loc.line, spec.loc.col, n_.net_name[i]);
            return false;
          }
      explore_step st;
      st.index = k + 1;
      st.label = spec.label;
      st.closed = true;
      st.inputs = inputs;
      st.ternary.assign(n_.net_count(), logic::x);
      st.ternary_a = st.ternary;
      sk.g = std::make_shared<state_graph>(m_.lay().bits);
      sk.g->show_bits(n_.gate_count());
      bool can = true;
      if (k == 0)
        can = first_states(inputs, sk, st);
      else if (!have_rest) {
        can = false;
        st.stop = "not explored: the previous step's outcome is not known exactly";
      } else {
        next_states(rest, sk);
      }
      have_rest = false;
      if (can) {
        st.explored = true;
        st.start_states = sk.g->size();
        const bool done = explore(sk, st);
        st.states = sk.g->size();
        st.edges = sk.g->edge_to.size();
        if (done) {
          st.complete = st.exact = true;
          rest.clear();
          analyse_graph(n_, *sk.g, res_.reported, st, &rest);
          describe_stable(sk, st, rest);
          have_rest = true;
        }
        lim_.held_bytes += sk.g->bytes();
        if (o_.keep_graphs) st.graph = sk.g;
      }
      if (!st.complete) st.exact = false;
      for (std::uint32_t p = 0; p < props; ++p)
        if (prop_on[p]) {
          closed_property cp;
          cp.index = p;
          st.properties.push_back(cp);
        }
      check_expects(n_, spec, st);
      steps_.push_back(std::move(sk));
      res_.steps.push_back(std::move(st));
    }
    for (std::size_t k = 0; k < res_.steps.size(); ++k) report(k);
    return true;
  }

 private:
  // Step 1 starts from the init values (gates left x resolved as the open
  // explorer does), the step's inputs and the rules it activates.
  bool first_states(const std::vector<logic>& inputs, step_store& sk, explore_step& st) {
    std::vector<packed> gate_starts;
    const std::size_t notes_before = res_.notes.size();
    if (!first_starts(n_, inputs, o_.max_unknown, gate_starts, res_.notes, st.stop)) return false;
    approximate_start_ = res_.notes.size() != notes_before;
    closed_state init, after;
    for (const auto& gs : gate_starts) {
      // The init values are the state before the step's changes.
      init.v = inputs;
      for (net_id i : n_.inputs) init.v[i] = n_.init[i];
      for (gate_id g = 0; g < n_.gate_count(); ++g)
        init.v[n_.gate_out[g]] = from_bool((gs[g >> 6] >> (g & 63)) & 1);
      init.pending.assign(d_.stim.rules.size(), 0);
      init.scheduled.assign(d_.stim.rules.size(), 0);
      const auto t = m_.enter_step(init, sk.changes, sk.active, sk.fresh, after);
      add_start(after, init, t, no_id, sk);
    }
    return true;
  }

  // A later step starts from every state the previous one can rest in.
  void next_states(const std::vector<std::uint32_t>& rest, step_store& sk) {
    const step_store& prev = steps_.back();
    closed_state before, after;
    for (std::uint32_t v : rest) {
      m_.decode(prev.g->state(v), before);
      const auto t = m_.enter_step(before, sk.changes, sk.active, sk.fresh, after);
      add_start(after, before, t, v, sk);
    }
  }

  void add_start(const closed_state& s, const closed_state& before, const transition_out& t,
                 std::uint32_t origin, step_store& sk) {
    if (t.overflow) overflow_ = true;
    packed w;
    m_.encode(s, w);
    const auto [id, added] = sk.g->intern(w.data(), no_id);
    if (!added) return;
    sk.via_at.push_back(static_cast<std::uint32_t>(sk.via.size()));
    sk.via_len.push_back(0);
    sk.origin.push_back(origin);
    for (std::uint32_t p = 0; p < d_.stim.properties.size(); ++p)
      if (sk.props[p] && m_.violates(d_.stim.properties[p], before, s))
        note(sk.property_at, p, finding_at{id, {}});
  }

  static bool wanted(const std::vector<std::vector<finding_at>>& list, std::size_t i) {
    return list.size() <= i || list[i].size() < candidates_kept;
  }
  static void note(std::vector<std::vector<finding_at>>& list, std::size_t i, finding_at f) {
    if (list.size() <= i) list.resize(i + 1);
    if (list[i].size() < candidates_kept) list[i].push_back(std::move(f));
  }

  // Breadth-first over the step's states, as state_graph::explore does over
  // gate states, with the environment's firings among the events.
  bool explore(step_store& sk, explore_step& st) {
    state_graph& g = *sk.g;
    g.starts = g.size();
    g.edge_begin.clear();
    g.edge_to.clear();
    closed_state cur, next;
    packed w;
    std::vector<closed_event> events, subset;
    std::vector<gate_id> excited;
    for (g.explored = 0; g.explored < g.size(); ++g.explored) {
      const std::uint32_t i = g.explored;
      if (!within_limits(g, i, st.stop)) break;
      m_.decode(g.state(i), cur);
      events_of(cur, events, excited);
      g.edge_begin.push_back(static_cast<std::uint32_t>(g.edge_to.size()));
      if (events.size() >= 2) g.any_race = true;
      if (events.empty()) {
        stable_state_found(sk, cur, i);
        continue;
      }
      const bool one_at_a_time = single_ || events.size() == 1;
      if (!one_at_a_time && events.size() > static_cast<std::size_t>(lim_.max_excited)) {
        g.edge_begin.pop_back();
        st.stop = fmt::format(
            "state {} has {} events (excited gates and pending firings); gmw would need {} "
            "successors from it (the limit is {}): use --model single",
            i, events.size(), (std::uint64_t{1} << std::min<std::size_t>(events.size(), 63)) - 1,
            lim_.max_excited);
        break;
      }
      const std::uint64_t count = subset_count(events);
      for (std::uint64_t j = 0; j < count; ++j) {
        subset_of(events, j, subset);
        const auto t = m_.fire(cur, subset, sk.active, next);
        if (t.overflow) overflow_ = true;
        m_.encode(next, w);
        const auto [to, added] = g.intern(w.data(), i);
        if (added) {
          sk.via_at.push_back(static_cast<std::uint32_t>(sk.via.size()));
          sk.via_len.push_back(static_cast<std::uint32_t>(subset.size()));
          sk.via.insert(sk.via.end(), subset.begin(), subset.end());
        }
        g.edge_to.push_back(to);
        look_at_transition(sk, cur, next, excited, subset, i);
      }
    }
    g.edge_begin.push_back(static_cast<std::uint32_t>(g.edge_to.size()));
    if (overflow_ && st.stop.empty())
      res_.notes.push_back(fmt::format(
          "a rule's condition turned true again while {} of its firings were pending; explore "
          "keeps at most {} pending firings of a rule and dropped the others",
          pending_most, pending_most));
    return g.explored == g.size();
  }

  // What may happen in state `c`: its excited gates (also listed in
  // `excited`), then its rules with a pending firing.
  void events_of(const closed_state& c, std::vector<closed_event>& events,
                 std::vector<gate_id>& excited) const {
    events.clear();
    excited.clear();
    for (gate_id k = 0; k < n_.gate_count(); ++k)
      if (m_.excited(c, k)) {
        excited.push_back(k);
        events.push_back({closed_event::kind::gate, k,
                          static_cast<std::uint8_t>(c.v[n_.gate_out[k]] != logic::one)});
      }
    for (std::uint32_t r = 0; r < d_.stim.rules.size(); ++r)
      if (c.pending[r]) events.push_back({closed_event::kind::rule, r, 0});
  }

  // The successors of a state with these events, in the order of its edges:
  // each event alone (single, or one event), else every non-empty subset.
  std::uint64_t subset_count(const std::vector<closed_event>& events) const {
    if (single_ || events.size() <= 1) return events.size();
    return (std::uint64_t{1} << events.size()) - 1;
  }
  void subset_of(const std::vector<closed_event>& events, std::uint64_t j,
                 std::vector<closed_event>& subset) const {
    subset.clear();
    if (single_ || events.size() <= 1) {
      subset.push_back(events[j]);
      return;
    }
    for (std::size_t b = 0; b < events.size(); ++b)
      if (((j + 1) >> b) & 1) subset.push_back(events[b]);
  }

  bool within_limits(const state_graph& g, std::uint32_t i, std::string& stop) const {
    if (g.size() > lim_.max_states) {
      stop = fmt::format(
          "state budget reached: {} states found, {} of them explored (--max-states {})", g.size(),
          i, lim_.max_states);
      return false;
    }
    if (lim_.max_bytes && lim_.held_bytes + g.bytes() > lim_.max_bytes) {
      stop = fmt::format(
          "memory limit reached: the state graphs hold {:.1f} MiB after {} states, {} of them "
          "explored (--max-memory {} MiB)",
          static_cast<double>(lim_.held_bytes + g.bytes()) / (1 << 20), g.size(), i,
          lim_.max_bytes >> 20);
      return false;
    }
    if (g.edge_to.size() > UINT32_MAX - (std::size_t{1} << 21)) {
      stop = fmt::format("edge limit reached: {} edges after {} states ({} explored)",
                         g.edge_to.size(), g.size(), i);
      return false;
    }
    return true;
  }

  void stable_state_found(step_store& sk, const closed_state& cur, std::uint32_t i) {
    for (std::uint32_t r = 0; r < d_.stim.rules.size(); ++r)
      if (sk.active[r] && d_.stim.rules[r].times && cur.scheduled[r] < d_.stim.rules[r].times) {
        if (sk.deadlock_at.size() < most_listed) sk.deadlock_at.push_back({i, {}});
        return;
      }
  }

  void look_at_transition(step_store& sk, const closed_state& cur, const closed_state& next,
                          const std::vector<gate_id>& excited,
                          const std::vector<closed_event>& subset, std::uint32_t i) {
    for (std::uint32_t p = 0; p < d_.stim.properties.size(); ++p)
      if (sk.props[p] && wanted(sk.property_at, p) && m_.violates(d_.stim.properties[p], cur, next))
        note(sk.property_at, p, finding_at{i, subset});
    for (gate_id k : excited) {
      if (!wanted(sk.hazard_at, k)) continue;
      const bool fired = std::any_of(subset.begin(), subset.end(), [&](const closed_event& e) {
        return e.what == closed_event::kind::gate && e.id == k;
      });
      if (!fired && !m_.excited(next, k)) note(sk.hazard_at, k, finding_at{i, subset});
    }
  }

  closed_path path_to(const step_store& sk, std::uint32_t v) const {
    closed_path p;
    for (std::uint32_t u = v; sk.g->parent[u] != no_id; u = sk.g->parent[u])
      p.emplace_back(sk.via.begin() + sk.via_at[u], sk.via.begin() + sk.via_at[u] + sk.via_len[u]);
    std::reverse(p.begin(), p.end());
    return p;
  }

  std::vector<logic> inputs_of(const closed_state& c) const {
    std::vector<logic> in;
    for (net_id i : n_.inputs) in.push_back(c.v[i]);
    return in;
  }

  // The stable states analyse_graph listed, with their inputs and full paths.
  void describe_stable(const step_store& sk, explore_step& st,
                       const std::vector<std::uint32_t>& rest) const {
    std::size_t j = 0;
    closed_state c;
    for (std::uint32_t v : rest) {
      if (!sk.g->is_stable(v)) continue;
      m_.decode(sk.g->state(v), c);
      st.stable[j].inputs = inputs_of(c);
      st.stable[j].events = path_to(sk, v);
      ++j;
    }
    // What every stable state agrees on stands where the open explorer gives
    // ternary simulation's answer.
    for (net_id net : res_.reported) {
      logic agreed = st.stable.empty() ? logic::x : stable_value(n_, st, st.stable[0], net);
      for (const auto& ss : st.stable)
        if (stable_value(n_, st, ss, net) != agreed) agreed = logic::x;
      st.ternary[net] = agreed;
    }
  }

  std::uint32_t root_of(std::size_t k, std::uint32_t v) const {
    while (steps_[k].g->parent[v] != no_id) v = steps_[k].g->parent[v];
    return v;
  }

  // The instants from the start of the run to `f` of step k (and its last instant).
  timed_problem problem(std::size_t k, const finding_at& f) const {
    return problem_along(k, root_of(k, f.at), full_path(k, f));
  }

  // The instants from the start of the run: earlier steps along their
  // breadth-first paths to the state step k starts from at `root`, then
  // step k's firings `own`.
  timed_problem problem_along(std::size_t k, std::uint32_t root, const closed_path& own) const {
    timed_problem p;
    p.step = k;
    p.approximate_start = approximate_start_ || steps_[0].g->starts > 1;
    std::vector<std::pair<std::size_t, std::uint32_t>> chain;  // (step, state at its end)
    for (std::uint32_t v = steps_[k].origin[root], j = static_cast<std::uint32_t>(k); j-- > 0;) {
      chain.emplace_back(j, v);
      v = steps_[j].origin[root_of(j, v)];
    }
    std::reverse(chain.begin(), chain.end());
    closed_state cur, next;
    bool first = true;
    auto enter = [&](std::size_t j, std::uint32_t start) {
      const step_store& sk = steps_[j];
      closed_state before;
      if (first) {
        m_.decode(sk.g->state(start), before);
        for (net_id i : n_.inputs) before.v[i] = n_.init[i];
        std::fill(before.pending.begin(), before.pending.end(), 0);
        std::fill(before.scheduled.begin(), before.scheduled.end(), 0);
      } else {
        before = cur;
      }
      const auto t = m_.enter_step(before, sk.changes, sk.active, sk.fresh, next);
      push_instant(p, j, true, before, next, {}, t.triggered);
      cur = next;
      first = false;
    };
    auto walk = [&](std::size_t j, const closed_path& path) {
      for (const auto& events : path) {
        const auto tr = m_.fire(cur, events, steps_[j].active, next);
        push_instant(p, j, false, cur, next, events, tr.triggered);
        cur = next;
      }
    };
    for (const auto& [j, end] : chain) {
      enter(j, root_of(j, end));
      walk(j, path_to(steps_[j], end));
    }
    enter(k, root);
    walk(k, own);
    return p;
  }

  void push_instant(timed_problem& p, std::size_t step, bool boundary, const closed_state& before,
                    const closed_state& after, const std::vector<closed_event>& events,
                    const std::vector<std::uint32_t>& triggered) const {
    path_instant in;
    in.step = step;
    in.boundary = boundary;
    for (const auto& e : events)
      (e.what == closed_event::kind::gate ? in.fired : in.rules_fired).push_back(e.id);
    in.rules_triggered = triggered;
    for (net_id net = 0; net < n_.net_count(); ++net)
      if (before.v[net] != logic::x && after.v[net] != before.v[net]) in.changed.push_back(net);
    for (gate_id g = 0; g < n_.gate_count(); ++g) {
      in.excited.push_back(m_.excited(after, g));
      in.value.push_back(after.v[n_.gate_out[g]] == logic::one);
    }
    p.instants.push_back(std::move(in));
  }

  closed_path full_path(std::size_t k, const finding_at& f) const {
    closed_path p = path_to(steps_[k], f.at);
    if (!f.last.empty()) p.push_back(f.last);
    return p;
  }

  void report(std::size_t k) {
    const step_store& sk = steps_[k];
    explore_step& st = res_.steps[k];
    closed_state c;
    for (const auto& f : sk.deadlock_at) {
      closed_deadlock dl;
      m_.decode(sk.g->state(f.at), c);
      for (gate_id g = 0; g < n_.gate_count(); ++g)
        dl.gates.push_back(c.v[n_.gate_out[g]] == logic::one);
      dl.inputs = inputs_of(c);
      for (std::uint32_t r = 0; r < d_.stim.rules.size(); ++r) {
        const auto& rule = d_.stim.rules[r];
        if (sk.active[r] && rule.times && c.scheduled[r] < rule.times)
          dl.owed_rules.push_back({r, c.scheduled[r], rule.times});
      }
      const std::uint32_t target = f.at;
      dl.path = choose(k, {f}, timed_problem::kind::deadlock, 0, dl.timed,
                       [&](const closed_state&, const std::vector<closed_event>&,
                           const closed_state&, std::uint32_t to) { return to == target; });
      st.deadlocks.push_back(std::move(dl));
    }
    for (auto& cp : st.properties) {
      if (sk.property_at.size() <= cp.index || sk.property_at[cp.index].empty()) continue;
      cp.holds = false;
      const property& prop = d_.stim.properties[cp.index];
      cp.path =
          choose(k, sk.property_at[cp.index], timed_problem::kind::property, cp.index, cp.timed,
                 [&](const closed_state& a, const std::vector<closed_event>&, const closed_state& b,
                     std::uint32_t) { return m_.violates(prop, a, b); });
    }
    std::vector<std::uint8_t> reported_gate(n_.gate_count(), 0);
    for (net_id r : res_.reported)
      if (n_.driver[r] != no_id) reported_gate[n_.driver[r]] = 1;
    // A closed loop's outputs change many times by design: its hazards are the
    // reported nets whose gate is not persistent.
    st.hazards.clear();
    for (gate_id g = 0; g < sk.hazard_at.size(); ++g) {
      if (sk.hazard_at[g].empty()) continue;
      closed_hazard h;
      h.gate = g;
      h.output = reported_gate[g];
      if (h.output) st.hazards.push_back(n_.gate_out[g]);
      h.path = choose(k, sk.hazard_at[g], timed_problem::kind::hazard, 0, h.timed,
                      [&](const closed_state& a, const std::vector<closed_event>& fired,
                          const closed_state& b, std::uint32_t) {
                        return m_.excited(a, g) && !m_.excited(b, g) &&
                               std::none_of(fired.begin(), fired.end(), [&](const closed_event& e) {
                                 return e.what == closed_event::kind::gate && e.id == g;
                               });
                      });
      st.nonpersistent.push_back(std::move(h));
    }
  }

  // The path to report and its timed check: the first candidate, shortest
  // first, whose path is feasible in time; else the first path timed_search
  // finds to an instant `hit` accepts; else the shortest, its check saying
  // how many were tried.
  template <class Hit>
  closed_path choose(std::size_t k, const std::vector<finding_at>& candidates,
                     timed_problem::kind what, std::uint32_t property, timed_check& out,
                     const Hit& hit) const {
    bool exact = true;
    for (const auto& f : candidates) {
      timed_problem p = problem(k, f);
      p.what = what;
      p.property = property;
      timed_check t = replayed_check(p);
      if (t.feasible) {
        out = std::move(t);
        return full_path(k, f);
      }
      exact = exact && t.exact;
      if (&f == &candidates.front()) out = std::move(t);
    }
    bool complete = false;
    if (auto found = timed_search(k, what, property, hit, complete)) {
      out = std::move(found->second);
      return std::move(found->first);
    }
    const closed_path shortest = full_path(k, candidates.front());
    if (what != timed_problem::kind::hazard) {
      // Where the constraints' search stopped at its budget, runs may still
      // find a corner (a run cannot show a disabled gate, so not for hazards).
      const std::string c =
          complete ? std::string() : sample(k, candidates.front(), what, property);
      if (!c.empty()) {
        out = timed_check{};
        out.feasible = out.confirmed = out.sampled = true;
        out.corner = c;
        out.why =
            "found by running sampled corners (extremes, then random:1#i): a run at it "
            "shows the finding, along a path other than the one shown";
        return shortest;
      }
    }
    out.exact = exact && out.exact && complete;
    out.why = complete ? "no path to it is feasible: every path that some delays within the "
                         "ranges may give was followed until it could go no further"
                       : fmt::format(
                             "{}; {} path{} to it tried, a search of paths that may be timed "
                             "stopped at its budget, and {} sampled corners did not show it",
                             out.why, candidates.size(), candidates.size() == 1 ? "" : "s",
                             what == timed_problem::kind::hazard ? 0 : sampled_corners);
    return shortest;
  }

  // check_timed, where a solution the kernel does not follow is no answer: a
  // corner that does not replay the finding helps no one.
  timed_check replayed_check(const timed_problem& p) const {
    timed_check t = check_timed(d_, p);
    if (t.feasible && !t.confirmed) {
      t.feasible = t.exact = false;
      t.why = fmt::format("the constraints give {}, but {}", t.corner, t.why);
      t.corner.clear();
    }
    return t;
  }

  // A sampled corner that shows the finding, or empty (timed_path's sample_corners).
  std::string sample(std::size_t k, const finding_at& f, timed_problem::kind what,
                     std::uint32_t property) const {
    timed_problem p = problem(k, f);
    p.what = what;
    p.property = property;
    closed_state c;
    m_.decode(steps_[k].g->state(f.at), c);
    std::vector<std::uint8_t> gates;
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      gates.push_back(c.v[n_.gate_out[g]] == logic::one);
    return sample_corners(d_, p, gates, inputs_of(c), sampled_corners);
  }

  // Breadth-first over paths of step k (not states: one state reached along
  // other firings has other times), keeping a path only while some delays
  // within the ranges may still give it (may_be_timed prunes every extension
  // of a path it rejects), for the first one ending in an instant `hit`
  // accepts that passes the whole timed check. At most search_frontier
  // paths per length, search_depth instants and search_checks checks.
  template <class Hit>
  std::optional<std::pair<closed_path, timed_check>> timed_search(std::size_t k,
                                                                  timed_problem::kind what,
                                                                  std::uint32_t property,
                                                                  const Hit& hit,
                                                                  bool& complete) const {
    complete = false;
    const state_graph& g = *steps_[k].g;
    struct prefix {
      std::uint32_t root, at;
      closed_path path;
    };
    std::vector<prefix> level, next_level;
    for (std::uint32_t r = 0; r < g.starts; ++r) level.push_back({r, r, {}});
    std::size_t checks = 0;
    bool truncated = false, undecided = false;
    closed_state cur, next;
    std::vector<closed_event> events, subset;
    std::vector<gate_id> excited;
    for (std::size_t depth = 0; depth < search_depth && !level.empty(); ++depth) {
      next_level.clear();
      for (const auto& pf : level) {
        if (pf.at >= g.explored) continue;
        m_.decode(g.state(pf.at), cur);
        events_of(cur, events, excited);
        const std::uint64_t count = subset_count(events);
        for (std::uint64_t j = 0; j < count; ++j) {
          if (++checks > search_checks) return std::nullopt;  // not complete
          subset_of(events, j, subset);
          const std::uint32_t to = g.edge_to[g.edge_begin[pf.at] + j];
          closed_path path = pf.path;
          path.push_back(subset);
          timed_problem p = problem_along(k, pf.root, path);
          p.what = what;
          p.property = property;
          if (!may_be_timed(d_, p)) continue;
          m_.decode(g.state(to), next);
          if (hit(cur, subset, next, to)) {
            timed_check t = replayed_check(p);
            if (t.feasible) return std::pair{std::move(path), std::move(t)};
            if (!t.exact) undecided = true;
          }
          if (next_level.size() < search_frontier)
            next_level.push_back({pf.root, to, std::move(path)});
          else
            truncated = true;
        }
      }
      std::swap(level, next_level);
    }
    complete = level.empty() && !truncated && !undecided;
    return std::nullopt;
  }

  const design& d_;
  const netlist& n_;
  const explore_options& o_;
  explore_result& res_;
  closed_model m_;
  graph_limits lim_;
  bool single_ = false, overflow_ = false, approximate_start_ = false;
  std::vector<step_store> steps_;
};

}  // namespace

std::optional<explore_result> explore_closed(const design& d, const explore_options& o,
                                             explore_result base, std::string* error) {
  if (o.model == explore_model::ternary) {
    *error =
        "ternary simulation does not take reaction rules or properties: use --model gmw or single";
    return std::nullopt;
  }
  for (const auto& r : d.stim.rules)
    for (const auto& a : r.assigns)
      if (a.value == logic::x) {
        *error = fmt::format("{}:{}:{}: explore needs reaction rules to assign 0 or 1", d.path,
                             r.loc.line, r.loc.col);
        return std::nullopt;
      }
  if (!d.stim.gauges.empty())
    base.notes.push_back("gauges are not measured by explore: it has no time");
  base.notes.push_back(
      o.model == explore_model::single
          ? "closed system: one gate firing or environment firing at a time"
          : "closed system: any non-empty set of excited gates and pending firings in one instant");
  closed_explorer x(d, o, base);
  if (!x.run(error)) return std::nullopt;
  return base;
}

}  // namespace settle
