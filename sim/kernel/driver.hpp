// The stimulus driver: steps of input changes over a kernel, with settle,
// oscillation and timeout verdicts and expectation checks. A template over the
// kernel so the timed kernel and the interval (min-max) kernel share it.
#pragma once

#include <fmt/format.h>

#include <algorithm>
#include <limits>

#include "sim/kernel/repeat_detector.hpp"
#include "sim/kernel/run.hpp"
#include "sim/kernel/simulator.hpp"
#include "sim/model/time.hpp"

namespace settle::detail {

// Also the time of an input change or clock edge past the end of representable time.
inline constexpr time_fs never = time_never;
inline constexpr time_fs one_ns = 1'000'000;

struct timed_input {
  time_fs time;
  assignment a;
};

// A free-running input: rises at `rise`, falls `high` later, every `period`.
struct clock_state {
  clock_spec spec;
  time_fs next = never;
  logic next_value = logic::one;
  time_fs rise = 0;
  std::uint64_t edges_left = 0;  // UINT64_MAX: forever
  bool past_end = false;         // its next edge lies past the end of representable time
};

template <class Sim>
class driver {
 public:
  /// `sim` must be freshly reset. `delays` is the run's table (reaction
  /// rules draw their delays from its corner); null: rules take typ.
  driver(Sim& sim, const design& d, const run_options& opt, const delay_table* delays = nullptr)
      : d_(d), sim_(sim), opt_(opt), delays_(delays) {
    horizon_ = opt.horizon ? opt.horizon : default_horizon(d.nets);
    auto report = [&](net_id n) {
      if (std::find(result_.reported.begin(), result_.reported.end(), n) == result_.reported.end())
        result_.reported.push_back(n);
    };
    for (net_id n : d.nets.outputs) report(n);
    for (net_id n : d.stim.watch) report(n);
    rules_.resize(d.stim.rules.size());
    props_.resize(d.stim.properties.size());
    gauges_.resize(d.stim.gauges.size());
    // Under random: and gauss: corners every firing draws its own delay, so a
    // repeated state does not repeat the future: the firing counts join the
    // state and such a loop is never called periodic.
    draws_ = delays && (delays->which.what == corner::kind::random ||
                        delays->which.what == corner::kind::gauss);
  }

  run_result run() {
    // No instant after this one is processed: whatever it schedules, at most
    // the longest delay later, still falls at or before time_last. Checked
    // here, once per run, so the kernel's per-event path never needs to.
    ceiling_ = last_safe_instant(sim_.largest_delay());
    static const step_spec initial = [] {
      step_spec s;
      s.label = "initial";
      return s;
    }();
    if (d_.stim.steps.empty()) {
      run_step(initial, 1);
    } else {
      for (std::size_t i = 0; i < d_.stim.steps.size() && !stopped_; ++i)
        run_step(d_.stim.steps[i], i + 1);
    }
    result_.events = sim_.events();
    result_.end = ref_;
    sim_.finish(ref_);
    for (std::uint32_t i = 0; i < props_.size(); ++i) {
      props_[i].result.property = i;
      result_.properties.push_back(std::move(props_[i].result));
    }
    for (std::uint32_t i = 0; i < gauges_.size(); ++i) {
      const auto& g = gauges_[i];
      gauge_result x;
      x.gauge = i;
      x.count = g.count;
      if (g.count)
        x.min = g.min, x.max = g.max,
        x.mean = static_cast<double>(g.sum) / static_cast<double>(g.count);
      result_.gauges.push_back(x);
    }
    return std::move(result_);
  }

 private:
  time_fs next_clock_edge() const {
    time_fs t = never;
    for (const auto& c : clocks_) t = std::min(t, c.next);
    return t;
  }

