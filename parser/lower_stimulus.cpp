// Stimulus statements -> steps: actions up to each settle/run, expectations attached to the step
// before them.
#include <fmt/format.h>

#include <algorithm>

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

}  // namespace

void build_stimulus(const stim_block& sb, const netlist& nl, stimulus& out, reporter& rep) {
  out = stimulus{};
  if (!sb.present) return;
  check_stimulus(sb, nl, rep);
  auto net_of = [&](const ref& r) -> net_id {
    net_id n = nl.find(r.name);
    if (n == no_id || n <= netlist::const1) {
      rep.error(r.loc, fmt::format("unknown net '{}'", r.name));
      return no_id;
    }
    return n;
  };
  auto input_of = [&](const ref& r) -> net_id {
    net_id n = net_of(r);
    if (n == no_id) return n;
    if (nl.driver[n] != no_id) {
      rep.error(r.loc,
                fmt::format("'{}' is not an input; the stimulus drives inputs only", r.name));
      return no_id;
    }
    return n;
  };

  out.file = rep.file();
  auto expr_of = [&](const stim_stmt& s, net_expr& e) {
    bool ok = true;
    e.code = s.code;
    e.text = s.expr_text;
    for (const auto& r : s.reads) {
      if (r.name == "0" || r.name == "1") {  // cannot happen (constants are not names), kept safe
        ok = false;
        continue;
      }
      net_id n = net_of(r);
      ok = ok && n != no_id;
      e.nets.push_back(n);
    }
    return ok;
  };

  step_spec cur;
  std::vector<std::string> labels;
  bool closed_any = false;
  std::size_t cur_inputs =
      0;  // at/after/clock actions in cur (rules, properties and gauges are not inputs)
  source_loc first_input;
  // A lower bound of the time the stimulus has reached (settle steps take at
  // least no time, `run T` exactly T): an `at` before it is an error.
  time_fs reached = 0, step_first = 0;
  bool step_has_first = false;
  constexpr time_fs last_time = UINT64_MAX - 1;
  auto add_sat = [&](time_fs a, time_fs b) { return a > last_time - b ? last_time : a + b; };
  auto close = [&](step_spec::end_kind end, source_loc loc) {
    cur.end = end;
    cur.loc = loc;
    if (labels.empty()) {
      cur.label = "settle";
    } else {
      cur.label = labels[0];
      for (std::size_t i = 1; i < labels.size(); ++i) cur.label += "; " + labels[i];
    }
    out.steps.push_back(std::move(cur));
    cur = step_spec{};
    labels.clear();
    closed_any = true;
    cur_inputs = 0;
    step_has_first = false;
  };
  auto expect_target = [&](const stim_stmt& s) -> step_spec* {
    if (!closed_any) {
      rep.error(s.loc, "'expect' must follow a 'settle' or 'run' that ends a step");
      return nullptr;
    }
    if (cur_inputs) {
      rep.error(s.loc, "'expect' follows input changes that no 'settle' or 'run' has ended yet");
      return nullptr;
    }
    return &out.steps.back();
  };

  // Appends `item` (a rule, property or gauge) to `list` and to the step an
  // action that refers to it by index, at the item's place in the file.
  auto append = [&](stim_action::kind what, auto& list, auto&& item) {
    stim_action a;
    a.what = what;
    a.index = static_cast<std::uint32_t>(list.size());
    a.loc = item.loc;
    list.push_back(std::forward<decltype(item)>(item));
    cur.actions.push_back(std::move(a));
  };

  for (const auto& s : sb.stmts) {
    using k = stim_stmt::kind;
    switch (s.what) {
      case k::at:
      case k::after: {
        stim_action a;
        a.what = s.what == k::at ? stim_action::kind::at : stim_action::kind::after;
        a.time = s.time;
        a.loc = s.loc;
        a.time_loc = s.time_loc;
        if (s.what == k::at) {
          if (s.time < reached)
            rep.error(
                s.time_loc,
                fmt::format("'at {}' is earlier than {}, a time the stimulus has already reached",
                            format_time(s.time), format_time(reached)));
          reached = std::max(reached, s.time);
          a.source_line = rep.line_text(s.time_loc.line);
        } else {
          reached = add_sat(reached, s.time);
        }
        if (!step_has_first) step_first = reached, step_has_first = true;
        bool ok = true;
        for (std::size_t i = 0; i < s.nets.size(); ++i) {
          net_id n = input_of(s.nets[i]);
          ok = ok && n != no_id;
          a.assigns.push_back({n, s.values[i]});
        }
        if (ok) {
          cur.actions.push_back(std::move(a));
          if (!cur_inputs++) first_input = s.loc;
        }
        labels.push_back(s.text);
        break;
      }
      case k::clock: {
        net_id n = input_of(s.nets[0]);
        stim_action a;
        a.what = stim_action::kind::clock;
        a.loc = s.loc;
        a.clock = clock_spec{n, s.time, s.has_time2 ? s.time2 : s.time / 2, s.cycles};
        if (s.has_at) {
          a.anchored = true;
          a.time = s.at;
          a.time_loc = s.at_loc;
          a.source_line = rep.line_text(s.at_loc.line);
          if (s.at < reached)
            rep.error(
                s.at_loc,
                fmt::format("'at {}' is earlier than {}, a time the stimulus has already reached",
                            format_time(s.at), format_time(reached)));
        }
        if (!step_has_first) step_first = reached, step_has_first = true;
        if (!s.has_time2 && a.clock.high == 0)
          rep.error(s.loc, "a clock period of 1fs has no room for a high phase");
        else if (n != no_id) {
          cur.actions.push_back(std::move(a));
          if (!cur_inputs++) first_input = s.loc;
        }
        labels.push_back(s.text);
        break;
      }
      case k::settle: {
        bool within = s.has_time;
        close(step_spec::end_kind::settle, s.loc);
        if (within) {
          out.steps.back().expects.push_back(make_expect(expectation::kind::within, 0, "", s.loc));
          out.steps.back().expects.back().hi = s.time;
        }
        break;
      }
      case k::run:
        reached = add_sat(step_has_first ? step_first : reached, s.time);
        cur.run_for = s.time;
        close(step_spec::end_kind::run, s.loc);
        break;
      case k::when: {
        reaction_rule rule;
        rule.loc = s.loc;
        rule.text = s.text;
        rule.times = s.count;
        rule.delay = s.has_time ? s.range : delay_range{};
        bool ok = expr_of(s, rule.condition);
        for (std::size_t i = 0; i < s.nets.size(); ++i) {
          net_id n = input_of(s.nets[i]);
          ok = ok && n != no_id;
          rule.assigns.push_back({n, s.values[i]});
        }
        if (!ok) break;
        append(stim_action::kind::rule, out.rules, std::move(rule));
        break;
      }
      case k::property: {
        property p;
        p.loc = s.loc;
        p.text = s.text;
        p.what = s.word == "always"  ? property::kind::always
                 : s.word == "never" ? property::kind::never
                 : s.word == "rises" ? property::kind::never_rises_while
                                     : property::kind::never_falls_while;
        bool ok = expr_of(s, p.expr);
        if (!s.nets.empty()) {
          p.net = net_of(s.nets[0]);
          ok = ok && p.net != no_id;
          p.nets.push_back(p.net);
        }
        if (!ok) break;
        for (net_id n : p.expr.nets)
          if (std::find(p.nets.begin(), p.nets.end(), n) == p.nets.end()) p.nets.push_back(n);
        append(stim_action::kind::property, out.properties, std::move(p));
        break;
      }
      case k::gauge: {
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
          net_id n = net_of(r);
          ok = ok && n != no_id;
          g.nets.push_back(n);
        }
        auto dup = std::find_if(out.gauges.begin(), out.gauges.end(),
                                [&](const gauge& o) { return o.name == g.name; });
        if (dup != out.gauges.end()) {
          rep.error(s.name.loc,
                    fmt::format("gauge '{}' is already defined on line {}", g.name, dup->loc.line));
          ok = false;
        }
        if (!ok) break;
        append(stim_action::kind::gauge, out.gauges, std::move(g));
        break;
      }
      case k::expect_gauge: {
        auto* st = expect_target(s);
        auto g = std::find_if(out.gauges.begin(), out.gauges.end(),
                              [&](const gauge& o) { return o.name == s.name.name; });
        if (g == out.gauges.end()) {
          rep.error(
              s.name.loc,
              fmt::format("unknown gauge '{}'; a gauge is defined with 'gauge {} = ...' before the "
                          "expect",
                          s.name.name, s.name.name));
          break;
        }
        if (!st) break;
        expectation e =
            make_expect(expectation::kind::gauge, 0, std::string(s.name.name), s.name.loc);
        e.gauge = static_cast<std::uint32_t>(g - out.gauges.begin());
        e.lo = s.range.min;
        e.hi = s.range.max;
        st->expects.push_back(e);
        break;
      }
      case k::watch:
        for (auto& r : s.nets)
          if (net_id n = net_of(r); n != no_id) out.watch.push_back(n);
        break;
      case k::expect_value: {
        auto* st = expect_target(s);
        for (std::size_t i = 0; i < s.nets.size(); ++i) {
          net_id n = net_of(s.nets[i]);
          if (st && n != no_id) {
            st->expects.push_back(make_expect(expectation::kind::value, n,
                                              std::string(s.nets[i].name), s.nets[i].loc));
            st->expects.back().want = s.values[i];
          }
        }
        break;
      }
      case k::expect_no_glitch: {
        auto* st = expect_target(s);
        for (auto& r : s.nets) {
          net_id n = net_of(r);
          if (st && n != no_id)
            st->expects.push_back(
                make_expect(expectation::kind::no_glitch, n, std::string(r.name), r.loc));
        }
        break;
      }
      case k::expect_stable:
      case k::expect_deterministic:
      case k::expect_within:
      case k::expect_oscillating: {
        auto* st = expect_target(s);
        if (!st) break;
        expectation e = make_expect(expectation::kind::stable, 0, "", s.loc);
        e.what = s.what == k::expect_stable          ? expectation::kind::stable
                 : s.what == k::expect_deterministic ? expectation::kind::deterministic
                 : s.what == k::expect_within        ? expectation::kind::within
                                                     : expectation::kind::oscillating;
        if (s.what == k::expect_within) e.hi = s.time;
        if (s.what == k::expect_oscillating && s.has_time)
          e.lo = s.time, e.hi = s.time2, e.has_range = true;
        st->expects.push_back(e);
        break;
      }
    }
  }
  if (cur_inputs) {
    rep.warning(first_input,
                "input changes after the last settle or run: an implicit settle ends them");
    close(step_spec::end_kind::settle, sb.close_loc);
  } else if (!cur.actions.empty()) {
    // Rules, properties or gauges with no step after them: an implicit settle
    // gives them one (said aloud when earlier steps exist).
    if (closed_any)
      rep.warning(cur.actions.front().loc,
                  "reaction rules, properties or gauges after the last settle or run: an implicit "
                  "settle ends them");
    close(step_spec::end_kind::settle, sb.close_loc);
  }
}

}  // namespace settle::ir
