// The event-driven kernel: same-instant semantics, inertial and transport delays.
#include "sim/simulator.hpp"

#include <algorithm>
#include <limits>

#include "sim/eval.hpp"

namespace settle {
namespace {

constexpr std::size_t trace_batch = 1 << 14;

// Zobrist-style key of (net, value) for the incremental state hash.
constexpr std::uint64_t value_key(net_id net, logic v) {
  std::uint64_t z = (std::uint64_t{net} << 2 | static_cast<std::uint64_t>(v)) + 0x9e3779b97f4a7c15ull;
  z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9ull;
  z = (z ^ (z >> 27)) * 0x94d049bb133111ebull;
  return z ^ (z >> 31);
}

// A pending event as (time relative to now, gate and value).
std::pair<std::uint64_t, std::uint64_t> pending_key(time_fs rel, gate_id g, logic v) {
  return {rel, std::uint64_t{g} << 2 | static_cast<std::uint64_t>(v)};
}

}  // namespace

void radix_queue::clear() {
  for (auto& b : buckets_) b.clear();
  last_ = 0;
  size_ = 0;
}

time_fs radix_queue::min_time() {
  if (buckets_[0].empty()) {
    int i = 1;
    while (buckets_[i].empty()) ++i;
    auto& b = buckets_[i];
    time_fs m = std::numeric_limits<time_fs>::max();
    for (const auto& e : b) m = std::min(m, e.time);
    last_ = m;
    // Every entry lands in a lower bucket relative to the new minimum.
    for (const auto& e : b) buckets_[bucket(e.time)].push_back(e);
    b.clear();
  }
  return last_;
}

void radix_queue::take_front(std::vector<queued_event>& out) {
  out.clear();
  std::swap(out, buckets_[0]);
  size_ -= out.size();
}

simulator::simulator(const netlist& n) : n_(n) {
  const auto nets = n.net_count(), gates = n.gate_count();
  val_.resize(nets);
  toggles_.resize(nets);
  pend_val_.resize(gates);
  gen_.resize(gates);
  slot_.assign(gates, no_id);
  mark_.assign(gates, 0);
  for (gate_id g = 0; g < gates; ++g)
    if (n.delay[g].transport) slot_[g] = static_cast<std::uint32_t>(tq_.size()), tq_.emplace_back();
}

void simulator::reset(const delay_table& delays) {
  delays_ = &delays;
  std::copy(n_.init.begin(), n_.init.end(), val_.begin());
  std::fill(toggles_.begin(), toggles_.end(), 0);
  std::fill(pend_val_.begin(), pend_val_.end(), none);
  for (auto& q : tq_) q.clear();
  queue_.clear();
  trace_.clear();
  now_ = last_change_ = 0;
  events_ = 0;
  live_ = 0;
  eval_all_ = true;
  hash_ = 0;
  for (net_id i = 0; i < val_.size(); ++i) hash_ ^= value_key(i, val_[i]);
  if (sink_) sink_->on_start(val_);
}

time_fs simulator::delay_of(gate_id g, logic from, logic to) const {
  const time_fs r = delays_->rise[g], f = delays_->fall[g];
  if (from == logic::zero && to == logic::one) return r;
  if (from == logic::one && to == logic::zero) return f;
  return std::min(r, f);
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

void simulator::schedule(gate_id g, logic v, time_fs t) {
  if (slot_[g] == no_id) {
    if (pend_val_[g] == none) ++live_;
    pend_val_[g] = v;
    queue_.push({t, g, ++gen_[g]});
    return;
  }
  auto& q = tq_[slot_[g]];
  // A new transaction deletes pending ones at or after its time.
  while (!q.empty() && q.back().time >= t) q.pop_back(), --live_;
  q.push_back({t, v, ++next_id_});
  ++live_;
  if (q.size() == 1) queue_.push({t, g, q.front().id});
}

void simulator::apply(net_id net, logic v, time_fs t) {
  if (val_[net] == v) return;
  hash_ ^= value_key(net, val_[net]) ^ value_key(net, v);
  val_[net] = v;
  ++toggles_[net];
  ++events_;
  last_change_ = t;
  if (sink_) {
    trace_.push_back({t, net, v});
    if (trace_.size() >= trace_batch) flush_trace();
  }
  for (auto i = n_.fanout_begin[net]; i < n_.fanout_begin[net + 1]; ++i) {
    const gate_id g = n_.fanout[i];
    if (mark_[g] != stamp_) mark_[g] = stamp_, dirty_.push_back(g);
  }
}

void simulator::evaluate(gate_id g, time_fs t) {
  const net_id out = n_.gate_out[g];
  const logic present = val_[out];
  const logic v = eval_gate(n_, g, val_.data(), present);
  if (slot_[g] == no_id) {
    // Inertial: one pending change per output (pulses shorter than the delay vanish).
    const logic p = pend_val_[g];
    if (p == v) return;
    if (v == present) {
      if (p != none) pend_val_[g] = none, ++gen_[g], --live_;
      return;
    }
    schedule(g, v, t + delay_of(g, present, v));
    return;
  }
  auto& q = tq_[slot_[g]];
  const logic projected = q.empty() ? present : q.back().value;
  if (v != projected) schedule(g, v, t + delay_of(g, projected, v));
}

void simulator::process_instant(time_fs t, std::span<const assignment> inputs) {
  now_ = t;
  if (++stamp_ == 0) std::fill(mark_.begin(), mark_.end(), 0), stamp_ = 1;
  dirty_.clear();
  changes_.clear();
  for (const auto& a : inputs) changes_.emplace_back(a.net, a.value);
  if (!queue_.empty() && live_ && queue_.min_time() == t) {
    queue_.take_front(front_);
    for (const auto& e : front_) {
      const gate_id g = e.gate;
      if (slot_[g] == no_id) {
        if (pend_val_[g] == none || gen_[g] != e.gen) continue;
        changes_.emplace_back(n_.gate_out[g], pend_val_[g]);
        pend_val_[g] = none;
        --live_;
      } else {
        auto& q = tq_[slot_[g]];
        if (q.empty() || q.front().id != e.gen) continue;
        changes_.emplace_back(n_.gate_out[g], q.front().value);
        q.erase(q.begin());
        --live_;
        if (!q.empty()) queue_.push({q.front().time, g, q.front().id});
      }
    }
  }
  // First every change due at t takes effect, then the gates they feed are
  // evaluated: nothing depends on the order of events within an instant.
  for (const auto& [net, v] : changes_) apply(net, v, t);
  if (eval_all_) {
    eval_all_ = false;
    for (gate_id g = 0; g < n_.gate_count(); ++g) evaluate(g, t);
  } else {
    for (const gate_id g : dirty_) evaluate(g, t);
  }
}

void simulator::gather_pending(std::vector<std::pair<std::uint64_t, std::uint64_t>>& out) const {
  out.clear();
  queue_.for_each([&](const queued_event& e) {
    if (slot_[e.gate] == no_id && pend_val_[e.gate] != none && gen_[e.gate] == e.gen)
      out.push_back(pending_key(e.time - now_, e.gate, pend_val_[e.gate]));
  });
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
  s.toggles = toggles_;
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
