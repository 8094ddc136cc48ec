// The stimulus driver: steps of input changes over a kernel, with settle,
// oscillation and timeout verdicts and expectation checks. A template over the
// kernel so the timed kernel and the interval (min-max) kernel share it.
#pragma once

#include <algorithm>
#include <limits>

#include <fmt/format.h>

#include "sim/kernel.hpp"
#include "sim/simulator.hpp"
#include "sim/time.hpp"

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
  /// `sim` must be freshly reset.
  driver(Sim& sim, const design& d, const run_options& opt) : d_(d), sim_(sim), opt_(opt) {
    const time_fs m = d.nets.largest_max_delay();
    horizon_ = opt.horizon ? opt.horizon : std::max<time_fs>(checked_mul(m, 10000).value_or(time_last), one_ns);
    auto report = [&](net_id n) {
      if (std::find(result_.reported.begin(), result_.reported.end(), n) == result_.reported.end())
        result_.reported.push_back(n);
    };
    for (net_id n : d.nets.outputs) report(n);
    for (net_id n : d.stim.watch) report(n);
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
      for (std::size_t i = 0; i < d_.stim.steps.size() && !stopped_; ++i) run_step(d_.stim.steps[i], i + 1);
    }
    result_.events = sim_.events();
    result_.end = ref_;
    sim_.finish(ref_);
    return std::move(result_);
  }

 private:
  time_fs next_clock_edge() const {
    time_fs t = never;
    for (const auto& c : clocks_) t = std::min(t, c.next);
    return t;
  }

  // Clock phases relative to now, part of the full state for repeat detection.
  void clock_state_words(std::vector<std::uint64_t>& out) const {
    out.clear();
    for (const auto& c : clocks_)
      out.insert(out.end(), {c.next - sim_.now(), static_cast<std::uint64_t>(c.next_value), c.edges_left});
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
    return std::any_of(clocks_.begin(), clocks_.end(), [](const clock_state& c) { return c.past_end; });
  }

  // --max-events reached, or the caller asked to stop.
  bool limited() const {
    return (opt_.max_events && sim_.events() >= opt_.max_events) ||
           (opt_.stop && opt_.stop->load(std::memory_order_relaxed));
  }

  void run_step(const step_spec& spec, std::size_t index) {
    step_result r;
    r.index = index;
    r.label = spec.label;
    // Lay out the step's input changes in time.
    pending_.clear();
    time_fs cursor = ref_;
    bool first = true;
    time_fs start = ref_;
    for (const auto& a : spec.actions) {
      time_fs t = cursor;
      // An instant past the end of representable time stays `never`.
      if (a.what == stim_action::kind::at) t = std::max(a.time, sim_.now());
      else if (a.what == stim_action::kind::after) t = checked_add(cursor, a.time).value_or(never);
      cursor = t;
      if (first) start = t, first = false;
      if (a.what == stim_action::kind::clock) {
        clock_starts_.push_back({t, a.clock});
        continue;
      }
      for (const auto& as : a.assigns) pending_.push_back({t, as});
    }
    std::stable_sort(pending_.begin(), pending_.end(),
                     [](const timed_input& x, const timed_input& y) { return x.time < y.time; });
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
    std::size_t next_input = 0;
    // Brent's cycle detection over instants once every input of the step is
    // in. Most steps settle within a few instants, so detection starts only
    // after `warmup` of them: a snapshot (and turning the hash on) costs
    // O(nets) while an instant costs a few events, so the warm-up grows with
    // the design (a quarter of its nets) to keep detection a small share of a
    // step that settles; in s38417's clocked runs with random delays it was
    // two thirds of the time at a fixed 128.
    const std::uint64_t warmup = std::max<std::uint64_t>(128, sim_.values().size() / 4);
    std::uint64_t settling = 0;
    state_snapshot snap;
    bool have_snap = false;
    std::uint64_t power = 1, lambda = 0;
    std::vector<std::uint64_t> extra;
    std::vector<assignment> inputs;
    r.status = step_status::settled;
    r.end = start;

    for (;;) {
      // Clocks declared in this step start at their reference time.
      time_fs outside = next_clock_edge();  // the next instant that brings inputs
      if (next_input < pending_.size()) outside = std::min(outside, pending_[next_input].time);
      for (const auto& [at, spec_c] : clock_starts_) outside = std::min(outside, at);
      time_fs t = sim_.next_event_time();
      if (t < outside && t <= last_instant) {
        // Instants of gate events alone go to the kernel in a batch, until
        // repeat detection is due: it starts once the step's inputs are all
        // in and `warmup` instants have passed. Batches stay short enough for
        // the stop flag to be seen promptly.
        const bool counting = settle_step && next_input == pending_.size() && clock_starts_.empty();
        const std::uint64_t budget = !counting ? 4096 : settling + 1 < warmup ? warmup - 1 - settling : 0;
        if (budget) {
          const std::uint64_t n = sim_.run_quiet(std::min(last_instant, outside - 1), budget, opt_.max_events);
          if (counting) settling += n;
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
      const bool past_end = t == never && (next_input < pending_.size() || !clock_starts_.empty() || clock_past_end());
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
        if (it->first == t) start_clock(it->second, t), it = clock_starts_.erase(it);
        else ++it;
      }
      while (next_input < pending_.size() && pending_[next_input].time == t) {
        stop_clock(pending_[next_input].a.net);
        inputs.push_back(pending_[next_input++].a);
      }
      if (!clocks_.empty()) clock_edges_at(t, inputs);
      sim_.process_instant(t, inputs);
      if (limited()) {
        r.status = step_status::event_limit;
        r.end = t;
        stopped_ = true;
        break;
      }
      if (!settle_step || next_input < pending_.size() || !clock_starts_.empty()) continue;
      if (++settling < warmup) continue;
      if (settling == warmup) sim_.track_state(true);
      clock_state_words(extra);
      if (have_snap && sim_.hash() == snap.hash && sim_.same_state(snap, extra)) {
        r.status = step_status::oscillating;
        r.period = t - snap.time;
        r.end = t;
        for (net_id n = 2; n < snap.toggles.size(); ++n)
          if (sim_.toggle_count(n) != snap.toggles[n]) r.toggling.push_back(n);
        break;
      }
      if (!have_snap || ++lambda == power) {
        sim_.snapshot(snap, extra);
        have_snap = true;
        if (lambda == power) power *= 2;
        lambda = 0;
      }
    }

    if (settling >= warmup) sim_.track_state(false);
    const time_fs last = sim_.last_change();
    r.settle = last > change_before && last >= start ? last - start : 0;
    if (r.status == step_status::settled) r.end = start + r.settle;
    if (r.status == step_status::running && sim_.quiet() && pending_.size() == next_input && clocks_.empty())
      r.status = step_status::settled;
    for (std::size_t i = 0; i < result_.reported.size(); ++i) {
      r.values.push_back(sim_.values()[result_.reported[i]]);
      r.transitions.push_back(sim_.toggle_count(result_.reported[i]) - tog_start[i]);
    }
    check_expectations(spec, r, glitch_tog, glitch_start);
    ref_ = r.end;
    result_.steps.push_back(std::move(r));
  }

  // The step cannot go on without passing the end of representable time: a
  // timeout that says so, and the run stops (nothing after it is reachable).
  void end_of_time(step_result& r, time_fs at) {
    r.status = step_status::timeout;
    r.end_of_time = true;
    r.end = std::max(at, r.start);
    stopped_ = true;
  }

  void check_expectations(const step_spec& spec, step_result& r, const std::vector<std::uint32_t>& glitch_tog,
                          const std::vector<logic>& glitch_start) {
    std::size_t glitch_i = 0;
    for (const auto& e : spec.expects) {
      expect_result x;
      x.spec = &e;
      switch (e.what) {
        case expectation::kind::value:
          x.got = sim_.values()[e.net];
          x.pass = x.got == e.want;
          if (!x.pass) x.detail = fmt::format("{} is {}, expected {}", e.ref, to_char(x.got), to_char(e.want));
          break;
        case expectation::kind::stable:
          x.pass = r.status == step_status::settled;
          if (!x.pass) x.detail = fmt::format("step is {}, expected settled", status_name(r.status));
          break;
        case expectation::kind::oscillating:
          x.pass = r.status == step_status::oscillating && (!e.has_range || (r.period >= e.lo && r.period <= e.hi));
          if (!x.pass)
            x.detail = r.status != step_status::oscillating
                           ? fmt::format("step is {}, expected oscillating", status_name(r.status))
                           : fmt::format("period {} outside {}..{}", format_time(r.period), format_time(e.lo),
                                         format_time(e.hi));
          break;
        case expectation::kind::within:
          x.pass = r.status == step_status::settled && r.settle <= e.hi;
          if (!x.pass)
            x.detail = r.status != step_status::settled
                           ? fmt::format("step is {}, expected to settle within {}", status_name(r.status),
                                         format_time(e.hi))
                           : fmt::format("settled after {}, budget {}", format_time(r.settle), format_time(e.hi));
          break;
        case expectation::kind::no_glitch: {
          const auto toggles = sim_.toggle_count(e.net) - glitch_tog[glitch_i];
          const std::uint32_t needed = sim_.values()[e.net] != glitch_start[glitch_i] ? 1 : 0;
          ++glitch_i;
          x.got = sim_.values()[e.net];
          x.pass = toggles <= needed;
          if (!x.pass) x.detail = fmt::format("{} changed {} times, its net change needs {}", e.ref, toggles, needed);
          break;
        }
        case expectation::kind::deterministic:
          // One corner cannot diverge from itself; sweeps judge this across corners.
          x.pass = true;
          break;
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
};

}  // namespace settle::detail
