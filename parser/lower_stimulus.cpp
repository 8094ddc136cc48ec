// Stimulus statements -> steps: actions up to each settle/run, expectations attached to the step
// before them.
#include <fmt/format.h>

#include <algorithm>
#include <iterator>
#include <utility>

#include "parser/ir.hpp"

namespace settle::ir {
namespace {

expectation make_expect(expectation::kind k, net_id net, const std::string& ref, source_loc loc) {
  expectation e;
  e.what = k;
  e.net = net;
  e.ref = ref;
  e.loc = loc;
  return e;
}

/// The nets a stimulus names, looked up in the elaborated netlist: an unknown
/// net, or an input that a gate drives, is reported and gives no_id.
class net_names {
 public:
  net_names(const netlist& nl, reporter& rep) : nl_(nl), rep_(rep) {}

  net_id net(const ref& r) const {
    net_id n = nl_.find(r.name);
    if (n == no_id || n <= netlist::const1) {
      rep_.error(r.loc, fmt::format("unknown net '{}'", r.name));
      return no_id;
    }
    return n;
  }
  /// A net the stimulus may drive: one that no gate drives.
  net_id input(const ref& r) const {
    net_id n = net(r);
    if (n == no_id) return n;
    if (nl_.driver[n] != no_id) {
      rep_.error(r.loc,
                 fmt::format("'{}' is not an input; the stimulus drives inputs only", r.name));
      return no_id;
    }
    return n;
  }
  /// The expression of a rule or property with its nets; false when one is unknown.
  bool expr(const stim_stmt& s, net_expr& e) const {
    bool ok = true;
    e.code = s.code;
    e.text = s.expr_text;
    for (const auto& r : s.reads) {
      if (r.name == "0" || r.name == "1") {  // cannot happen (constants are not names), kept safe
        ok = false;
        continue;
      }
      net_id n = net(r);
      ok = ok && n != no_id;
      e.nets.push_back(n);
    }
    return ok;
  }

 private:
  const netlist& nl_;
  reporter& rep_;
};

/// A lower bound of the time the stimulus has reached (settle steps take at
/// least no time, `run T` exactly T): an `at` before it is an error.
class time_reached {
 public:
  time_fs now() const { return reached_; }
  void at(time_fs t) {
    reached_ = std::max(reached_, t);
    input();
  }
  void after(time_fs t) {
    reached_ = add_sat(reached_, t);
    input();
  }
  /// An input action; the first of a step is where a `run` ending it counts from.
  void input() {
    if (!has_first_) first_ = reached_, has_first_ = true;
  }
  void run(time_fs t) { reached_ = add_sat(has_first_ ? first_ : reached_, t); }
  void step_closed() { has_first_ = false; }

 private:
  static constexpr time_fs last_time = UINT64_MAX - 1;
  static time_fs add_sat(time_fs a, time_fs b) { return a > last_time - b ? last_time : a + b; }

  time_fs reached_ = 0, first_ = 0;
  bool has_first_ = false;
};

/// Assembles the steps: the actions of the open step up to the settle or run
/// that closes it, and the expectations attached to the step closed last.
class stimulus_builder {
 public:
  stimulus_builder(const netlist& nl, stimulus& out, reporter& rep)
      : names_(nl, rep), nl_(nl), out_(out), rep_(rep) {}

  void add(const stim_stmt& s) {
    using k = stim_stmt::kind;
    using b = stimulus_builder;
    // What adds each kind of statement, in the order of the kinds.
    static constexpr std::pair<k, void (b::*)(const stim_stmt&)> adders[] = {
        {k::at, &b::input_change},
        {k::after, &b::input_change},
        {k::clock, &b::clock},
        {k::settle, &b::settle},
        {k::run, &b::run},
        {k::watch, &b::watch},
        {k::expect_value, &b::expect_values},
        {k::expect_stable, &b::expect_step},
        {k::expect_oscillating, &b::expect_step},
        {k::expect_within, &b::expect_step},
        {k::expect_no_glitch, &b::expect_no_glitch},
        {k::expect_deterministic, &b::expect_step},
        {k::when, &b::rule},
        {k::property, &b::property_of},
        {k::gauge, &b::gauge_of},
        {k::expect_gauge, &b::expect_gauge},
        {k::expect_resolves, &b::expect_resolves},
    };
    static_assert(std::size(adders) == static_cast<std::size_t>(k::expect_resolves) + 1);
    static_assert([] {
      for (std::size_t i = 0; i < std::size(adders); ++i)
        if (static_cast<std::size_t>(adders[i].first) != i) return false;
      return true;
    }());
    (this->*adders[static_cast<std::size_t>(s.what)].second)(s);
  }