  // Clock phases relative to now, part of the full state for repeat detection.
  // Pending firings and bounded rules' counts too: they decide what the
  // environment does next.
  void clock_state_words(std::vector<std::uint64_t>& out) const {
    out.clear();
    for (const auto& c : clocks_)
      out.insert(out.end(),
                 {c.next - sim_.now(), static_cast<std::uint64_t>(c.next_value), c.edges_left});
    for (const auto& f : firings_) out.insert(out.end(), {f.time - sim_.now(), f.rule});
    for (std::size_t i = 0; i < rules_.size(); ++i) {
      const auto& st = rules_[i];
      if (!st.active) continue;
      out.insert(out.end(), {i, static_cast<std::uint64_t>(st.last)});
      if (d_.stim.rules[i].times || draws_) {
        out.insert(out.end(), {st.scheduled, st.fired});
      } else if (delays_) {
        // A fixed: corner's list of firing delays: the firing number matters
        // until the last entry, which every later firing takes.
        const auto listed = fixed_rule_firings(delays_->which, static_cast<std::uint32_t>(i));
        if (listed > 1) out.push_back(std::min<std::uint64_t>(st.scheduled, listed - 1));
      }
    }
  }

  void stop_clock(net_id net) {
    std::erase_if(clocks_, [&](const clock_state& c) { return c.spec.net == net; });
  }

  void start_clock(const clock_spec& spec, time_fs at) {
    stop_clock(spec.net);
    clock_state c;
    c.spec = spec;
    c.next = c.rise = at;
    constexpr std::uint64_t forever = std::numeric_limits<std::uint64_t>::max();
    // More cycles than 2^63 outlast representable time: the same as forever.
    c.edges_left = spec.cycles && spec.cycles < forever / 2 ? spec.cycles * 2 : forever;
    clocks_.push_back(c);
  }

  // Collects the clock edges due at t and advances those clocks.
  void clock_edges_at(time_fs t, std::vector<assignment>& out) {
    for (auto& c : clocks_) {
      if (c.next != t) continue;
      out.push_back({c.spec.net, c.next_value});
      if (c.edges_left != std::numeric_limits<std::uint64_t>::max()) --c.edges_left;
      std::optional<time_fs> next;
      if (c.next_value == logic::one) {
        next = checked_add(c.rise, c.spec.high);
        c.next_value = logic::zero;
      } else {
        next = checked_add(c.rise, c.spec.period);
        if (next) c.rise = *next;
        c.next_value = logic::one;
      }
      c.next = next.value_or(never);
      c.past_end = !next && c.edges_left != 0;
      if (c.edges_left == 0) c.next = never;
    }
    std::erase_if(clocks_, [](const clock_state& c) { return c.next == never && !c.past_end; });
  }

  bool clock_past_end() const {
    return std::any_of(clocks_.begin(), clocks_.end(),
                       [](const clock_state& c) { return c.past_end; });
  }

  // --max-events reached, or the caller asked to stop.
  bool limited() const {
    return (opt_.max_events && sim_.events() >= opt_.max_events) ||
           (opt_.stop && opt_.stop->load(std::memory_order_relaxed));
  }

  // Lays the step's actions out in time: its input changes in pending_ (in
  // time order), its activations in acts_ and its clocks in clock_starts_.
  // Returns the step's start, or nullopt when an `at` lies before the time
  // the stimulus has already reached: result_.error says so and the run stops.
  std::optional<time_fs> lay_out(const step_spec& spec) {
    pending_.clear();
    time_fs cursor = ref_;
    bool first = true;
    time_fs start = ref_;
    acts_.clear();
    next_act_ = 0;
    for (const auto& a : spec.actions) {
      time_fs t = cursor;
      const bool absolute =
          a.what == stim_action::kind::at || (a.what == stim_action::kind::clock && a.anchored);
      if (absolute && cursor != never && a.time < std::max(cursor, sim_.now())) {
        // Applied late it would run a different stimulus than written.
        diagnostic dg;
        dg.file = d_.stim.file;
        dg.line = a.time_loc.line;
        dg.col = a.time_loc.col;
        dg.message =
            fmt::format("'at {}' is earlier than {}, the time the stimulus has already reached",
                        format_time(a.time), format_time(std::max(cursor, sim_.now())));
        set_source_line(dg, a.source_line);
        result_.error = std::move(dg);
        stopped_ = true;
        return std::nullopt;
      }
      if (a.what == stim_action::kind::at)
        t = a.time;
      else if (a.what == stim_action::kind::after)
        t = checked_add(cursor, a.time).value_or(never);  // past the end: never
      if (a.what == stim_action::kind::rule || a.what == stim_action::kind::property ||
          a.what == stim_action::kind::gauge) {
        acts_.push_back({t, &a});
        if (first) start = t, first = false;
        continue;
      }
      if (a.what == stim_action::kind::clock) {
        if (first) start = t, first = false;
        clock_starts_.push_back({a.anchored ? a.time : t, a.clock});
        continue;
      }
      cursor = t;
      if (first) start = t, first = false;
      for (const auto& as : a.assigns) pending_.push_back({t, as});
    }
    std::stable_sort(pending_.begin(), pending_.end(),
                     [](const timed_input& x, const timed_input& y) { return x.time < y.time; });
    return start;
  }

