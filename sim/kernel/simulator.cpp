// The event-driven kernel: same-instant semantics, inertial and transport delays.
#include "sim/kernel/simulator.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <limits>

#include "sim/kernel/eval.hpp"
#include "sim/model/check.hpp"

namespace settle {
namespace {

constexpr std::size_t trace_batch = 1 << 14;

// The per-event path, inlined into process_instant (GCC's size heuristics
// otherwise keep these as calls, which cost a fifth of the instructions).
#define SETTLE_HOT [[gnu::always_inline]] inline

// Zobrist-style key of (net, value) for the incremental state hash.
constexpr std::uint64_t value_key(net_id net, logic v) {
  std::uint64_t z =
      (std::uint64_t{net} << 2 | static_cast<std::uint64_t>(v)) + 0x9e3779b97f4a7c15ull;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
  return z ^ (z >> 31);
}

// A pending event as (time relative to now, gate and value).
std::pair<std::uint64_t, std::uint64_t> pending_key(time_fs rel, gate_id g, logic v) {
  return {rel, std::uint64_t{g} << 2 | static_cast<std::uint64_t>(v)};
}

}  // namespace

std::optional<std::string> kernel_size_error(const netlist& n) {
  if (n.gate_count() <= simulator::gate_limit()) return std::nullopt;
  return fmt::format("{} gates: the kernel takes at most {}", n.gate_count(),
                     simulator::gate_limit());
}

simulator::simulator(const netlist& n)
    : n_(n), queue_(n.largest_max_delay(), n.smallest_min_delay()) {
  SETTLE_CHECK(n.gate_count() <= gate_limit(),
               "more gates than the kernel takes: callers check kernel_size_error first");
  const auto nets = n.net_count(), gates = n.gate_count();
  build_fast_paths();
  val_.resize(nets);
  toggles_.resize(nets);
  slot_.assign(gates, no_id);
  for (gate_id g = 0; g < gates; ++g)
    if (n.delay[g].transport) {
      slot_[g] = static_cast<std::uint32_t>(tq_.size()), tq_.emplace_back();
      gate_[g].transport = true;
      // Off the table paths, which are inertial.
      if (gate_[g].op < lut_rows) gate_[g].op = gate_rec::general;
    }
  arcs_ = !n.arcs.empty();
  meta_ = !n.meta.empty();
  stamped_ = arcs_ || meta_;
  set_watchers();
  for (gate_id g = 0; g < gates && arcs_; ++g)  // off the table paths, whose delay is the gate's
    if (n.has_arcs(g) && gate_[g].op < lut_rows) gate_[g].op = gate_rec::general;
}

// Gates of one or two inputs (and two-input C-elements) evaluate by one table
// lookup; the tables are the exact ternary evaluation of each kind, taken from
// eval_gate itself on a probe netlist, so both paths agree by construction.
void simulator::build_fast_paths() {
  netlist probe;
  probe.begin();
  const net_id a = probe.add_net("a", 0), b = probe.add_net("b", 0);
  std::vector<net_id> y;
  for (int k = 0; k < gate_kind_count; ++k) y.push_back(probe.add_net(fmt::format("y{}", k), 0));
  const gate_id first_two = gate_kind_count;
  for (int k = 0; k < gate_kind_count; ++k)
    probe.add_gate(static_cast<gate_kind>(k), y[k], {a}, {}, {});
  for (int k = 0; k < gate_kind_count; ++k)
    probe.add_gate(static_cast<gate_kind>(k), y[k], {a, b}, {}, {});
  probe.finish();
  std::vector<logic> v(probe.net_count(), logic::x);
  v[0] = logic::zero, v[1] = logic::one;
  const logic levels[] = {logic::zero, logic::one, logic::x};
  const int one_row = gate_kind_count, c2_row = 2 * gate_kind_count;
  for (int k = 0; k < gate_kind_count; ++k) {
    const auto kind = static_cast<gate_kind>(k);
    const bool one_ok = kind == gate_kind::buf || kind == gate_kind::inv ||
                        kind == gate_kind::and_ || kind == gate_kind::nand ||
                        kind == gate_kind::or_ || kind == gate_kind::nor ||
                        kind == gate_kind::xor_ || kind == gate_kind::xnor;
    const bool two_ok = one_ok && kind != gate_kind::buf && kind != gate_kind::inv;
    for (int i = 0; i < 3; ++i) {
      v[a] = levels[i];
      const logic single =
          one_ok ? eval_gate(probe, static_cast<gate_id>(k), v.data(), logic::x) : logic::x;
      for (int j = 0; j < 3; ++j) {
        v[b] = levels[j];
        const logic pair = two_ok ? eval_gate(probe, first_two + k, v.data(), logic::x) : logic::x;
        for (int q = 0; q < 3; ++q) {
          const int at = i * 9 + j * 3 + q;
          lut_[k * 27 + at] = pair;
          lut_[(one_row + k) * 27 + at] = single;
          if (kind == gate_kind::celem)
            lut_[c2_row * 27 + at] = eval_gate(probe, first_two + k, v.data(), levels[q]);
        }
      }
    }
  }
  for (int row = 0; row < lut_rows; ++row)
    for (int i = 0; i < 3; ++i)
      for (int j = 0; j < 3; ++j)
        for (int q = 0; q < 3; ++q)
          for (int p = 0; p < 4; ++p)
            step_[row << 8 | i << 6 | j << 4 | q << 2 | p] =
                plan_of(levels[q], static_cast<logic>(p), lut_[row * 27 + i * 9 + j * 3 + q]);
  gate_.resize(n_.gate_count());
  // Records that fit in the core's own caches need no prefetching (it costs
  // a tenth of the instructions of an event).
  prefetch_ = n_.gate_count() * sizeof(gate_rec) > prefetch_above;
  ins_.resize(n_.gate_count());
  for (gate_id g = 0; g < n_.gate_count(); ++g) {
    gate_rec& f = gate_[g];
    const auto k = n_.kind[g];
    const auto fan = n_.fanin_begin[g + 1] - n_.fanin_begin[g];
    f.out = n_.gate_out[g];
    ins_[g].in0 = fan > 0 ? n_.fanin[n_.fanin_begin[g]] : 0;
    ins_[g].in1 = fan > 1 ? n_.fanin[n_.fanin_begin[g] + 1] : ins_[g].in0;
    const bool simple = k != gate_kind::mux && k != gate_kind::maj && k != gate_kind::gc &&
                        k != gate_kind::expr && k != gate_kind::dff && !is_metastable(k) &&
                        !n_.enumerate[g];
    f.op = gate_rec::general;
    if (k == gate_kind::dff) {
      f.op = gate_rec::edge;
    } else if (simple && k == gate_kind::celem) {
      if (fan == 2) f.op = static_cast<std::uint8_t>(c2_row);
    } else if (simple && fan == 1) {
      f.op = static_cast<std::uint8_t>(one_row + static_cast<int>(k));
    } else if (simple && fan == 2 && k != gate_kind::buf && k != gate_kind::inv) {
      f.op = static_cast<std::uint8_t>(k);
    }
  }
  // Fan-out entries name the inputs the net is, so a change updates the
  // copies of its value in the records it reaches.
  net_fo_.resize(n_.fanout.size());
  for (net_id net = 0; net < n_.net_count(); ++net)
    for (auto i = n_.fanout_begin[net]; i < n_.fanout_begin[net + 1]; ++i) {
      const gate_id g = n_.fanout[i];
      net_fo_[i] = g << 2 | (ins_[g].in0 == net ? 1u : 0u) | (ins_[g].in1 == net ? 2u : 0u);
    }
  for (gate_id g = 0; g < n_.gate_count(); ++g) {
    gate_rec& f = gate_[g];
    const auto from = n_.fanout_begin[f.out], to = n_.fanout_begin[f.out + 1];
    f.fo = static_cast<std::uint32_t>(fo_.size());
    f.nfo = static_cast<std::uint8_t>(std::min<std::uint32_t>(to - from, gate_rec::many));
    fo_start_.push_back(f.fo);
    fo_.insert(fo_.end(), net_fo_.begin() + from, net_fo_.begin() + to);
  }
  fo_start_.push_back(static_cast<std::uint32_t>(fo_.size()));
  fo_.resize(fo_.size() + 3, 0);  // prefetch_ahead reads three entries of any list
  queued_.assign(n_.gate_count(), 0);
}

SETTLE_HOT std::span<const simulator::fan_entry> simulator::fanout_of(gate_id g,
                                                                      const gate_rec& r) const {
  const std::uint32_t n = r.nfo != gate_rec::many ? r.nfo : fo_start_[g + 1] - r.fo;
  return {fo_.data() + r.fo, n};
}

void simulator::reset(const delay_table& delays) {
  SETTLE_CHECK(delays.rise.size() == n_.gate_count() && delays.fall.size() == n_.gate_count(),
               "the delay table was filled for this netlist (fill_delays)");
  std::copy(n_.init.begin(), n_.init.end(), val_.begin());
  clock_seen_.assign(n_.gate_count(), logic::x);
  for (gate_id g = 0; g < n_.gate_count(); ++g) {
    gate_rec& r = gate_[g];
    if (r.op == gate_rec::edge) clock_seen_[g] = n_.init[ins_[g].in1];
    r.pend = none;
    r.v0 = val_[ins_[g].in0], r.v1 = val_[ins_[g].in1], r.vout = val_[r.out];
    r.toggles = 0;
    queued_[g] = 0;
  }
  constexpr time_fs narrow = std::numeric_limits<std::uint32_t>::max();
  wide_ =
      std::any_of(delays.rise.begin(), delays.rise.end(), [](time_fs d) { return d > narrow; }) ||
      std::any_of(delays.fall.begin(), delays.fall.end(), [](time_fs d) { return d > narrow; });
  wide_delay_.clear();
  within_reach_ = true;
  largest_delay_ = 0;
  for (gate_id g = 0; g < n_.gate_count(); ++g) {
    largest_delay_ = std::max({largest_delay_, delays.rise[g], delays.fall[g]});
    within_reach_ = within_reach_ && std::max(delays.rise[g], delays.fall[g]) < queue_.reach();
    if (wide_) {
      wide_delay_.push_back({delays.rise[g], delays.fall[g]});
    } else {
      gate_[g].delay[0] = static_cast<std::uint32_t>(delays.rise[g]);
      gate_[g].delay[1] = static_cast<std::uint32_t>(delays.fall[g]);
      gate_[g].shorter = delays.fall[g] < delays.rise[g];
    }
    if (arcs_ && n_.has_arcs(g)) gate_[g].shorter |= arc_bit;  // delay_of asks arc_delay_of
  }
  if (stamped_) changed_at_.assign(n_.net_count(), std::numeric_limits<time_fs>::max());
  if (arcs_) {
    SETTLE_CHECK(delays.arc_rise.size() == n_.arcs.size(), "the delay table has every arc's delay");
    arc_rise_ = delays.arc_rise;
    arc_fall_ = delays.arc_fall;
  }
  if (meta_) {
    SETTLE_CHECK(delays.tau.size() == n_.meta.size() && delays.window.size() == n_.meta.size(),
                 "the delay table has every metastable element's tau and window");
    meta_gate_.assign(n_.gate_count(), meta_gate{});
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      if (n_.kind[g] == gate_kind::syncff)
        meta_gate_[g].d_seen = meta_gate_[g].d_before_instant = val_[ins_[g].in0];
    meta_tau_ = delays.tau;
    meta_window_ = delays.window;
    run_key_ = delays.run_key;
    resolutions_.clear();
  }
  std::fill(toggles_.begin(), toggles_.end(), 0);
  for (auto& q : tq_) q.clear();
  queue_.clear();
  trace_.clear();
  now_ = last_change_ = 0;
  events_ = 0;
  live_ = 0;
  eval_all_ = true;
  track_state(false);
  if (sink_) sink_->on_start(val_);
}

void simulator::track_state(bool on) {
  tracking_ = on;
  set_watchers();
  hash_ = 0;
  if (on)
    for (net_id i = 0; i < val_.size(); ++i) hash_ ^= value_key(i, val_[i]);
}

// A change caused by inputs that changed now takes the largest of their arcs'
// delays (the latest arrival); with none to name (the first evaluation) the
// largest of all its arcs, which the delay table gives the gate itself.
time_fs simulator::arc_delay_of(gate_id g, logic from, logic to) const {
  time_fs r = 0, f = 0;
  bool named = false;
  const std::uint32_t first = n_.fanin_begin[g], count = n_.fanin_begin[g + 1] - first;
  const std::uint32_t at = n_.arc_at[g];
  for (std::uint32_t k = 0; k < count; ++k)
    if (changed_at_[n_.fanin[first + k]] == now_) {
      named = true;
      r = std::max(r, arc_rise_[at + k]);
      f = std::max(f, arc_fall_[at + k]);
    }
  if (!named) {
    r = wide_ ? wide_delay_[g].rise : gate_[g].delay[0];
    f = wide_ ? wide_delay_[g].fall : gate_[g].delay[1];
  }
  const time_fs edge = to == logic::one ? r : f, shorter = r < f ? r : f;
  return (static_cast<unsigned>(from) | static_cast<unsigned>(to)) & 2u ? shorter : edge;
}

// Plain: the loop a design with arcs never takes (run_quiet), so no test.
template <bool Plain>
SETTLE_HOT time_fs simulator::delay_of(gate_id g, logic from, logic to) const {
  const gate_rec& d = gate_[g];
  if (!Plain && (d.shorter & arc_bit)) [[unlikely]]
    return arc_delay_of(g, from, to);
  const time_fs r = wide_ ? wide_delay_[g].rise : d.delay[0],
                f = wide_ ? wide_delay_[g].fall : d.delay[1];
  // A rise takes the rise delay, a fall the fall delay, anything through x
  // the shorter: by selects, with no branch on data that follows no pattern.
  const time_fs edge = to == logic::one ? r : f, shorter = r < f ? r : f;
  return (static_cast<unsigned>(from) | static_cast<unsigned>(to)) & 2u ? shorter : edge;
}

time_fs simulator::next_event_time() {
  if (eval_all_) return now_;
  if (live_ == 0) {
    queue_.clear();
    return std::numeric_limits<time_fs>::max();
  }
  // The earliest entry may be a cancelled one; its instant then changes
  // nothing, which is harmless: every live entry lies at or after it.
  return queue_.min_time();
}

template <bool Plain>
SETTLE_HOT void simulator::schedule(gate_id g, logic v, time_fs t) {
  gate_rec& r = gate_[g];
  if (!r.transport) {
    if (r.pend == none) ++live_;
    r.pend = v;
    if constexpr (Plain)
      queue_.push_after_take({t, g, ++r.gen});
    else
      queue_.push({t, g, ++r.gen});
    return;
  }
  auto& q = tq_[slot_[g]];
  // A new transaction deletes pending ones at or after its time.
  while (!q.empty() && q.back().time >= t) q.pop_back(), --live_;
  q.push_back({t, v, ++next_id_});
  ++live_;
  if (q.size() == 1) queue_.push({t, g, q.front().id});
}

// A net takes a new value (the caller knows it differs): hash, event count
// and trace; the caller updates the copies in the gate records and the
// transition count (the driver's record, or toggles_ for a stimulus change).
template <bool Plain>
SETTLE_HOT void simulator::change_value(net_id net, logic v, time_fs t) {
  // One test for the three things a change may have to tell (set_watchers).
  if (!Plain && watched_) [[unlikely]] {
    if (tracking_) hash_ ^= value_key(net, val_[net]) ^ value_key(net, v);
    if (stamped_) {
      changed_at_[net] = t;
      // A mutex's grant rising is a resolution of its element (a syncff's
      // are logged where decided: the value taken may equal the one held).
      if (meta_ && v == logic::one) note_grant(net, t);
    }
    if (sink_) {
      trace_.push_back({t, net, v});
      if (trace_.size() >= trace_batch) flush_trace();
    }
  }
  val_[net] = v;
  ++events_;
  last_change_ = t;
}

// The copy of a net's new value in the record of a gate that reads it.
SETTLE_HOT void simulator::pass_value(fan_entry e, logic v) {
  // Selects, not branches: which input a net is follows no pattern.
  gate_rec& r = gate_[reader(e)];
  const logic v0 = r.v0, v1 = r.v1;
  r.v0 = e & 1 ? v : v0;
  r.v1 = e & 2 ? v : v1;
}

// Gate g's output takes the value v (the caller knows it differs); returns
// the gates it feeds, for the caller to pass the value on.
template <bool Plain>
SETTLE_HOT std::span<const simulator::fan_entry> simulator::change_output(gate_id g, gate_rec& r,
                                                                          logic v, time_fs t) {
  change_value<Plain>(r.out, v, t);
  r.vout = v;
  ++r.toggles;
  return fanout_of(g, r);
}

// A change within an instant of several: the gates it feeds are marked for
// evaluation once every change of the instant has taken effect.
SETTLE_HOT void simulator::mark(std::span<const fan_entry> fan, logic v) {
  for (const fan_entry e : fan) {
    pass_value(e, v);
    if (const gate_id g = reader(e); !queued_[g]) queued_[g] = 1, dirty_.push_back(g);
  }
}

// An input change (a net no gate drives, or a driven net the stimulus sets).
void simulator::apply_input(net_id net, logic v, time_fs t) {
  if (val_[net] == v) return;
  change_value(net, v, t);
  ++toggles_[net];
  if (const gate_id d = n_.driver[net]; d != no_id) gate_[d].vout = v;
  const auto from = n_.fanout_begin[net], to = n_.fanout_begin[net + 1];
  mark({net_fo_.data() + from, to - from}, v);
}

SETTLE_HOT void simulator::apply_output(gate_id g, gate_rec& r, logic v, time_fs t) {
  if (r.vout == v) return;
  mark(change_output(g, r, v, t), v);
}

SETTLE_HOT logic simulator::eval_fast(gate_id g, logic present) {
  const gate_rec& f = gate_[g];
  if (f.op < lut_rows) [[likely]]
    return lut_[f.op * 27 + static_cast<int>(f.v0) * 9 + static_cast<int>(f.v1) * 3 +
                static_cast<int>(present)];
  if (f.op == gate_rec::edge) {
    // A flip-flop is evaluated whenever CK or D changes, so the CK it saw
    // last time tells a rising edge (0 -> 1) from anything else.
    const logic ck = val_[ins_[g].in1], before = clock_seen_[g];
    clock_seen_[g] = ck;
    const logic d = val_[ins_[g].in0];
    if (before == logic::zero && ck == logic::one) return d;
    const bool may_rise = before != logic::one && ck != logic::zero && before != ck;
    return may_rise ? lub(present, d) : present;
  }
  return eval_gate(n_, g, val_.data(), present);
}

// An inertial gate's evaluation to v, with `present` on its output and
// `pend` pending, as a step for take_step: bits 0-1 the value then pending
// (3: none), bit 2 whether an entry is queued, bit 3 whether the generation
// moves on (the live entry is replaced or cancelled), bits 4-5 the change in
// live entries plus one, bits 6-7 the delay (0 rise, 1 fall, 2 the shorter).
// The same decisions as evaluate's branches.
std::uint8_t simulator::plan_of(logic present, logic pend, logic v) {
  unsigned next = static_cast<unsigned>(pend), queue = 0, bump = 0, live = 1, pick = 0;
  if (pend == v) {
    // nothing changes
  } else if (v == present) {
    if (pend != none) next = 3, bump = 1, live = 0;
  } else {
    next = static_cast<unsigned>(v), queue = 1, bump = 1, live = pend == none ? 2 : 1;
    pick = present == logic::zero && v == logic::one   ? 0
           : present == logic::one && v == logic::zero ? 1
                                                       : 2;
  }
  return static_cast<std::uint8_t>(next | queue << 2 | bump << 3 | live << 4 | pick << 6);
}

// Applies a step of step_ to gate g: all by selects and arithmetic, since
// whether an evaluation changes the output follows no pattern a branch
// predictor learns. The entry is written whether kept or not.
SETTLE_HOT void simulator::take_step(gate_id g, gate_rec& r, unsigned step, time_fs t) {
  r.pend = static_cast<logic>(step & 3);
  r.gen += (step >> 3) & 1;
  live_ += ((step >> 4) & 3) - std::size_t{1};
  // The delay by index: rise (0), fall (1), or the shorter (2: r.shorter).
  const unsigned pick = step >> 6;
  const time_fs d = r.delay[(pick & 1) | ((pick >> 1) & r.shorter)];
  queue_.push_after_take_if((step >> 2) & 1, {t + d, g, r.gen});
}

template <bool Plain>
SETTLE_HOT void simulator::evaluate(gate_id g, time_fs t) {
  gate_rec& r = gate_[g];
  if constexpr (Plain) {
    // Inertial gates of a table row (transport ones have none) by one lookup.
    if (r.op < lut_rows) [[likely]] {
      const unsigned at = unsigned{r.op} << 8 | static_cast<unsigned>(r.v0) << 6 |
                          static_cast<unsigned>(r.v1) << 4 | static_cast<unsigned>(r.vout) << 2 |
                          static_cast<unsigned>(r.pend);
      take_step(g, r, step_[at], t);
      return;
    }
  }
  // Metastable elements are off the table rows (build_fast_paths).
  if (!Plain && r.op == gate_rec::general && meta_) [[unlikely]]
    if (is_metastable(n_.kind[g])) return evaluate_meta(g, t);
  const logic present = r.vout;
  const logic v = eval_fast(g, present);
  if (!r.transport) {
    // Inertial: one pending change per output (pulses shorter than the delay vanish).
    const logic p = r.pend;
    if (p == v) return;
    if (v == present) {
      if (p != none) r.pend = none, ++r.gen, --live_;
      return;
    }
    schedule<Plain>(g, v, t + delay_of<Plain>(g, present, v));
    return;
  }
  auto& q = tq_[slot_[g]];
  const logic projected = q.empty() ? present : q.back().value;
  if (v != projected) schedule<false>(g, v, t + delay_of<false>(g, projected, v));
}

void simulator::note_grant(net_id net, time_fs t) {
  const gate_id g = n_.driver[net];
  if (g == no_id || n_.kind[g] != gate_kind::mutex || val_[net] == logic::one) return;
  resolution why = meta_gate_[g].why;
  why.at = t;
  resolutions_.push_back(why);
}

time_fs simulator::edge_delay(gate_id g, logic from, logic to) const {
  return delay_of<false>(g, from, to);
}

// A metastable element's gate (netlist::meta): the decision gives the value
// and the absolute time it is due (sim/kernel/metastable.cpp). Inertial, one
// pending change: the same value pending stays at its time unless the
// decision puts it later (a competitor found inside the window).
void simulator::evaluate_meta(gate_id g, time_fs t) {
  gate_rec& r = gate_[g];
  time_fs due = t;
  resolution why;
  const logic v =
      n_.kind[g] == gate_kind::mutex ? decide_mutex(g, t, due, why) : decide_syncff(g, t, due);
  auto& m = meta_gate_[g];
  if (v == r.pend && due <= m.due) return;
  if (v == r.vout) {
    if (r.pend != none) r.pend = none, ++r.gen, --live_;
    return;
  }
  m.due = std::max(due, t);
  if (n_.kind[g] == gate_kind::mutex) m.why = why;
  schedule<false>(g, v, m.due);
}

// The gate events of one instant, taken from the queue: each live one
// changes its output and marks the gates it feeds. Nothing is pushed while
// the front is walked (apply only marks gates), so the span stays valid;
// transport gates queue their next transaction after.
SETTLE_HOT void simulator::apply_front(std::span<const queued_event> front, time_fs t) {
  repush_.clear();
  for (const auto& e : front) {
    const gate_id g = e.gate;
    gate_rec& r = gate_[g];
    if (!r.transport) {
      if (r.pend == none || r.gen != e.gen) continue;
      const logic v = r.pend;
      r.pend = none;
      --live_;
      apply_output(g, r, v, t);
    } else {
      auto& q = tq_[slot_[g]];
      if (q.empty() || q.front().id != e.gen) continue;
      const logic v = q.front().value;
      q.erase(q.begin());
      --live_;
      if (!q.empty()) repush_.push_back({q.front().time, g, q.front().id});
      apply_output(g, r, v, t);
    }
  }
  for (const auto& e : repush_) queue_.push(e);
}

// Each instant is a chain of dependent loads, which at 10^5 gates and more
// miss the near caches: the queue entry, its gate's record, the fan-out list,
// the records of the gates it feeds. The next entries are known (the queue's
// look-ahead walks them), so each entry the look-ahead passes fetches one
// link of the chain for each of the last three it passed: the record of the
// newest, the fan-out list of the one before, whose record came an entry
// ago, and the records of the gates the oldest feeds. The look-ahead stays
// prefetch_depth entries ahead of the instants taken, so the oldest of the
// three is that many less two ahead.
SETTLE_HOT void simulator::prefetch_ahead() {
  while (queue_.lead() < prefetch_depth) {
    const gate_id g = queue_.next_ahead();
    if (g == no_id) return;
    near_ = mid_, mid_ = far_, far_ = g;
    __builtin_prefetch(&gate_[far_]);
    __builtin_prefetch(&fo_[gate_[mid_].fo]);
    // The first three, whatever the count: past its end a list runs into the
    // next gate's (fo_ ends in padding), and a wasted prefetch costs less
    // than a mispredicted branch.
    const fan_entry* f = fo_.data() + gate_[near_].fo;
    __builtin_prefetch(&gate_[reader(f[0])]);
    __builtin_prefetch(&gate_[reader(f[1])]);
    __builtin_prefetch(&gate_[reader(f[2])]);
  }
}

void simulator::process_instant(time_fs t, std::span<const assignment> inputs) {
  now_ = t;
  dirty_.clear();
  // First every change due at t takes effect, then the gates they feed are
  // evaluated: nothing depends on the order of events within an instant.
  for (const auto& a : inputs) apply_input(a.net, a.value, t);
  if (live_ && queue_.min_time() == t) {
    apply_front(queue_.take_front(), t);
    if (prefetch_) prefetch_ahead();
  }
  if (eval_all_) {
    eval_all_ = false;
    for (gate_id g = 0; g < n_.gate_count(); ++g) evaluate(g, t);
    for (const gate_id g : dirty_) queued_[g] = 0;
  } else {
    for (const gate_id g : dirty_) queued_[g] = 0, evaluate(g, t);
  }
}

std::uint64_t simulator::run_quiet(time_fs last, std::uint64_t max_instants,
                                   std::uint64_t max_events) {
  std::uint64_t n = 0;
  const std::uint64_t event_cap =
      max_events ? max_events : std::numeric_limits<std::uint64_t>::max();
  const std::uint64_t instant_cap =
      max_instants ? max_instants : std::numeric_limits<std::uint64_t>::max();
  if (eval_all_) {
    if (now_ > last) return 0;
    process_instant(now_, {});
    if (++n, events_ >= event_cap || n == instant_cap) return n;
  }
  // Without trace or hash, and with every delay within the queue's reach,
  // the loop skips their tests and the queue's checks on each push.
  if (!sink_ && !tracking_ && within_reach_ && !wide_ && !arcs_ && !meta_)
    return run_loop<true>(last, n, instant_cap, event_cap);
  return run_loop<false>(last, n, instant_cap, event_cap);
}

template <bool Plain>
std::uint64_t simulator::run_loop(time_fs last, std::uint64_t n, std::uint64_t instant_cap,
                                  std::uint64_t event_cap) {
  for (;;) {
    if (live_ == 0) {
      queue_.clear();
      break;
    }
    const auto front = queue_.take_until(last);
    if (front.empty()) break;
    const time_fs t = front.front().time;
    now_ = t;
    if (front.size() == 1 && !gate_[front.front().gate].transport) {
      // The common instant: one event. Its change is the only one, so the
      // gates it feeds are evaluated straight away, unmarked (each appears
      // once in the fan-out list, and nothing else changes at t).
      const queued_event e = front.front();
      gate_rec& r = gate_[e.gate];
      if (r.pend != none && r.gen == e.gen) {
        const logic v = r.pend;
        r.pend = none;
        --live_;
        if (r.vout != v)
          for (const fan_entry f : change_output<Plain>(e.gate, r, v, t)) {
            pass_value(f, v);
            evaluate<Plain>(reader(f), t);
          }
      }
    } else {
      dirty_.clear();
      apply_front(front, t);
      for (const gate_id g : dirty_) queued_[g] = 0, evaluate<Plain>(g, t);
    }
    if (prefetch_) prefetch_ahead();
    if (++n, events_ >= event_cap || n == instant_cap) break;
  }
  return n;
}

void simulator::gather_pending(std::vector<std::pair<std::uint64_t, std::uint64_t>>& out) const {
  out.clear();
  queue_.for_each([&](const queued_event& e) {
    const gate_rec& r = gate_[e.gate];
    if (!r.transport && r.pend != none && r.gen == e.gen)
      out.push_back(pending_key(e.time - now_, e.gate, r.pend));
  });
  if (!tq_.empty())
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      if (slot_[g] != no_id)
        for (const auto& e : tq_[slot_[g]]) out.push_back(pending_key(e.time - now_, g, e.value));
  std::sort(out.begin(), out.end());
}

void simulator::snapshot(state_snapshot& s, std::span<const std::uint64_t> extra) const {
  s.time = now_;
  s.hash = hash_;
  s.values = val_;
  gather_pending(s.pending);
  s.extra.assign(extra.begin(), extra.end());
  s.toggles.resize(val_.size());
  for (net_id i = 0; i < val_.size(); ++i) s.toggles[i] = toggle_count(i);
}

bool simulator::same_state(const state_snapshot& s, std::span<const std::uint64_t> extra) const {
  if (s.hash != hash_ || s.values != val_) return false;
  if (!std::equal(extra.begin(), extra.end(), s.extra.begin(), s.extra.end())) return false;
  thread_local std::vector<std::pair<std::uint64_t, std::uint64_t>> pending;
  gather_pending(pending);
  return pending == s.pending;
}

void simulator::flush_trace() {
  if (sink_ && !trace_.empty()) sink_->on_changes(trace_);
  trace_.clear();
}

void simulator::finish(time_fs end) {
  flush_trace();
  if (sink_) sink_->on_finish(end);
}

}  // namespace settle