  /// Input changes, or rules, properties or gauges, with no step after them
  /// get an implicit settle.
  void finish(source_loc close_loc) {
    if (cur_inputs_) {
      rep_.warning(first_input_,
                   "input changes after the last settle or run: an implicit settle ends them");
      close(step_spec::end_kind::settle, close_loc);
    } else if (!cur_.actions.empty()) {
      // Said aloud when earlier steps exist.
      if (closed_any_)
        rep_.warning(cur_.actions.front().loc,
                     "reaction rules, properties or gauges after the last settle or run: an "
                     "implicit settle ends them");
      close(step_spec::end_kind::settle, close_loc);
    }
  }

 private:
  void close(step_spec::end_kind end, source_loc loc) {
    cur_.end = end;
    cur_.loc = loc;
    if (labels_.empty()) {
      cur_.label = "settle";
    } else {
      cur_.label = labels_[0];
      for (std::size_t i = 1; i < labels_.size(); ++i) cur_.label += "; " + labels_[i];
    }
    out_.steps.push_back(std::move(cur_));
    cur_ = step_spec{};
    labels_.clear();
    closed_any_ = true;
    cur_inputs_ = 0;
    time_.step_closed();
  }

  /// The step an expectation belongs to, or null (after reporting) when there is none.
  step_spec* expect_target(const stim_stmt& s) {
    if (!closed_any_) {
      rep_.error(s.loc, "'expect' must follow a 'settle' or 'run' that ends a step");
      return nullptr;
    }
    if (cur_inputs_) {
      rep_.error(s.loc, "'expect' follows input changes that no 'settle' or 'run' has ended yet");
      return nullptr;
    }
    return &out_.steps.back();
  }

  /// Appends `item` (a rule, property or gauge) to `list` and to the step an
  /// action that refers to it by index, at the item's place in the file.
  template <typename List, typename Item>
  void append(stim_action::kind what, List& list, Item&& item) {
    stim_action a;
    a.what = what;
    a.index = static_cast<std::uint32_t>(list.size());
    a.loc = item.loc;
    list.push_back(std::forward<Item>(item));
    cur_.actions.push_back(std::move(a));
  }

  /// An input action of the open step.
  void add_input(stim_action&& a, source_loc loc) {
    cur_.actions.push_back(std::move(a));
    if (!cur_inputs_++) first_input_ = loc;
  }

  void too_early(source_loc at, time_fs t) {
    rep_.error(at,
               fmt::format("'at {}' is earlier than {}, a time the stimulus has already reached",
                           format_time(t), format_time(time_.now())));
  }

  void input_change(const stim_stmt& s) {
    using k = stim_stmt::kind;
    stim_action a;
    a.what = s.what == k::at ? stim_action::kind::at : stim_action::kind::after;
    a.time = s.time;
    a.loc = s.loc;
    a.time_loc = s.time_loc;
    if (s.what == k::at) {
      if (s.time < time_.now()) too_early(s.time_loc, s.time);
      time_.at(s.time);
      a.source_line = rep_.line_text(s.time_loc.line);
    } else {
      time_.after(s.time);
    }
    bool ok = true;
    for (std::size_t i = 0; i < s.nets.size(); ++i) {
      net_id n = names_.input(s.nets[i]);
      ok = ok && n != no_id;
      a.assigns.push_back({n, s.values[i]});
    }
    if (ok) add_input(std::move(a), s.loc);
    labels_.push_back(s.text);
  }