  void run_step(const step_spec& spec, std::size_t index) {
    step_result r;
    r.index = index;
    r.label = spec.label;
    for (auto& g : gauges_) g.step_begin();  // gauge expectations judge this step's samples
    const std::optional<time_fs> laid = lay_out(spec);
    if (!laid) return;
    const time_fs start = *laid;
    r.start = std::min(start, time_last);

    // What the step's expectations and report need counted from its start.
    const auto& vals = sim_.values();
    for (net_id n : result_.reported) r.start_values.push_back(vals[n]);
    std::vector<std::uint32_t> tog_start;
    for (net_id n : result_.reported) tog_start.push_back(sim_.toggle_count(n));
    std::vector<std::uint32_t> glitch_tog;
    std::vector<logic> glitch_start;
    for (const auto& e : spec.expects)
      if (e.what == expectation::kind::no_glitch)
        glitch_tog.push_back(sim_.toggle_count(e.net)), glitch_start.push_back(vals[e.net]);

    const bool settle_step = spec.end == step_spec::end_kind::settle;
    // The step's limit, and the last instant it may process: a limit past
    // ceiling_ (or past the end of time) cannot be reached, and the step then
    // ends as a timeout at the end of representable time.
    const auto true_limit = checked_add(start, settle_step ? horizon_ : spec.run_for);
    const time_fs limit = true_limit.value_or(time_last);
    const time_fs last_instant = std::min(limit, ceiling_);
    const bool limit_unreachable = !true_limit || limit > ceiling_;
    const time_fs change_before = sim_.last_change();
    const std::uint64_t events_before = sim_.events();
    std::size_t next_input = 0;
    repeat_detector<Sim> detector(sim_);  // once every input of the step is in
    std::vector<std::uint64_t> extra;
    std::vector<assignment> inputs;
    r.status = step_status::settled;
    r.end = start;

    for (;;) {
      // Clocks declared in this step start at their reference time.
      time_fs outside = next_clock_edge();  // the next instant that brings inputs
      if (next_input < pending_.size()) outside = std::min(outside, pending_[next_input].time);
      for (const auto& [at, spec_c] : clock_starts_) outside = std::min(outside, at);
      if (!firings_.empty()) outside = std::min(outside, firings_.front().time);
      if (next_act_ < acts_.size()) outside = std::min(outside, acts_[next_act_].first);
      time_fs t = sim_.next_event_time();
      // With rules, properties or gauges active every instant is looked at.
      if (t < outside && t <= last_instant && !observing_) {
        // Instants of gate events alone go to the kernel in a batch, until
        // repeat detection is due: it starts once the step's inputs are all
        // in and its warm-up instants have passed. Batches stay short enough
        // for the stop flag to be seen promptly.
        const bool counting = settle_step && next_input == pending_.size() &&
                              clock_starts_.empty() && next_act_ == acts_.size();
        const std::uint64_t budget = counting ? detector.warmup_left() : 4096;
        if (budget) {
          const std::uint64_t n =
              sim_.run_quiet(std::min(last_instant, outside - 1), budget, opt_.max_events);
          if (counting) detector.count(n);
          if (limited()) {
            r.status = step_status::event_limit;
            r.end = sim_.now();
            stopped_ = true;
            break;
          }
          continue;
        }
      }
      t = std::min(t, outside);
      // An input change or clock edge lies past the end of representable
      // time: unreachable before the step's limit only if the limit is.
      const bool past_end =
          t == never && (next_input < pending_.size() || !clock_starts_.empty() ||
                         clock_past_end() || !firings_.empty() || next_act_ < acts_.size());
      if (past_end && limit_unreachable) {
        end_of_time(r, last_instant);
        break;
      }
      if (t == never && !past_end) {
        r.status = step_status::settled;
        break;
      }
      if (t > last_instant && limit_unreachable) {
        end_of_time(r, last_instant);
        break;
      }
      if (past_end || t > limit) {  // past_end: the limit comes first
        r.status = settle_step ? step_status::timeout : step_status::running;
        r.end = limit;
        break;
      }
      inputs.clear();
      for (auto it = clock_starts_.begin(); it != clock_starts_.end();) {
        if (it->first == t)
          start_clock(it->second, t), it = clock_starts_.erase(it);
        else
          ++it;
      }
      while (next_input < pending_.size() && pending_[next_input].time == t) {
        stop_clock(pending_[next_input].a.net);
        inputs.push_back(pending_[next_input++].a);
      }
      if (!clocks_.empty()) clock_edges_at(t, inputs);
      // The environment's firings due now, after the step's own changes.
      while (!firings_.empty() && firings_.front().time == t) {
        const firing f = firings_.front();
        firings_.erase(firings_.begin());
        ++rules_[f.rule].fired;
        for (const auto& as : d_.stim.rules[f.rule].assigns) {
          stop_clock(as.net);
          inputs.push_back(as);
        }
      }
      // Activations see the values before the instant, so a gauge or a
      // property declared before an input change at the same time sees it.
      while (next_act_ < acts_.size() && acts_[next_act_].first == t)
        activate(*acts_[next_act_++].second);
      sim_.process_instant(t, inputs);
      if (observing_) observe(t, index);
      if (limited()) {
        r.status = step_status::event_limit;
        r.end = t;
        stopped_ = true;
        break;
      }
      if (!settle_step || next_input < pending_.size() || !clock_starts_.empty() ||
          next_act_ < acts_.size())
        continue;
      if (!detector.due()) continue;
      clock_state_words(extra);
      if (detector.repeats(t, extra, r)) {
        r.status = step_status::oscillating;
        r.end = t;
        break;
      }
    }

    detector.finish();
    r.events = sim_.events() - events_before;
    const time_fs last = sim_.last_change();
    r.settle = last > change_before && last >= start ? last - start : 0;
    if (r.status == step_status::settled) r.end = start + r.settle;
    if (r.status == step_status::running && sim_.quiet() && pending_.size() == next_input &&
        clocks_.empty() && firings_.empty() && clock_starts_.empty())
      r.status = step_status::settled;
    // A `run T` window always advances by T.
    if (!settle_step && r.status != step_status::event_limit && !r.end_of_time) r.end = limit;
    // Quiet while the environment still owes firings: nothing can wake it.
    if (r.status == step_status::settled) {
      for (std::uint32_t i = 0; i < rules_.size(); ++i) {
        const auto& st = rules_[i];
        const auto& rule = d_.stim.rules[i];
        if (st.active && rule.times && st.fired < rule.times)
          r.owed.push_back(
              {i, st.fired, rule.times, eval_expr(rule.condition, sim_.values().data())});
      }
      if (!r.owed.empty()) r.status = step_status::deadlock;
    }
    // Activations the step did not reach (it stopped early) still take effect
    // for the steps after, at the end of this one.
    while (next_act_ < acts_.size()) activate(*acts_[next_act_++].second);
    for (std::size_t i = 0; i < result_.reported.size(); ++i) {
      r.values.push_back(sim_.values()[result_.reported[i]]);
      r.transitions.push_back(sim_.toggle_count(result_.reported[i]) - tog_start[i]);
    }
    if constexpr (requires { sim_.resolutions(); }) {
      const auto& all = sim_.resolutions();
      r.resolutions.assign(all.begin() + static_cast<std::ptrdiff_t>(resolved_before_), all.end());
      resolved_before_ = all.size();
    }
    check_expectations(spec, r, glitch_tog, glitch_start);
    if (!opt_.allow_x && r.status != step_status::oscillating)
      r.unknown = unknown_at_end(&spec, result_.reported, r.values);
    ref_ = r.end;
    result_.steps.push_back(std::move(r));
  }

