// Netlist construction helpers and queries.
#include "sim/model/netlist.hpp"

#include <algorithm>
#include <functional>

#include "sim/model/check.hpp"

namespace settle {

const char* kind_name(gate_kind k) {
  static constexpr const char* names[gate_kind_count] = {
      "buf", "not", "and", "nand", "or",   "nor", "xor",   "xnor",
      "mux", "maj", "c",   "gc",   "expr", "dff", "mutex", "syncff"};
  return names[static_cast<int>(k)];
}

std::size_t gate_delays::hash(const gate_delay& d) {
  std::size_t h = d.transport ? 0x9e3779b97f4a7c15ULL : 0;
  for (time_fs t : {d.rise.min, d.rise.typ, d.rise.max, d.fall.min, d.fall.typ, d.fall.max})
    h = (h ^ std::hash<time_fs>{}(t)) * 0x100000001b3ULL + (h >> 29);
  return h;
}

void gate_delays::push_back(const gate_delay& d) {
  // Consecutive gates usually share a record: try the last one first.
  if (!index_.empty() && records_[index_.back()] == d) {
    index_.push_back(index_.back());
    return;
  }
  index_.push_back(record_for(d));
}

std::uint32_t gate_delays::record_for(const gate_delay& d) {
  const auto h = hash(d);
  auto r = lookup_.find(h, [&](std::uint32_t i) { return records_[i] == d; });
  if (r == no_id) {
    r = static_cast<std::uint32_t>(records_.size());
    records_.push_back(d);
    lookup_.insert(h, r, [&](std::uint32_t i) { return hash(records_[i]); });
  }
  return r;
}

std::uint32_t netlist::add_meta(const meta_element& e) {
  const auto at = static_cast<std::uint32_t>(meta.size());
  meta.push_back(e);
  meta_at.resize(gate_count(), no_id);
  for (gate_id g : e.gates)
    if (g != no_id) meta_at[g] = at;
  return at;
}

void netlist::set_arcs(gate_id g, std::span<const gate_delay> a) {
  SETTLE_CHECK(a.size() == fanin_begin[g + 1] - fanin_begin[g] && !a.empty(),
               "set_arcs takes one delay per fan-in");
  arc_at.resize(gate_count(), no_id);  // gates added since the last call have none
  arc_at[g] = static_cast<std::uint32_t>(arcs.size());
  arcs.insert(arcs.end(), a.begin(), a.end());
  gate_delay env = a.front();
  env.transport = delay[g].transport;
  for (const auto& d : a) {
    for (auto [e, x] : {std::pair{&env.rise, &d.rise}, std::pair{&env.fall, &d.fall}}) {
      e->min = std::min(e->min, x->min);
      e->max = std::max(e->max, x->max);
      e->typ = std::clamp(std::max(e->typ, x->typ), e->min, e->max);
    }
  }
  for (auto& d : arcs) d.transport = env.transport;
  delay.assign(g, env);
}

time_fs netlist::largest_max_delay() const {
  time_fs m = 0;
  if (delay.empty()) return m;
  for (const auto& d : delay.records()) m = std::max({m, d.rise.max, d.fall.max});
  return m;
}

time_fs netlist::smallest_min_delay() const {
  time_fs m = 0;
  if (delay.empty()) return m;
  for (const auto& d : delay.records())
    for (const time_fs t : {d.rise.min, d.fall.min})
      if (t != 0 && (m == 0 || t < m)) m = t;
  return m;
}

net_id netlist::find(std::string_view name) const {
  const auto v = names_.find(std::hash<std::string_view>{}(name),
                             [&](std::uint32_t v) { return key_of(v) == name; });
  if (v == no_id) return no_id;
  return v & extra_bit ? extra_names_[v & ~extra_bit].second : v;
}

bool netlist::add_name(std::string full_name, net_id id) {
  const auto h = std::hash<std::string_view>{}(full_name);
  if (names_.find(h, [&](std::uint32_t v) { return key_of(v) == full_name; }) != no_id)
    return false;
  const auto v = static_cast<std::uint32_t>(extra_names_.size()) | extra_bit;
  extra_names_.emplace_back(std::move(full_name), id);
  names_.insert(h, v, [&](std::uint32_t x) { return std::hash<std::string_view>{}(key_of(x)); });
  return true;
}

void netlist::reserve_nets(std::size_t nets) {
  names_.reserve(nets, [&](std::uint32_t x) { return std::hash<std::string_view>{}(key_of(x)); });
  net_name.reserve(nets);
  driver.reserve(nets);
  init.reserve(nets);
  net_scope.reserve(nets);
}

void netlist::begin() {
  scopes.push_back(scope{});
  for (const char* name : {"$const0", "$const1"}) {
    net_name.emplace_back(name);
    driver.push_back(no_id);
    init.push_back(net_name.size() == 1 ? logic::zero : logic::one);
    net_scope.push_back(0);
  }
}

net_id netlist::add_net(std::string full_name, std::uint32_t scope_index) {
  auto id = static_cast<net_id>(net_name.size());
  const auto h = std::hash<std::string_view>{}(full_name);
  const bool known =
      names_.find(h, [&](std::uint32_t v) { return key_of(v) == full_name; }) != no_id;
  net_name.push_back(std::move(full_name));
  if (!known)
    names_.insert(h, id, [&](std::uint32_t x) { return std::hash<std::string_view>{}(key_of(x)); });
  driver.push_back(no_id);
  init.push_back(logic::x);
  net_scope.push_back(scope_index);
  return id;
}

gate_id netlist::add_gate(gate_kind k, net_id out, const std::vector<net_id>& in,
                          const std::vector<std::uint32_t>& program, const gate_delay& d,
                          source_loc loc) {
  auto g = static_cast<gate_id>(kind.size());
  if (fanin_begin.empty()) fanin_begin.push_back(0);
  if (code_begin.empty()) code_begin.push_back(0);
  kind.push_back(k);
  gate_out.push_back(out);
  fanin.insert(fanin.end(), in.begin(), in.end());
  fanin_begin.push_back(static_cast<std::uint32_t>(fanin.size()));
  code.insert(code.end(), program.begin(), program.end());
  code_begin.push_back(static_cast<std::uint32_t>(code.size()));
  delay.push_back(d);
  gate_loc.push_back(loc);
  driver[out] = g;
  return g;
}

void netlist::mark_enumerated_gates() {
  enumerate.assign(gate_count(), 0);
  std::vector<gate_id> seen(net_name.size(), no_id);
  for (gate_id g = 0; g < gate_count(); ++g) {
    const auto k = kind[g];
    if (k == gate_kind::expr || k == gate_kind::gc) {
      enumerate[g] = 1;
      continue;
    }
    // and/or/nand/nor are idempotent, so a repeated input changes nothing.
    if (k == gate_kind::and_ || k == gate_kind::nand || k == gate_kind::or_ ||
        k == gate_kind::nor || k == gate_kind::buf || k == gate_kind::inv)
      continue;
    bool dup = false;
    if (holds_state(k)) seen[gate_out[g]] = g;
    for (auto i = fanin_begin[g]; i < fanin_begin[g + 1]; ++i) {
      if (seen[fanin[i]] == g) dup = true;
      seen[fanin[i]] = g;
    }
    enumerate[g] = dup;
  }
}

void netlist::finish() {
  if (fanin_begin.empty()) fanin_begin.push_back(0);
  if (code_begin.empty()) code_begin.push_back(0);
  const auto nets = net_name.size();
  mark_enumerated_gates();
  // Each gate appears once per distinct input net, so a net read twice by one
  // gate wakes it once: `last` remembers the last gate counted for each net.
  // The counts become the CSR offsets in place, and the lists fill from the
  // back (gates in reverse), so no second array of offsets is needed.
  std::vector<gate_id> last(nets, no_id);
  fanout_begin.assign(nets + 1, 0);
  for (gate_id g = 0; g < gate_count(); ++g)
    for (auto i = fanin_begin[g]; i < fanin_begin[g + 1]; ++i)
      if (last[fanin[i]] != g) last[fanin[i]] = g, ++fanout_begin[fanin[i] + 1];
  for (std::size_t i = 0; i < nets; ++i) fanout_begin[i + 1] += fanout_begin[i];
  fanout.assign(fanout_begin[nets], 0);
  std::fill(last.begin(), last.end(), no_id);
  // fanout_begin[n + 1] is the end of net n's list; filling it from the back
  // moves it down to the list's start, which is net n's begin.
  for (gate_id g = static_cast<gate_id>(gate_count()); g-- > 0;)
    for (auto i = fanin_begin[g]; i < fanin_begin[g + 1]; ++i)
      if (last[fanin[i]] != g) last[fanin[i]] = g, fanout[--fanout_begin[fanin[i] + 1]] = g;
  // Now fanout_begin[n + 1] holds net n's begin: shift down by one.
  for (std::size_t i = 0; i < nets; ++i) fanout_begin[i] = fanout_begin[i + 1];
  fanout_begin[nets] = static_cast<std::uint32_t>(fanout.size());
}

std::string netlist::names_of(const std::vector<net_id>& nets) const {
  std::string out;
  for (net_id id : nets) out += (out.empty() ? "" : ", ") + net_name[id];
  return out;
}

}  // namespace settle