  void clock(const stim_stmt& s) {
    net_id n = names_.input(s.nets[0]);
    stim_action a;
    a.what = stim_action::kind::clock;
    a.loc = s.loc;
    a.clock = clock_spec{n, s.time, s.has_time2 ? s.time2 : s.time / 2, s.cycles};
    if (s.has_at) {
      a.anchored = true;
      a.time = s.at;
      a.time_loc = s.at_loc;
      a.source_line = rep_.line_text(s.at_loc.line);
      if (s.at < time_.now()) too_early(s.at_loc, s.at);
    }
    time_.input();
    if (!s.has_time2 && a.clock.high == 0)
      rep_.error(s.loc, "a clock period of 1fs has no room for a high phase");
    else if (n != no_id)
      add_input(std::move(a), s.loc);
    labels_.push_back(s.text);
  }

  void settle(const stim_stmt& s) {
    close(step_spec::end_kind::settle, s.loc);
    if (s.has_time) {
      out_.steps.back().expects.push_back(make_expect(expectation::kind::within, 0, "", s.loc));
      out_.steps.back().expects.back().hi = s.time;
    }
  }

  void run(const stim_stmt& s) {
    time_.run(s.time);
    cur_.run_for = s.time;
    close(step_spec::end_kind::run, s.loc);
  }

  void rule(const stim_stmt& s) {
    reaction_rule rule;
    rule.loc = s.loc;
    rule.text = s.text;
    rule.times = s.count;
    rule.delay = s.has_time ? s.range : delay_range{};
    bool ok = names_.expr(s, rule.condition);
    for (std::size_t i = 0; i < s.nets.size(); ++i) {
      net_id n = names_.input(s.nets[i]);
      ok = ok && n != no_id;
      rule.assigns.push_back({n, s.values[i]});
    }
    if (ok) append(stim_action::kind::rule, out_.rules, std::move(rule));
  }

  void property_of(const stim_stmt& s) {
    property p;
    p.loc = s.loc;
    p.text = s.text;
    p.what = s.word == "always"  ? property::kind::always
             : s.word == "never" ? property::kind::never
             : s.word == "rises" ? property::kind::never_rises_while
                                 : property::kind::never_falls_while;
    bool ok = names_.expr(s, p.expr);
    if (!s.nets.empty()) {
      p.net = names_.net(s.nets[0]);
      ok = ok && p.net != no_id;
      p.nets.push_back(p.net);
    }
    if (!ok) return;
    for (net_id n : p.expr.nets)
      if (std::find(p.nets.begin(), p.nets.end(), n) == p.nets.end()) p.nets.push_back(n);
    append(stim_action::kind::property, out_.properties, std::move(p));
  }

  void gauge_of(const stim_stmt& s) {
    gauge g;
    g.loc = s.loc;
    g.text = s.text;
    g.name = std::string(s.name.name);
    g.what = s.word == "period"       ? gauge::kind::period
             : s.word == "pulse_high" ? gauge::kind::pulse_high
             : s.word == "pulse_low"  ? gauge::kind::pulse_low
                                      : gauge::kind::latency;
    g.from_rises = s.from_rises;
    g.to_rises = s.to_rises;
    bool ok = true;
    for (const auto& r : s.nets) {
      net_id n = names_.net(r);
      ok = ok && n != no_id;
      g.nets.push_back(n);
    }
    auto dup = std::find_if(out_.gauges.begin(), out_.gauges.end(),
                            [&](const gauge& o) { return o.name == g.name; });
    if (dup != out_.gauges.end()) {
      rep_.error(s.name.loc,
                 fmt::format("gauge '{}' is already defined on line {}", g.name, dup->loc.line));
      ok = false;
    }
    if (ok) append(stim_action::kind::gauge, out_.gauges, std::move(g));
  }