  // ---- the closed-loop environment: reaction rules, properties, gauges
  struct firing {
    time_fs time;
    std::uint64_t seq;
    std::uint32_t rule;
  };
  struct rule_state {
    bool active = false;
    logic last = logic::x;  // the condition after the last instant looked at
    std::uint64_t scheduled = 0, fired = 0;
  };
  struct prop_state {
    bool active = false;
    logic last = logic::x;  // rises/falls: the watched net after the last instant looked at
    property_result result;
  };
  struct gauge_state {
    bool active = false;
    logic a = logic::x, b = logic::x;  // the nets after the last instant looked at
    time_fs mark = never;              // period: the last rise; pulse: the start of the pulse
    std::vector<time_fs> starts;       // latency: edges of the first net not yet paired
    std::uint64_t count = 0, step_count = 0;
    time_fs min = never, max = 0, step_min = never, step_max = 0;
    unsigned __int128 sum = 0;
    void sample(time_fs v) {
      ++count, ++step_count;
      min = std::min(min, v), max = std::max(max, v), sum += v;
      step_min = std::min(step_min, v), step_max = std::max(step_max, v);
    }
    void step_begin() { step_count = 0, step_min = never, step_max = 0; }
  };

  void watch_nets(const std::vector<net_id>& nets) {
    for (net_id n : nets)
      if (std::find(observed_.begin(), observed_.end(), n) == observed_.end())
        observed_.push_back(n), observed_last_.push_back(sim_.values()[n]);
  }

