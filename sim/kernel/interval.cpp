// Min-max ambiguity simulation (Breuer and Friedman 1976; Abramovici, Breuer
// and Friedman 1990, ch. 3): one ternary run that covers every corner.
//
// Each gate's ternary evaluation E is followed through time. For each binary
// value v, a "run" is a maximal interval in which E stays in {v, x}: only
// there can a corner's own evaluation sit at v. Two kinds of output change:
//   join v at s + dmin (s = start of a run of v):  O <- lub(O, v)
//     the earliest moment any corner's output can move to v; for inertial
//     gates only if the run is still alive then (a corner's output moves to v
//     at t only if its evaluation was v on [t - d, t], d >= dmin);
//   set e at t0 + dmax (t0 = start of a stretch where E = e):  O <- e
//     only if E still equals e then: every corner's output is e at that time
//     (an inertial change to e scheduled by t0 has matured and nothing cancels
//     it; a transport gate shows its evaluation at t - d, inside the stretch).
// Sets and joins are the only changes, so O covers every corner at all times.
// dmin and dmax span both edges (sound, slightly pessimistic with rise != fall).
#include "sim/kernel/interval.hpp"

#include <algorithm>

#include "sim/kernel/driver.hpp"
#include "sim/kernel/eval.hpp"

namespace settle {
namespace {

// One pending output change of the interval kernel.
struct ambiguous_event {
  time_fs time;
  std::uint64_t seq;  // insertion order: ties resolve deterministically
  gate_id gate;
  logic value;
  bool set;          // true: O <- value; false: O <- lub(O, value) (a join)
  std::uint32_t id;  // the stretch (set) or run (join) it belongs to
  bool operator>(const ambiguous_event& o) const {
    return time != o.time ? time > o.time : set != o.set ? !set : seq > o.seq;
  }
};

std::uint64_t mix64(std::uint64_t z) {
  z += 0x9e3779b97f4a7c15ull;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
  return z ^ (z >> 31);
}

class interval_kernel {
 public:
  explicit interval_kernel(const netlist& n) : n_(n) {
    val_ = n.init;
    eval_.assign(n.gate_count(), static_cast<logic>(3));
    stretch_.assign(n.gate_count(), 0);
    run_.assign(2 * n.gate_count(), 0);
    alive_.assign(2 * n.gate_count(), 0);
    toggles_.assign(n.net_count(), 0);
    mark_.assign(n.gate_count(), 0);
    dmin_.resize(n.gate_count());
    dmax_.resize(n.gate_count());
    for (gate_id g = 0; g < n.gate_count(); ++g) {
      dmin_[g] = std::min(n.delay[g].rise.min, n.delay[g].fall.min);
      dmax_[g] = std::max(n.delay[g].rise.max, n.delay[g].fall.max);
      largest_ = std::max(largest_, dmax_[g]);
    }
    for (net_id i = 0; i < val_.size(); ++i) hash_ ^= key(i, val_[i]);
  }

  time_fs next_event_time() {
    if (eval_all_) return now_;
    while (!heap_.empty() && !live(heap_.front())) pop();
    return heap_.empty() ? detail::never : heap_.front().time;
  }

  void process_instant(time_fs t, std::span<const assignment> inputs) {
    now_ = t;
    ++stamp_;
    dirty_.clear();
    // Output changes due now: sets first, then joins (the heap orders them so).
    while (!heap_.empty() && heap_.front().time == t) {
      ambiguous_event e = heap_.front();
      pop();
      if (!live(e)) continue;
      const net_id out = n_.gate_out[e.gate];
      apply(out, e.set ? e.value : lub(val_[out], e.value), t);
    }
    for (const auto& a : inputs) apply(a.net, a.value, t);
    if (eval_all_) {
      eval_all_ = false;
      for (gate_id g = 0; g < n_.gate_count(); ++g) evaluate(g, t);
    } else {
      for (gate_id g : dirty_) evaluate(g, t);
    }
  }

  std::uint64_t run_quiet(time_fs last, std::uint64_t max_instants, std::uint64_t max_events) {
    std::uint64_t n = 0;
    for (time_fs t; (t = next_event_time()) <= last;) {
      process_instant(t, {});
      if ((max_events && events_ >= max_events) || ++n == max_instants) break;
    }
    return n;
  }

  bool quiet() const {
    return !eval_all_ && std::none_of(heap_.begin(), heap_.end(), [&](auto& e) { return live(e); });
  }
  time_fs now() const { return now_; }
  time_fs last_change() const { return last_change_; }
  time_fs largest_delay() const { return largest_; }
  std::uint64_t events() const { return events_; }
  const std::vector<logic>& values() const { return val_; }
  std::uint32_t toggle_count(net_id net) const { return toggles_[net]; }
  void track_state(bool) {}  // the hash is always kept: this kernel is not the hot path
  std::uint64_t hash() const { return hash_; }

