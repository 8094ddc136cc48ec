// The JSON of every report (see json.hpp). Field order is part of the
// contract users' scripts read: keys are set in the order they appear.
#include "waves/json.hpp"

#include <fmt/format.h>

#include "sim/analysis/state_graph.hpp"
#include "sim/model/enum_names.hpp"
#include "sim/model/time.hpp"

namespace settle {

std::string json_text(const report_json& j) {
  return j.dump(2, ' ', false, report_json::error_handler_t::replace) + "\n";
}

report_json report_head(const std::string& design_path) {
  report_json j;
  j["tool"] = "settle";
  j["version"] = SETTLE_VERSION;
  j["design"] = design_path;
  return j;
}

std::string logic_text(logic v) { return std::string(1, to_char(v)); }

const char* expect_kind_word(expectation::kind k) {
  static constexpr const char* names[] = {"value",     "stable",        "oscillating", "within",
                                          "no_glitch", "deterministic", "gauge",       "resolves"};
  return enum_name<expectation::kind::resolves>(k, names);
}

report_json expectation_json(const netlist& n, const expectation& spec) {
  using k = expectation::kind;
  report_json e;
  e["kind"] = expect_kind_word(spec.what);
  if (spec.what == k::value || spec.what == k::no_glitch || spec.what == k::resolves)
    e["net"] = spec.ref.empty() ? n.net_name[spec.net] : spec.ref;
  if (spec.what == k::value) e["want"] = logic_text(spec.want);
  if (spec.what == k::within || spec.what == k::resolves) e["budget_fs"] = spec.hi;
  if (spec.what == k::gauge)
    e["gauge"] = spec.ref, e["want"] = format_time(spec.lo) + ".." + format_time(spec.hi);
  return e;
}

report_json net_names_json(const netlist& n, const std::vector<net_id>& nets) {
  auto j = report_json::array();
  for (net_id id : nets) j.push_back(n.net_name[id]);
  return j;
}

std::string values_repeat_words(time_fs at, time_fs period) {
  if (!period) return "";
  return fmt::format(
      "the net values repeated (every {}, first seen at {}) but the full state with its pending "
      "events did not yet; a longer --horizon may let the repeat show as an oscillation",
      format_time(period), format_time(at));
}

std::string timeout_words(time_fs reached, std::uint64_t events, time_fs at, time_fs period) {
  std::string s =
      fmt::format("stopped at the step's time limit, {} after its start, after {} event{}",
                  format_time(reached), events, events == 1 ? "" : "s");
  if (period) s += "; " + values_repeat_words(at, period);
  return s;
}

report_json culprit_json(const netlist& n, const culprit_report& r) {
  report_json j;
  j["step"] = r.step;
  j["corners"] = {r.corner[0], r.corner[1]};
  j["culprits"] = report_json::array();
  for (const auto& c : r.gates) {
    report_json g;
    g["gate"] = n.gate_name(c.gate);
    g["kind"] = kind_name(n.kind[c.gate]);
    g["delay_fs"] = {c.rise[0], c.rise[1]};
    if (c.rise[0] != c.fall[0] || c.rise[1] != c.fall[1]) g["fall_fs"] = {c.fall[0], c.fall[1]};
    j["culprits"].push_back(std::move(g));
  }
  j["paths"] = report_json::array();
  for (int side = 0; side < 2; ++side) {
    report_json p;
    p["corner"] = r.corner[side];
    p["nets"] = report_json::array();
    p["times_fs"] = report_json::array();
    for (const auto& h : r.path[side]) {
      p["nets"].push_back(n.net_name[h.net]);
      p["times_fs"].push_back(h.time);
    }
    j["paths"].push_back(std::move(p));
  }
  j["differing_gates"] = r.differing;
  j["tests"] = r.tests;
  j["minimal"] = r.minimal;
  return j;
}

namespace {

/// A race's culprits as a step (sweep) or a failure (margin) carries them.
void race_fields(const netlist& n, const culprit_report& race, report_json& j) {
  auto c = culprit_json(n, race);
  j["culprits"] = c["culprits"];
  j["paths"] = c["paths"];
  j["race"] = {{"corners", c["corners"]},
               {"differing_gates", c["differing_gates"]},
               {"tests", c["tests"]},
               {"minimal", c["minimal"]}};
}

/// The reported nets' values by name.
report_json values_json(const netlist& n, const std::vector<net_id>& reported,
                        const std::vector<logic>& values) {
  auto j = report_json::object();
  for (std::size_t i = 0; i < reported.size() && i < values.size(); ++i)
    j[n.net_name[reported[i]]] = logic_text(values[i]);
  return j;
}

/// The rules a deadlocked step or outcome still owes.
report_json owed_json(const design& d, const std::vector<owed_rule>& owed) {
  auto j = report_json::array();
  for (const auto& w : owed)
    j.push_back({{"rule", w.rule < d.stim.rules.size() ? d.stim.rules[w.rule].text : std::string()},
                 {"fired", w.fired},
                 {"times", w.times},
                 {"condition", logic_text(w.condition)}});
  return j;
}

/// A gauge's name, kind and nets, the head of its entry in run and sweep.
report_json gauge_head(const design& d, const gauge& spec) {
  report_json e;
  e["name"] = spec.name;
  e["kind"] = gauge_kind_name(spec.what);
  e["nets"] = net_names_json(d.nets, spec.nets);
  return e;
}

// ---- run

report_json run_expect_json(const netlist& n, const step_result& s, const expect_result& x) {
  const auto& spec = *x.spec;
  report_json e = expectation_json(n, spec);
  if (spec.what == expectation::kind::value) e["got"] = logic_text(x.got);
  if (spec.what == expectation::kind::within) e["got_fs"] = s.settle;
  if (spec.what == expectation::kind::oscillating) {
    if (spec.has_range) e["period_min_fs"] = spec.lo, e["period_max_fs"] = spec.hi;
    if (s.status == step_status::oscillating) e["got_fs"] = s.period;
  }
  e["pass"] = x.pass;
  if (!x.pass && !x.detail.empty()) e["detail"] = x.detail;
  return e;
}

report_json run_step_json(const design& d, const run_result& r, const step_result& s) {
  const netlist& n = d.nets;
  report_json st;
  st["index"] = s.index;
  st["label"] = s.label;
  st["start_fs"] = s.start;
  st["end_fs"] = s.end;
  st["status"] = status_name(s.status);
  // A settle time only where the step went quiet (or, for a `run` window, its
  // last change); an oscillation has its detection time, a timeout how far it got.
  if (s.status == step_status::settled || s.status == step_status::running ||
      s.status == step_status::deadlock)
    st["settle_fs"] = s.settle;
  else
    st["last_change_fs"] = s.settle;
  st["events"] = s.events;
  if (s.end_of_time) st["detail"] = end_of_time_words;
  if (s.status == step_status::timeout && !s.end_of_time) {
    st["reached_fs"] = s.end - s.start;
    st["detail"] = timeout_words(s.end - s.start, s.events, s.values_repeat_at, s.values_period);
  }
  if (s.values_period)
    st["values_repeat"] = {{"at_fs", s.values_repeat_at}, {"period_fs", s.values_period}};
  if (s.status == step_status::oscillating) {
    st["period_fs"] = s.period;
    st["detected_fs"] = s.end;  // the instant the repeated full state was recognised
    st["toggling"] = net_names_json(n, s.toggling);
  }
  if (s.status == step_status::deadlock) st["owed"] = owed_json(d, s.owed);
  st["unknown"] = net_names_json(n, s.unknown);
  st["values"] = report_json::object();
  st["transitions"] = report_json::object();
  st["glitches"] = report_json::object();
  for (std::size_t i = 0; i < r.reported.size(); ++i) {
    const auto& name = n.net_name[r.reported[i]];
    st["values"][name] = logic_text(s.values[i]);
    st["transitions"][name] = s.transitions[i];
    st["glitches"][name] = glitches(n, r, s, i);
  }
  st["expect"] = report_json::array();
  for (const auto& x : s.expects) st["expect"].push_back(run_expect_json(n, s, x));
  if (!s.resolutions.empty()) st["resolutions"] = resolutions_json(n, s.resolutions);
  return st;
}

// ---- sweep

// The JSON name of an outcome's times: settle times only where the corners
// went quiet (settled, running: last change, deadlock); an oscillating
// outcome's are detection times, a timeout's (or event limit's) last changes.
const char* outcome_times_key(step_status s) {
  if (s == step_status::oscillating) return "detected_fs";
  if (s == step_status::timeout || s == step_status::event_limit) return "last_change_fs";
  return "settle_fs";
}

report_json outcome_json(const design& d, const sweep_result& r, const sweep_outcome& out) {
  const netlist& n = d.nets;
  report_json e;
  e["status"] = status_name(out.status);
  if (out.end_of_time) e["detail"] = end_of_time_words;
  e["values"] = values_json(n, r.reported, out.values);
  e["count"] = out.count;
  e["share"] = out.share;
  e["share_ci95"] = {out.share_ci95.lo, out.share_ci95.hi};
  e["witness"] = out.witness_name;
  e[outcome_times_key(out.status)] = {
      {"min", out.settle.min}, {"median", out.settle.median}, {"max", out.settle.max}};
  if (out.status == step_status::oscillating) e["period_fs"] = out.period;
  if (out.status == step_status::timeout && !out.end_of_time && out.reached) {
    e["reached_fs"] = out.reached;
    e["witness_events"] = out.events;
    if (out.values_period)
      e["values_repeat"] = {{"at_fs", out.values_repeat_at}, {"period_fs", out.values_period}};
    e["detail"] = timeout_words(out.reached, out.events, out.values_repeat_at, out.values_period);
  }
  if (out.status == step_status::deadlock) e["owed"] = owed_json(d, out.owed);
  e["unknown"] = net_names_json(n, out.unknown);
  return e;
}

report_json sweep_expect_json(const netlist& n, const sweep_expect& x) {
  report_json e = expectation_json(n, *x.spec);
  if (x.by_interval) {  // `interval` alone: no corner ran, the min-max run proves it or not
    e["proven"] = x.proven;
    e["pass"] = x.pass();
    if (!x.pass() && !x.detail.empty()) e["detail"] = x.detail;
  } else {
    e["failing"] = x.failing;
    e["pass"] = x.pass();
    if (!x.pass()) {
      e["witness"] = x.witness_name;
      if (!x.detail.empty()) e["detail"] = x.detail;
    }
  }
  return e;
}

report_json sweep_step_json(const design& d, const sweep_result& r, const sweep_step& s,
                            const std::vector<culprit_report>* races) {
  const netlist& n = d.nets;
  report_json st;
  st["index"] = s.index;
  st["label"] = s.label;
  st["verdict"] = verdict_name(s.verdict);
  st["first_divergence"] = s.first_divergence;
  if (s.inherits) st["inherits"] = s.inherits;
  st["outcomes"] = report_json::array();
  for (const auto& out : s.outcomes) st["outcomes"].push_back(outcome_json(d, r, out));
  if (s.unseen_outcome_bound) st["unseen_outcome_bound"] = *s.unseen_outcome_bound;
  st["expect"] = report_json::array();
  for (const auto& x : s.expects) st["expect"].push_back(sweep_expect_json(n, x));
  if (s.interval)
    st["interval"] = {{"values", values_json(n, r.reported, s.interval->values)},
                      {"proven", s.interval->proven}};
  if (races)
    for (const auto& race : *races)
      if (race.step == s.index) race_fields(n, race, st);
  return st;
}

// ---- margin

report_json failure_json(const design& d, const margin_source& src, const margin_failure& f) {
  report_json j;
  j["spread_pct"] = 100.0 * f.spread;
  j["step"] = f.step;
  if (f.property && *f.property < d.stim.properties.size()) {
    j["kind"] = "property";
    j["property"] = d.stim.properties[*f.property].text;
  } else if (f.expect_index && f.step <= d.stim.steps.size()) {
    j["kind"] = "expectation";
    j["expectation"] = expectation_words(d.nets, d.stim.steps[f.step - 1].expects[*f.expect_index]);
  } else {
    j["kind"] = f.verdict == sweep_verdict::nondeterministic ? "divergence" : "verdict";
  }
  j["verdict"] = verdict_name(f.verdict);
  j["witness"] = f.witness;
  if (!f.other_witness.empty()) j["other_witness"] = f.other_witness;
  if (!f.detail.empty()) j["detail"] = f.detail;
  j["failing"] = f.failing;
  j["corners"] = f.corners;
  j["replay"] = src.replay(f.witness);
  if (f.culprits) race_fields(d.nets, *f.culprits, j);
  return j;
}

/// A step's or a property's margin figures and its failure, alike.
template <class Margin>
void margin_fields(const design& d, const margin_source& src, const Margin& m, report_json& j) {
  j["margin_pct"] = 100.0 * m.margin;
  j["at_least"] = m.at_ceiling;
  j["fails_at_zero"] = m.fails_at_zero;
  if (m.failure) j["failure"] = failure_json(d, src, *m.failure);
}

// ---- explore

report_json tri(answer a) {
  if (a == answer::unknown) return nullptr;
  return a == answer::yes;
}

// A closed system's firing sequence: instants of gate and environment firings.
report_json closed_path_json(const design& d, const closed_path& p) {
  report_json out = report_json::array();
  for (const auto& instant : p) {
    auto& in = out.emplace_back(report_json::array());
    for (const auto& e : instant)
      if (e.what == closed_event::kind::gate)
        in.push_back({{"gate", d.nets.gate_name(e.id)}, {"value", e.value}});
      else
        in.push_back({{"rule", e.id + 1}, {"text", d.stim.rules[e.id].text}});
  }
  return out;
}

report_json timed_json(const timed_check& t, const replay_words& replay) {
  report_json j;
  j["feasible"] = t.feasible;
  if (t.feasible) {
    j["corner"] = t.corner;
    if (replay) j["replay"] = replay(t.corner);
    j["confirmed"] = t.confirmed;
    j["found_by"] = t.sampled ? "sampling" : "constraints";
  } else {
    j["exact"] = t.exact;
  }
  if (!t.why.empty()) j["why"] = t.why;
  return j;
}

// A finding's state: the gates as `state_order` spells them, and the inputs.
void closed_state_json(const netlist& n, std::span<const std::uint8_t> gates,
                       std::span<const logic> inputs, report_json& j) {
  j["state"] = state_text(gates);
  j["inputs"] = report_json::object();
  for (std::size_t i = 0; i < inputs.size(); ++i)
    j["inputs"][n.net_name[n.inputs[i]]] = inputs[i] == logic::one ? 1 : 0;
}

void closed_findings_json(const design& d, const explore_step& s, const replay_words& replay,
                          report_json& js) {
  const netlist& n = d.nets;
  auto& dl = js["deadlocks"] = report_json::array();
  for (const auto& f : s.deadlocks) {
    report_json e;
    closed_state_json(n, f.gates, f.inputs, e);
    e["owed"] = report_json::array();
    for (const auto& o : f.owed_rules)
      e["owed"].push_back({{"rule", o.rule + 1},
                           {"text", d.stim.rules[o.rule].text},
                           {"fired", o.fired},
                           {"times", o.times}});
    e["path"] = closed_path_json(d, f.path);
    e["timed"] = timed_json(f.timed, replay);
    dl.push_back(std::move(e));
  }
  auto& props = js["properties"] = report_json::array();
  for (const auto& p : s.properties) {
    report_json e;
    e["text"] = d.stim.properties[p.index].text;
    e["holds"] = p.holds;
    e["proved"] = p.holds && s.complete;  // holds on every reachable state and transition
    e["path"] = closed_path_json(d, p.path);
    e["timed"] = p.holds ? report_json() : timed_json(p.timed, replay);
    props.push_back(std::move(e));
  }
  auto& np = js["nonpersistent"] = report_json::array();
  for (const auto& h : s.nonpersistent)
    np.push_back({{"gate", n.gate_name(h.gate)},
                  {"output", h.output},
                  {"path", closed_path_json(d, h.path)},
                  {"timed", timed_json(h.timed, replay)}});
}

report_json stable_json(const design& d, const explore_result& r, const explore_step& s,
                        const stable_state& st) {
  const netlist& n = d.nets;
  report_json e;
  for (net_id net : r.reported)
    e["values"][n.net_name[net]] = logic_text(stable_value(n, s, st, net));
  e["state"] = state_text(st.gates);
  auto& path = e["path"] = report_json::array();  // gates fired together, from a start state
  for (const auto& fired : st.path) {
    auto& f = path.emplace_back(report_json::array());
    for (gate_id g : fired) f.push_back(n.gate_name(g));
  }
  if (s.closed) {  // the environment's firings too, and where the inputs rest
    e["firings"] = closed_path_json(d, st.events);
    closed_state_json(n, st.gates, st.inputs, e);
  }
  return e;
}

report_json explore_step_json(const design& d, const explore_result& r, const explore_step& s,
                              const replay_words& replay) {
  const netlist& n = d.nets;
  report_json js;
  js["index"] = s.index;
  js["label"] = s.label;
  js["states"] = s.states;
  js["edges"] = s.edges;
  js["start_states"] = s.start_states;
  auto& stable = js["stable"] = report_json::array();
  for (const auto& st : s.stable) stable.push_back(stable_json(d, r, s, st));
  js["critical_race"] = tri(s.critical_race);
  js["noncritical_race"] = tri(s.noncritical_race);
  js["may_oscillate"] = tri(s.may_oscillate);
  js["must_oscillate"] = tri(s.must_oscillate);
  js["hazards"] = net_names_json(n, s.hazards);
  // ternary: possible static hazards only; nonpersistent: a closed system's gates disabled unfired
  js["hazards_from"] = s.closed ? "nonpersistent" : s.complete ? "graph" : "ternary";
  for (net_id net : r.reported) js["ternary"][n.net_name[net]] = logic_text(s.ternary[net]);
  if (!js.contains("ternary")) js["ternary"] = report_json::object();
  if (s.complete)
    js["sccs"] = {{"count", s.sccs},
                  {"nontrivial", s.nontrivial_sccs},
                  {"terminal", s.terminal_sccs},
                  {"oscillating", s.oscillating_sccs},
                  {"largest", s.largest_scc}};
  js["complete"] = s.complete;
  js["exact"] = s.exact;
  if (!s.stop.empty()) js["stopped"] = s.stop;
  auto& ex = js["expect"] = report_json::array();
  for (const auto& e : s.expects) {
    report_json je = expectation_json(n, *e.spec);
    if (e.spec->what == expectation::kind::value) je["got"] = logic_text(e.got);
    je["checked"] = e.checked;
    je["pass"] = e.pass;
    if (!e.detail.empty()) je["detail"] = e.detail;
    ex.push_back(std::move(je));
  }
  if (s.closed) closed_findings_json(d, s, replay, js);
  js["pass"] = s.pass();
  return js;
}

}  // namespace

report_json run_json(const design& d, const run_result& r, const std::string& corner_name,
                     double wall_s, bool stopped) {
  const netlist& n = d.nets;
  report_json j = report_head(d.path);
  j["corner"] = r.corner.empty() ? corner_name : r.corner;
  j["events"] = r.events;
  j["wall_s"] = wall_s;
  j["steps"] = report_json::array();
  for (const auto& s : r.steps) j["steps"].push_back(run_step_json(d, r, s));
  if (!d.stim.properties.empty()) {
    j["properties"] = report_json::array();
    for (const auto& p : r.properties) {
      report_json e;
      e["text"] = d.stim.properties[p.property].text;
      e["holds"] = p.holds;
      if (!p.holds) {
        e["first_violation_fs"] = p.first_violation;
        e["step"] = p.step;
        e["values"] = report_json::object();
        for (const auto& [net, v] : p.values) e["values"][n.net_name[net]] = logic_text(v);
      }
      j["properties"].push_back(std::move(e));
    }
  }
  if (!d.stim.gauges.empty()) {
    j["gauges"] = report_json::array();
    for (const auto& g : r.gauges) {
      report_json e = gauge_head(d, d.stim.gauges[g.gauge]);
      e["count"] = g.count;
      e["min_fs"] = g.min;
      e["mean_fs"] = g.mean;
      e["max_fs"] = g.max;
      j["gauges"].push_back(std::move(e));
    }
  }
  j["result"] = r.pass() && !stopped ? "pass" : "findings";
  j["interrupted"] = stopped;  // the steps above are those reached before the signal
  if (stopped) j["stop_reason"] = "signal";
  return j;
}

void sweep_figures_json(const design& d, const sweep_result& r,
                        const std::vector<culprit_report>* races, report_json& j) {
  j["steps"] = report_json::array();
  for (const auto& s : r.steps) j["steps"].push_back(sweep_step_json(d, r, s, races));
  // Top-level `properties` and `gauges` of a sweep (issue 15's contract).
  j["properties"] = report_json::array();
  for (const auto& p : r.properties) {
    report_json e;
    e["text"] = d.stim.properties[p.index].text;
    e["violating"] = p.violating;
    e["corners"] = r.corners;
    if (p.violating) {
      e["witness"] = p.witness_name;
      e["first_violation_fs"] = p.first_violation;
      e["step"] = p.step;
    }
    j["properties"].push_back(std::move(e));
  }
  j["gauges"] = report_json::array();
  for (const auto& g : r.gauges) {
    const auto& spec = d.stim.gauges[g.index];
    report_json e = gauge_head(d, spec);
    e["corners"] = g.corners;
    e["samples"] = g.samples;
    if (g.corners) {
      e["min_fs"] = g.min;
      e["median_fs"] = g.median;
      e["max_fs"] = g.max;
      e["witness_min"] = g.witness_min_name;
      e["witness_max"] = g.witness_max_name;
      if (spec.what == gauge::kind::period && g.median > 0) e["throughput_per_s"] = 1e15 / g.median;
    }
    j["gauges"].push_back(std::move(e));
  }
  // Metastable elements, only when the design has any.
  if (r.elements.empty()) return;
  j["elements"] = report_json::array();
  for (const auto& el : r.elements) {
    const auto& m = d.nets.meta[el.index];
    report_json e;
    e["element"] = d.nets.gate_name(m.gates[0]);
    e["kind"] = kind_name(d.nets.kind[m.gates[0]]);
    e["resolutions"] = el.resolutions;
    e["inside_window"] = el.inside;
    e["drawn"] = el.drawn;
    if (el.resolutions) e["longest_fs"] = el.longest, e["witness"] = el.witness_name;
    e["budgets"] = report_json::array();
    for (const auto& b : el.budgets)
      e["budgets"].push_back({{"within_fs", b.within},
                              {"exceeded", b.exceeded},
                              {"share", b.share},
                              {"share_ci95", {b.share_ci95.lo, b.share_ci95.hi}},
                              {"model_share", b.model_share}});
    j["elements"].push_back(std::move(e));
  }
}

report_json sweep_json(const design& d, const sweep_result& r, const sweep_source& src) {
  report_json j = report_head(d.path);
  j["seed"] = src.seed;
  j["corners"] = r.corners;
  if (r.stopped != sweep_stop::none) {
    // The steps below cover the finished corners only.
    j["corners_planned"] = r.planned;
    j["stop_reason"] = r.stopped == sweep_stop::timeout ? "timeout" : "signal";
  }
  j["interrupted"] = r.stopped != sweep_stop::none;
  j["spec"] = src.spec;
  j["threads"] = r.threads;
  j["events"] = r.events;
  j["wall_s"] = r.wall_s;
  sweep_figures_json(d, r, src.races, j);
  j["result"] = r.pass() ? "pass" : "findings";
  return j;
}

report_json baseline_json(const std::string& file, const baseline_outcome& out,
                          const baseline_comparison* cmp, const baseline_entry* old,
                          double ceiling_pct) {
  report_json j;
  j["file"] = file;
  j["updated"] = out.updated;
  if (!out.not_updated.empty()) j["not_updated"] = out.not_updated;
  j["compared"] = cmp != nullptr;
  j["ceiling_pct"] = ceiling_pct;
  if (old) j["baseline_ceiling_pct"] = old->ceiling_pct;
  j["regressions"] = report_json::array();
  j["changes"] = report_json::array();
  if (cmp) {
    for (const auto& c : cmp->changes)
      j[c.regression ? "regressions" : "changes"].push_back(
          {{"what", c.what},
           {"before_pct", c.before_pct},
           {"after_pct", c.after_pct},
           {"drop_pct", c.before_pct - c.after_pct},
           {"before_at_least", c.before_at_least},
           {"after_at_least", c.after_at_least}});
    j["notes"] = cmp->notes;
  }
  return j;
}

report_json margin_json(const design& d, const margin_result& r, const margin_source& src) {
  report_json j = report_head(d.path);
  j["spec"] = src.spec;
  j["seed"] = src.seed;
  j["corners_per_probe"] = r.corners_per_probe;
  j["resolution_pct"] = src.resolution_pct;
  j["ceiling_pct"] = src.ceiling_pct;
  j["margin_pct"] = 100.0 * r.margin;
  j["at_least"] = r.at_ceiling;
  j["fails_at_zero"] = r.fails_at_zero;
  j["exact"] = r.exact;
  j["confidence"] = r.confidence_note();
  j["corner_runs"] = r.corner_runs;
  j["culprit_runs"] = r.culprit_runs;
  j["wall_s"] = r.wall_s;
  j["interrupted"] = r.stopped != sweep_stop::none;
  if (r.stopped != sweep_stop::none)
    j["stop_reason"] = r.stopped == sweep_stop::timeout ? "timeout" : "signal";
  j["probes"] = report_json::array();
  for (const auto& p : r.probes)
    j["probes"].push_back({{"spread_pct", 100.0 * p.spread}, {"pass", p.pass}});
  if (r.failure) j["failure"] = failure_json(d, src, *r.failure);
  j["steps"] = report_json::array();
  for (const auto& s : r.steps) {
    report_json st;
    st["index"] = s.index;
    st["label"] = s.label;
    margin_fields(d, src, s, st);
    j["steps"].push_back(std::move(st));
  }
  j["properties"] = report_json::array();
  for (const auto& p : r.properties) {
    report_json e;
    e["text"] = d.stim.properties[p.index].text;
    margin_fields(d, src, p, e);
    j["properties"].push_back(std::move(e));
  }
  j["settle_within"] = report_json::array();
  for (const auto& w : r.within) {
    report_json e = {{"step", w.step},           {"budget_fs", w.budget},
                     {"worst_fs", w.worst},      {"worst_corner", w.worst_corner},
                     {"margin_fs", w.margin_fs}, {"unsettled", w.unsettled}};
    if (!w.worst_corner.empty()) e["replay"] = src.replay(w.worst_corner);
    j["settle_within"].push_back(std::move(e));
  }
  if (!src.baseline.is_null()) j["baseline"] = src.baseline;
  j["result"] = src.pass ? "pass" : "findings";
  return j;
}

report_json explore_json(const design& d, const explore_result& r, double wall_s,
                         const replay_words& replay) {
  const netlist& n = d.nets;
  report_json j = report_head(d.path);
  j["model"] = model_name(r.model);
  auto& order = j["state_order"] = report_json::array();  // the gates behind each "state" character
  for (gate_id g = 0; g < n.gate_count(); ++g) order.push_back(n.gate_name(g));
  j["notes"] = r.notes;
  auto& steps = j["steps"] = report_json::array();
  for (const auto& s : r.steps) steps.push_back(explore_step_json(d, r, s, replay));
  j["wall_s"] = wall_s;  // the one timing field: reports compare equal apart from wall_s (issue 7)
  j["result"] = r.pass() ? "pass" : "findings";
  return j;
}

report_json resolutions_json(const netlist& n, const std::vector<resolution>& list) {
  auto j = report_json::array();
  for (const auto& res : list) {
    const auto* m = n.meta_of(res.gate);
    report_json e;
    e["element"] = n.gate_name(m->gates[0]);
    e["kind"] = kind_name(n.kind[res.gate]);
    e["output"] = n.gate_name(res.gate);
    e["first_fs"] = res.first;
    e["resolved_fs"] = res.at;
    e["resolution_fs"] = res.time();
    // mutex: the other request's lag (Δ); syncff: D's lead on the edge (δ)
    e[n.kind[res.gate] == gate_kind::mutex ? "delta_fs" : "lead_fs"] =
        res.near ? report_json(res.gap) : report_json(nullptr);
    e["drawn"] = res.drawn;
    e["value"] = logic_text(res.value);
    j.push_back(std::move(e));
  }
  return j;
}

}  // namespace settle