  void activate(const stim_action& a) {
    const auto& vals = sim_.values();
    observing_ = force_ = true;
    switch (a.what) {
      case stim_action::kind::rule: {
        auto& st = rules_[a.index];
        st.active = true;
        st.last = logic::x;  // so a condition already true at the rule's line triggers it
        watch_nets(d_.stim.rules[a.index].condition.nets);
        break;
      }
      case stim_action::kind::property: {
        auto& st = props_[a.index];
        st.active = true;
        st.last = vals[d_.stim.properties[a.index].net];
        watch_nets(d_.stim.properties[a.index].nets);
        break;
      }
      case stim_action::kind::gauge: {
        auto& st = gauges_[a.index];
        const auto& g = d_.stim.gauges[a.index];
        st.active = true;
        st.a = vals[g.nets[0]];
        st.b = vals[g.nets.back()];
        watch_nets(g.nets);
        break;
      }
      default:
        break;
    }
  }

  time_fs delay_of_rule(std::uint32_t i, std::uint64_t firing_no) const {
    const auto& r = d_.stim.rules[i].delay;
    return delays_ ? rule_delay(*delays_, r, i, firing_no) : r.typ;
  }

  void schedule_firing(time_fs t, std::uint32_t i) {
    auto& st = rules_[i];
    const firing f{checked_add(t, delay_of_rule(i, st.scheduled)).value_or(never), firing_seq_++,
                   i};
    ++st.scheduled;
    auto at =
        std::upper_bound(firings_.begin(), firings_.end(), f, [](const firing& x, const firing& y) {
          return x.time != y.time ? x.time < y.time : x.seq < y.seq;
        });
    firings_.insert(at, f);
  }

  static bool rises(logic before, logic after) {
    return before == logic::zero && after == logic::one;
  }
  static bool falls(logic before, logic after) {
    return before == logic::one && after == logic::zero;
  }

