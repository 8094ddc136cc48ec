// Netlist construction helpers and queries.
#include "sim/netlist.hpp"

#include <algorithm>

namespace settle {

const char* kind_name(gate_kind k) {
  static constexpr const char* names[gate_kind_count] = {
      "buf", "not", "and", "nand", "or", "nor", "xor", "xnor", "mux", "maj", "c", "gc", "expr"};
  return names[static_cast<int>(k)];
}

time_fs netlist::largest_max_delay() const {
  time_fs m = 0;
  for (const auto& d : delay) m = std::max({m, d.rise.max, d.fall.max});
  return m;
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
  by_name.emplace(full_name, id);
  net_name.push_back(std::move(full_name));
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
    if (k == gate_kind::and_ || k == gate_kind::nand || k == gate_kind::or_ || k == gate_kind::nor ||
        k == gate_kind::buf || k == gate_kind::inv)
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
  std::vector<std::uint32_t> count(nets + 1, 0);
  // Each gate appears once per distinct input net, so a net read twice by one
  // gate wakes it once.
  std::vector<gate_id> last(nets, no_id);
  for (gate_id g = 0; g < gate_count(); ++g)
    for (auto i = fanin_begin[g]; i < fanin_begin[g + 1]; ++i)
      if (last[fanin[i]] != g) last[fanin[i]] = g, ++count[fanin[i] + 1];
  for (std::size_t i = 0; i < nets; ++i) count[i + 1] += count[i];
  fanout_begin = count;
  fanout.assign(count[nets], 0);
  std::fill(last.begin(), last.end(), no_id);
  for (gate_id g = 0; g < gate_count(); ++g)
    for (auto i = fanin_begin[g]; i < fanin_begin[g + 1]; ++i)
      if (last[fanin[i]] != g) last[fanin[i]] = g, fanout[count[fanin[i]]++] = g;
}

}  // namespace settle
