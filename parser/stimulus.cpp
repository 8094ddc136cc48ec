// Stimulus statements -> steps: actions up to each settle/run, expectations attached to the step before them.
#include <fmt/format.h>

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
      rep.error(r.loc, fmt::format("'{}' is not an input; the stimulus drives inputs only", r.name));
      return no_id;
    }
    return n;
  };

  step_spec cur;
  std::vector<std::string> labels;
  bool closed_any = false;
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
  };
  auto expect_target = [&](const stim_stmt& s) -> step_spec* {
    if (!closed_any) {
      rep.error(s.loc, "'expect' must follow a 'settle' or 'run' that ends a step");
      return nullptr;
    }
    if (!cur.actions.empty()) {
      rep.error(s.loc, "'expect' follows input changes that no 'settle' or 'run' has ended yet");
      return nullptr;
    }
    return &out.steps.back();
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
        bool ok = true;
        for (std::size_t i = 0; i < s.nets.size(); ++i) {
          net_id n = input_of(s.nets[i]);
          ok = ok && n != no_id;
          a.assigns.push_back({n, s.values[i]});
        }
        if (ok) cur.actions.push_back(std::move(a));
        labels.push_back(s.text);
        break;
      }
      case k::clock: {
        net_id n = input_of(s.nets[0]);
        stim_action a;
        a.what = stim_action::kind::clock;
        a.loc = s.loc;
        a.clock = clock_spec{n, s.time, s.has_time2 ? s.time2 : s.time / 2, s.cycles};
        if (!s.has_time2 && a.clock.high == 0)
          rep.error(s.loc, "a clock period of 1fs has no room for a high phase");
        else if (n != no_id)
          cur.actions.push_back(std::move(a));
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
        cur.run_for = s.time;
        close(step_spec::end_kind::run, s.loc);
        break;
      case k::watch:
        for (auto& r : s.nets)
          if (net_id n = net_of(r); n != no_id) out.watch.push_back(n);
        break;
      case k::expect_value: {
        auto* st = expect_target(s);
        for (std::size_t i = 0; i < s.nets.size(); ++i) {
          net_id n = net_of(s.nets[i]);
          if (st && n != no_id)
{
            st->expects.push_back(make_expect(expectation::kind::value, n, std::string(s.nets[i].name), s.nets[i].loc));
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
            st->expects.push_back(make_expect(expectation::kind::no_glitch, n, std::string(r.name), r.loc));
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
        if (s.what == k::expect_oscillating && s.has_time) e.lo = s.time, e.hi = s.time2, e.has_range = true;
        st->expects.push_back(e);
        break;
      }
    }
  }
  if (!cur.actions.empty()) {
    rep.warning(cur.actions.front().loc, "input changes after the last settle or run: an implicit settle ends them");
    close(step_spec::end_kind::settle, sb.close_loc);
  }
}

}  // namespace settle::ir