  // After the instant t (of step `step`): rules trigger, properties and
  // gauges look at the values after all of the instant's changes.
  void observe(time_fs t, std::size_t step) {
    const auto& vals = sim_.values();
    bool changed = force_;
    for (std::size_t i = 0; i < observed_.size(); ++i)
      if (vals[observed_[i]] != observed_last_[i])
        changed = true, observed_last_[i] = vals[observed_[i]];
    if (!changed) return;
    force_ = false;
    for (std::uint32_t i = 0; i < rules_.size(); ++i) {
      auto& st = rules_[i];
      if (!st.active) continue;
      const auto& rule = d_.stim.rules[i];
      const logic c = eval_expr(rule.condition, vals.data());
      if (c == logic::one && st.last != logic::one && (!rule.times || st.scheduled < rule.times))
        schedule_firing(t, i);
      st.last = c;
    }
    for (std::uint32_t i = 0; i < props_.size(); ++i) {
      auto& st = props_[i];
      if (!st.active) continue;
      const auto& p = d_.stim.properties[i];
      bool bad = false;
      switch (p.what) {
        case property::kind::always:
          bad = eval_expr(p.expr, vals.data()) == logic::zero;
          break;
        case property::kind::never:
          bad = eval_expr(p.expr, vals.data()) == logic::one;
          break;
        case property::kind::never_rises_while:
          bad = rises(st.last, vals[p.net]) && eval_expr(p.expr, vals.data()) == logic::one;
          break;
        case property::kind::never_falls_while:
          bad = falls(st.last, vals[p.net]) && eval_expr(p.expr, vals.data()) == logic::one;
          break;
      }
      st.last = vals[p.net];
      if (bad && st.result.holds) {
        st.result.holds = false;
        st.result.first_violation = t;
        st.result.step = step;
        for (net_id n : p.nets) st.result.values.emplace_back(n, vals[n]);
      }
    }
    for (std::uint32_t i = 0; i < gauges_.size(); ++i) {
      auto& st = gauges_[i];
      if (!st.active) continue;
      const auto& g = d_.stim.gauges[i];
      const logic a = vals[g.nets[0]], b = vals[g.nets.back()];
      switch (g.what) {
        case gauge::kind::period:
          if (rises(st.a, a)) {
            if (st.mark != never) st.sample(t - st.mark);
            st.mark = t;
          }
          break;
        case gauge::kind::pulse_high:
        case gauge::kind::pulse_low: {
          const bool high = g.what == gauge::kind::pulse_high;
          if (high ? rises(st.a, a) : falls(st.a, a))
            st.mark = t;
          else if ((high ? falls(st.a, a) : rises(st.a, a)) && st.mark != never)
            st.sample(t - st.mark), st.mark = never;
          else if (a == logic::x)
            st.mark = never;  // a pulse through x has no width
          break;
        }
        case gauge::kind::latency: {
          const bool from = g.from_rises ? rises(st.a, a) : falls(st.a, a);
          const bool to = g.to_rises ? rises(st.b, b) : falls(st.b, b);
          // Each edge of the first net pairs with the next edge of the
          // second; on one net and one edge the edge closes the earlier ones.
          const bool same = g.nets[0] == g.nets[1] && g.from_rises == g.to_rises;
          if (from && !same) st.starts.push_back(t);
          if (to) {
            for (time_fs s0 : st.starts) st.sample(t - s0);
            st.starts.clear();
          }
          if (from && same) st.starts.push_back(t);
          break;
        }
      }
      st.a = a, st.b = b;
    }
  }

  // The step cannot go on without passing the end of representable time: a
  // timeout that says so, and the run stops (nothing after it is reachable).
  void end_of_time(step_result& r, time_fs at) {
    r.status = step_status::timeout;
    r.end_of_time = true;
    r.end = std::max(at, r.start);
    stopped_ = true;
  }