  void expect_gauge(const stim_stmt& s) {
    auto* st = expect_target(s);
    auto g = std::find_if(out_.gauges.begin(), out_.gauges.end(),
                          [&](const gauge& o) { return o.name == s.name.name; });
    if (g == out_.gauges.end()) {
      rep_.error(
          s.name.loc,
          fmt::format("unknown gauge '{}'; a gauge is defined with 'gauge {} = ...' before the "
                      "expect",
                      s.name.name, s.name.name));
      return;
    }
    if (!st) return;
    expectation e = make_expect(expectation::kind::gauge, 0, std::string(s.name.name), s.name.loc);
    e.gauge = static_cast<std::uint32_t>(g - out_.gauges.begin());
    e.lo = s.range.min;
    e.hi = s.range.max;
    st->expects.push_back(e);
  }

  /// `expect resolves NET within T`: NET is an output of a metastable element.
  void expect_resolves(const stim_stmt& s) {
    auto* st = expect_target(s);
    const net_id n = names_.net(s.nets[0]);
    if (n == no_id) return;
    const gate_id g = nl_.driver[n];
    if (g == no_id || !nl_.meta_of(g)) {
      rep_.error(s.nets[0].loc, fmt::format("'{}' is no output of a mutex or syncff; 'expect "
                                            "resolves' names a metastable element by an output",
                                            s.nets[0].name));
      return;
    }
    if (!st) return;
    expectation e =
        make_expect(expectation::kind::resolves, n, std::string(s.nets[0].name), s.nets[0].loc);
    e.hi = s.time;
    st->expects.push_back(e);
  }

  void watch(const stim_stmt& s) {
    for (auto& r : s.nets)
      if (net_id n = names_.net(r); n != no_id) out_.watch.push_back(n);
  }

  void expect_values(const stim_stmt& s) {
    auto* st = expect_target(s);
    for (std::size_t i = 0; i < s.nets.size(); ++i) {
      net_id n = names_.net(s.nets[i]);
      if (st && n != no_id) {
        st->expects.push_back(
            make_expect(expectation::kind::value, n, std::string(s.nets[i].name), s.nets[i].loc));
        st->expects.back().want = s.values[i];
      }
    }
  }

  void expect_no_glitch(const stim_stmt& s) {
    auto* st = expect_target(s);
    for (auto& r : s.nets) {
      net_id n = names_.net(r);
      if (st && n != no_id)
        st->expects.push_back(
            make_expect(expectation::kind::no_glitch, n, std::string(r.name), r.loc));
    }
  }

  /// stable, deterministic, settle within T, oscillating [period A..B]: of the step as a whole.
  void expect_step(const stim_stmt& s) {
    using k = stim_stmt::kind;
    auto* st = expect_target(s);
    if (!st) return;
    expectation e = make_expect(expectation::kind::stable, 0, "", s.loc);
    e.what = s.what == k::expect_stable          ? expectation::kind::stable
             : s.what == k::expect_deterministic ? expectation::kind::deterministic
             : s.what == k::expect_within        ? expectation::kind::within
                                                 : expectation::kind::oscillating;
    if (s.what == k::expect_within) e.hi = s.time;
    if (s.what == k::expect_oscillating && s.has_time)
      e.lo = s.time, e.hi = s.time2, e.has_range = true;
    st->expects.push_back(e);
  }

  net_names names_;
  const netlist& nl_;
  time_reached time_;
  stimulus& out_;
  reporter& rep_;
  step_spec cur_;  // the open step
  std::vector<std::string> labels_;
  bool closed_any_ = false;
  // at/after/clock actions in cur_ (rules, properties and gauges are not inputs)
  std::size_t cur_inputs_ = 0;
  source_loc first_input_;
};

}  // namespace

void build_stimulus(const stim_block& sb, const netlist& nl, stimulus& out, reporter& rep) {
  out = stimulus{};
  if (!sb.present) return;
  check_stimulus(sb, nl, rep);
  out.file = rep.file();
  stimulus_builder b(nl, out, rep);
  for (const auto& s : sb.stmts) b.add(s);
  b.finish(sb.close_loc);
}

}  // namespace settle::ir
