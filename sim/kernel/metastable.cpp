// The metastable elements of the kernel: a mutual-exclusion element's grants
// and a synchronizing flip-flop, with the first-order resolution model (from
// memory of Veendrick 1980, IEEE JSSC 15(2); Kleeman and Cantoni 1987, IEEE
// Trans. Computers 36(10); Ginosar 2011, IEEE Design & Test 28(5)): two
// events a gap apart inside the window W resolve tau x ln(W / gap) later
// than the element's normal delay D. The logarithm is evaluated once per
// event in double precision and rounded to the nearest femtosecond.
#include <algorithm>
#include <cmath>

#include "sim/kernel/simulator.hpp"
#include "sim/model/mix.hpp"

namespace settle {

// tau x ln(reach / gap) in fs, for 0 < gap < reach; 0 otherwise.
time_fs simulator::resolve_extra(std::uint32_t element, double reach, double gap) const {
  if (!(gap > 0) || gap >= reach) return 0;
  const double extra = static_cast<double>(meta_tau_[element]) * std::log(reach / gap);
  return static_cast<time_fs>(std::llround(extra));
}

// A tie at time t: a fair bit and a uniform fraction in (0, 1), from the
// corner's stream keyed by the element and the instant, so both grants of a
// mutex draw the same and the corner replays exactly.
bool simulator::draw_bit(std::uint32_t element, time_fs t, double& unit) const {
  const std::uint64_t h = mix(run_key_ ^ mix(std::uint64_t{element} << 1 ^ mix(t)));
  unit = open_unit(mix(h));
  return h & 1;
}

// Grant g of a mutex (fan-in: its request, the other request, the other
// grant). It falls without its request and stays low while the other grant
// is high; a request alone is granted D after it (or after the other grant's
// release let it through). Two standing requests go to the first; Δ apart
// inside the window, its grant comes D + tau ln(W / Δ) after its request; at
// the same instant the corner's stream draws the winner and Δ in (0, W).
logic simulator::decide_mutex(gate_id g, time_fs t, time_fs& due, resolution& why) {
  const gate_rec& r = gate_[g];
  const std::uint32_t b = n_.fanin_begin[g];
  const net_id own_req = n_.fanin[b], other_req = n_.fanin[b + 1], other_grant = n_.fanin[b + 2];
  const logic own = val_[own_req], other = val_[other_req], og = val_[other_grant];
  const logic present = r.vout;
  const std::uint32_t e = n_.meta_at[g];
  const meta_element& m = n_.meta[e];
  const net_id own_grant = r.out;
  auto fall_by = [&](logic v) {
    due = t + edge_delay(g, present, v);
    return v;
  };
  if (own == logic::zero || og == logic::one) return fall_by(logic::zero);
  if (own == logic::x || og == logic::x || other == logic::x) return fall_by(logic::x);
  if (present == logic::one) return present;  // granted: held while its request stands
  // Both grants low and this request standing: it arrived at `mine` (or the
  // other grant's release let it through then).
  const time_fs mine = std::max(stamp(own_req), stamp(other_grant));
  const time_fs rise = edge_delay(g, logic::zero, logic::one);
  why = resolution{};
  why.gate = g;
  why.first = mine;
  why.value = logic::one;
  why.delay = rise;
  if (other == logic::zero) {
    due = mine + rise;
    return logic::one;
  }
  const time_fs theirs = std::max(stamp(other_req), stamp(own_grant));
  const double window = static_cast<double>(meta_window_[e]);
  double gap = static_cast<double>(theirs) - static_cast<double>(mine);
  if (theirs == mine) {
    double unit = 0;
    const bool second_wins = draw_bit(e, mine, unit);
    if ((m.gates[1] == g) != second_wins) return logic::zero;  // the draw went to the other grant
    gap = window * unit;
    why.drawn = true;
  } else if (theirs < mine) {
    return logic::zero;  // the other request came first
  }
  why.near = gap < window;
  why.gap = static_cast<std::int64_t>(std::llround(gap));
  due = mine + rise + resolve_extra(e, window, gap);
  return logic::one;
}

// A synchronizing flip-flop (fan-in D, CK) takes D at each rising edge of CK.
// With D's last change δ before the edge and |δ| inside half the window, its
// output resolves D + tau ln((W/2) / |δ|) after the edge: to the new value
// when the change came before the edge (δ > 0), else to the old one (δ < 0:
// a change after the edge, which revises the pending output). A change at
// the edge itself draws the sign and |δ| in (0, W/2) from the corner's stream.
logic simulator::decide_syncff(gate_id g, time_fs t, time_fs& due) {
  gate_rec& r = gate_[g];
  meta_gate& m = meta_gate_[g];
  const net_id d_net = ins_[g].in0, ck_net = ins_[g].in1;
  const logic d = val_[d_net], ck = val_[ck_net], before = clock_seen_[g];
  // D as it was before this instant: an instant may evaluate the gate more
  // than once (a change reaching D or CK through a gate of zero delay).
  if (m.instant != t) m.d_before_instant = m.d_seen, m.instant = t;
  const logic d_before = m.d_before_instant;
  clock_seen_[g] = ck;
  m.d_seen = d;
  const std::uint32_t e = n_.meta_at[g];
  const double half = static_cast<double>(meta_window_[e]) / 2;
  const logic present = r.pend != none ? r.pend : r.vout;
  auto normal = [&](logic v) {
    due = t + edge_delay(g, r.vout, v);
    return v;
  };
  if (before == logic::zero && ck == logic::one) {
    const bool d_now = changed_at_[d_net] == t;
    resolution res;
    res.gate = g;
    res.first = t;
    logic v = d;
    const bool never = changed_at_[d_net] == std::numeric_limits<time_fs>::max();
    double gap = never ? INFINITY : static_cast<double>(t - changed_at_[d_net]);
    if (d_now && d_before != d) {
      double unit = 0;
      const bool after = draw_bit(e, t, unit);
      gap = half * unit * (after ? -1 : 1);
      if (after) v = d_before;  // the change counts as just after the edge
      res.drawn = true;
    }
    res.near = std::fabs(gap) < half;
    res.gap = res.near ? static_cast<std::int64_t>(std::llround(gap)) : 0;
    res.value = v;
    res.delay = edge_delay(g, r.vout, v);
    due = t + res.delay + resolve_extra(e, half, std::fabs(gap));
    res.at = due;
    resolutions_.push_back(res);
    m.edge = t;
    m.logged = static_cast<std::uint32_t>(resolutions_.size());
    m.revisable = !res.near;
    return v;
  }
  if (before == logic::zero && ck == logic::x) return normal(lub(present, d));
  if (before == logic::x && ck == logic::one) return normal(lub(present, d));
  // D changed just after the edge: the value taken stays, its resolution
  // moves later. At the edge's own instant (D reached later in the instant)
  // it is a tie, drawn as at the edge.
  if (m.revisable && changed_at_[d_net] == t && t >= m.edge && d != d_before &&
      static_cast<double>(t - m.edge) < half && m.logged) {
    m.revisable = false;
    resolution& res = resolutions_[m.logged - 1];
    double gap = -static_cast<double>(t - m.edge);
    if (t == m.edge) {
      double unit = 0;
      const bool after = draw_bit(e, t, unit);
      gap = half * unit * (after ? -1 : 1);
      if (!after) res.value = d;  // the change counts as just before the edge
      res.drawn = true;
    }
    res.near = true;
    res.gap = static_cast<std::int64_t>(std::llround(gap));
    res.at = m.edge + res.delay + resolve_extra(e, half, std::fabs(gap));
    due = res.at;
    return res.value;
  }
  due = m.due;
  return present;
}

std::size_t simulator::final_resolutions() const {
  std::size_t final = resolutions_.size();
  for (const meta_element& e : n_.meta) {
    if (n_.kind[e.gates[0]] != gate_kind::syncff) continue;
    const meta_gate& m = meta_gate_[e.gates[0]];
    const time_fs half = meta_window_[n_.meta_at[e.gates[0]]] / 2;
    if (m.revisable && m.logged && now_ - m.edge <= half)
      final = std::min<std::size_t>(final, m.logged - 1);
  }
  return final;
}

void simulator::drop_resolutions(std::size_t k) {
  resolutions_.erase(resolutions_.begin(), resolutions_.begin() + static_cast<std::ptrdiff_t>(k));
  for (const meta_element& e : n_.meta) {
    if (n_.kind[e.gates[0]] != gate_kind::syncff) continue;
    meta_gate& m = meta_gate_[e.gates[0]];
    m.logged = m.logged > k ? m.logged - static_cast<std::uint32_t>(k) : 0;
  }
}

}  // namespace settle