  void check_expectations(const step_spec& spec, step_result& r,
                          const std::vector<std::uint32_t>& glitch_tog,
                          const std::vector<logic>& glitch_start) {
    std::size_t glitch_i = 0;
    for (const auto& e : spec.expects) {
      expect_result x;
      x.spec = &e;
      switch (e.what) {
        case expectation::kind::value:
          x.got = sim_.values()[e.net];
          x.pass = x.got == e.want;
          if (!x.pass)
            x.detail = fmt::format("{} is {}, expected {}", e.ref, to_char(x.got), to_char(e.want));
          break;
        case expectation::kind::stable:
          x.pass = r.status == step_status::settled;
          if (!x.pass)
            x.detail = fmt::format("step is {}, expected settled", status_name(r.status));
          break;
        case expectation::kind::oscillating:
          x.pass = r.status == step_status::oscillating &&
                   (!e.has_range || (r.period >= e.lo && r.period <= e.hi));
          if (!x.pass)
            x.detail = r.status != step_status::oscillating
                           ? fmt::format("step is {}, expected oscillating", status_name(r.status))
                           : fmt::format("period {} outside {}..{}", format_time(r.period),
                                         format_time(e.lo), format_time(e.hi));
          break;
        case expectation::kind::within:
          x.pass = r.status == step_status::settled && r.settle <= e.hi;
          if (!x.pass)
            x.detail = r.status != step_status::settled
                           ? fmt::format("step is {}, expected to settle within {}",
                                         status_name(r.status), format_time(e.hi))
                           : fmt::format("settled after {}, budget {}", format_time(r.settle),
                                         format_time(e.hi));
          break;
        case expectation::kind::no_glitch: {
          const auto toggles = sim_.toggle_count(e.net) - glitch_tog[glitch_i];
          const std::uint32_t needed = sim_.values()[e.net] != glitch_start[glitch_i] ? 1 : 0;
          ++glitch_i;
          x.got = sim_.values()[e.net];
          x.pass = toggles <= needed;
          if (!x.pass)
            x.detail =
                fmt::format("{} changed {} times, its net change needs {}", e.ref, toggles, needed);
          break;
        }
        case expectation::kind::deterministic:
          // One corner cannot diverge from itself; sweeps judge this across corners.
          x.pass = true;
          break;
        case expectation::kind::resolves: {
          // Every resolution of the element this step decided within T of
          // its first event; a step with none fails (nothing was shown).
          const auto* m = d_.nets.meta_of(d_.nets.driver[e.net]);
          std::size_t count = 0;
          time_fs longest = 0;
          for (const auto& res : r.resolutions)
            if (d_.nets.meta_of(res.gate) == m) ++count, longest = std::max(longest, res.time());
          x.pass = count && longest <= e.hi;
          if (!count)
            x.detail = fmt::format("{}'s element resolved nothing in this step", e.ref);
          else if (!x.pass)
            x.detail = fmt::format("{}'s element took {} to resolve (longest of {}), budget {}",
                                   e.ref, format_time(longest), count, format_time(e.hi));
          break;
        }
        case expectation::kind::gauge: {
          // Every sample the gauge took in this step lies inside; a step
          // with none fails (a gauge that never ticks proves nothing).
          const auto& g = gauges_[e.gauge];
          x.pass = g.step_count && g.step_min >= e.lo && g.step_max <= e.hi;
          if (!g.step_count)
            x.detail = fmt::format("{} took no sample in this step", e.ref);
          else if (!x.pass)
            x.detail = fmt::format("{} ranged {}..{} over {} samples, expected within {}..{}",
                                   e.ref, format_time(g.step_min), format_time(g.step_max),
                                   g.step_count, format_time(e.lo), format_time(e.hi));
          break;
        }
      }
      r.expects.push_back(std::move(x));
    }
  }

  const design& d_;
  Sim& sim_;
  run_options opt_;
  run_result result_;
  time_fs horizon_ = 0;
  time_fs ref_ = 0;
  time_fs ceiling_ = time_last;
  bool stopped_ = false;
  std::vector<timed_input> pending_;
  std::vector<std::pair<time_fs, clock_spec>> clock_starts_;
  std::vector<clock_state> clocks_;
  const delay_table* delays_ = nullptr;
  bool draws_ = false;      // rule delays drawn per firing (random:, gauss:)
  bool observing_ = false;  // some rule, property or gauge is active
  bool force_ = false;      // look at the next instant even if no observed net changed
  std::vector<std::pair<time_fs, const stim_action*>> acts_;  // this step's activations, in order
  std::size_t next_act_ = 0;
  std::vector<rule_state> rules_;
  std::vector<prop_state> props_;
  std::vector<gauge_state> gauges_;
  std::vector<firing> firings_;  // pending, by time then trigger order
  std::uint64_t firing_seq_ = 0;
  std::vector<net_id> observed_;
  std::vector<logic> observed_last_;
  std::size_t resolved_before_ = 0;  // resolutions the kernel reported before this step
};

}  // namespace settle::detail