  void snapshot(state_snapshot& s, std::span<const std::uint64_t> extra) const {
    s.time = now_;
    s.hash = hash_;
    s.values = val_;
    gather(s.pending);
    s.extra.assign(extra.begin(), extra.end());
    s.toggles = toggles_;
  }
  bool same_state(const state_snapshot& s, std::span<const std::uint64_t> extra) const {
    if (s.hash != hash_ || s.values != val_ ||
        !std::equal(extra.begin(), extra.end(), s.extra.begin(), s.extra.end()))
      return false;
    std::vector<std::pair<std::uint64_t, std::uint64_t>> p;
    gather(p);
    return p == s.pending;
  }
  void finish(time_fs) {}

 private:
  static std::uint64_t key(net_id n, logic v) {
    return mix64(std::uint64_t{n} << 2 | static_cast<std::uint64_t>(v));
  }

  bool live(const ambiguous_event& e) const {
    if (e.set) return stretch_[e.gate] == e.id;
    if (n_.delay[e.gate].transport) return true;
    const auto r = 2 * e.gate + (e.value == logic::one);
    return alive_[r] && run_[r] == e.id;
  }

  void pop() {
    std::pop_heap(heap_.begin(), heap_.end(), std::greater<>{});
    heap_.pop_back();
  }
  void push(ambiguous_event e) {
    e.seq = seq_++;
    heap_.push_back(e);
    std::push_heap(heap_.begin(), heap_.end(), std::greater<>{});
  }

  void apply(net_id net, logic v, time_fs t) {
    if (val_[net] == v) return;
    hash_ ^= key(net, val_[net]) ^ key(net, v);
    val_[net] = v;
    ++toggles_[net];
    ++events_;
    last_change_ = t;
    for (auto i = n_.fanout_begin[net]; i < n_.fanout_begin[net + 1]; ++i) {
      const gate_id g = n_.fanout[i];
      if (mark_[g] != stamp_) mark_[g] = stamp_, dirty_.push_back(g);
    }
  }

  void evaluate(gate_id g, time_fs t) {
    const net_id out = n_.gate_out[g];
    const logic e = eval_gate(n_, g, val_.data(), val_[out]);
    const logic old = eval_[g];
    if (e == old) return;
    eval_[g] = e;
    push({t + dmax_[g], 0, g, e, true, ++stretch_[g]});  // voids the previous stretch's set
    for (logic v : {logic::zero, logic::one}) {
      const auto r = 2 * g + (v == logic::one);
      if (e == v || e == logic::x) {
        if (!alive_[r]) {
          alive_[r] = 1;
          push({t + dmin_[g], 0, g, v, false, ++run_[r]});
        }
      } else {
        alive_[r] = 0;
      }
    }
  }

  void gather(std::vector<std::pair<std::uint64_t, std::uint64_t>>& out) const {
    out.clear();
    for (const auto& e : heap_)
      if (live(e))
        out.emplace_back(e.time - now_, std::uint64_t{e.gate} << 4 | std::uint64_t{e.set} << 2 |
                                            static_cast<std::uint64_t>(e.value));
    std::sort(out.begin(), out.end());
  }

  const netlist& n_;
  std::vector<logic> val_, eval_;
  std::vector<std::uint32_t> stretch_, toggles_, mark_;
  std::vector<std::uint32_t> run_;   // per gate and value: id of the current run
  std::vector<std::uint8_t> alive_;  // per gate and value: E is in {v, x} now
  std::vector<time_fs> dmin_, dmax_;
  std::vector<gate_id> dirty_;
  std::vector<ambiguous_event> heap_;
  std::uint64_t seq_ = 0, events_ = 0, hash_ = 0;
  std::uint32_t stamp_ = 0;
  time_fs now_ = 0, last_change_ = 0, largest_ = 0;
  bool eval_all_ = true;
};

}  // namespace

std::string interval_refusal(const design& d) {
  if (d.stim.rules.empty()) return {};
  return "the interval run does not take reaction rules ('when'); run the corners without "
         "'interval'";
}

interval_result run_interval(const design& d, const run_options& opt) {
  if (!interval_refusal(d).empty()) {
    interval_result none;
    return none;
  }
  interval_kernel k(d.nets);
  run_result r = detail::driver<interval_kernel>(k, d, opt).run();
  interval_result out;
  out.reported = r.reported;
  for (auto& s : r.steps) {
    interval_step st;
    st.status = s.status;
    st.proven =
        s.status == step_status::settled &&
        std::none_of(s.values.begin(), s.values.end(), [](logic v) { return v == logic::x; });
    st.values = std::move(s.values);
    st.expects = std::move(s.expects);
    out.steps.push_back(std::move(st));
  }
  return out;
}

}  // namespace settle
