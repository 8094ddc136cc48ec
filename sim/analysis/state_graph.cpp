// State-graph exploration under the gmw and single-winner models (Muller and Bartky 1959;
// Brzozowski and Seger, Asynchronous Circuits, 1995), components and hazards on the graph.
#include "sim/analysis/state_graph.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <bit>
#include <cstring>

#include "sim/analysis/graph.hpp"
#include "sim/kernel/eval.hpp"

namespace settle {
namespace {

std::uint64_t hash_words(const std::uint64_t* s, std::size_t n) {
  std::uint64_t h = 0x9e3779b97f4a7c15ull ^ n;
  for (std::size_t i = 0; i < n; ++i) {
    h ^= s[i] + 0x9e3779b97f4a7c15ull + (h << 6) + (h >> 2);
    h *= 0xbf58476d1ce4e5b9ull;
    h ^= h >> 31;
  }
  return h;
}

}  // namespace

state_graph::state_graph(std::size_t gates)
    : gates_(gates), shown_(gates), words_(std::max<std::size_t>(1, (gates + 63) / 64)) {
  ids_.reserve(512, [&](std::uint32_t i) { return hash_of(i); });
}

std::size_t state_graph::hash_of(std::uint32_t i) const { return hash_words(state(i), words_); }

std::string state_graph::bits_text(std::uint32_t i) const {
  std::string s(shown_, '0');
  for (std::size_t g = 0; g < shown_; ++g) s[g] = bit(i, static_cast<gate_id>(g)) ? '1' : '0';
  return s;
}

std::string state_text(std::span<const std::uint8_t> gates) {
  std::string s(gates.size(), '0');
  for (std::size_t g = 0; g < gates.size(); ++g) s[g] = gates[g] ? '1' : '0';
  return s;
}

std::string state_order_text(const netlist& n) {
  std::string order;
  for (gate_id g = 0; g < n.gate_count(); ++g) order += (g ? " " : "") + n.gate_name(g);
  return order;
}

std::size_t state_graph::bytes() const {
  return arena_.capacity() * 8 + ids_.bytes() + edge_to.capacity() * 4 + edge_begin.capacity() * 4 +
         parent.capacity() * 4;
}

std::pair<std::uint32_t, bool> state_graph::intern(const std::uint64_t* s, std::uint32_t from) {
  const std::size_t h = hash_words(s, words_);
  const std::uint32_t found =
      ids_.find(h, [&](std::uint32_t i) { return std::memcmp(state(i), s, words_ * 8) == 0; });
  if (found != no_id) return {found, false};
  const std::uint32_t id = size();
  arena_.insert(arena_.end(), s, s + words_);
  parent.push_back(from);
  ids_.insert(h, id, [&](std::uint32_t i) { return hash_of(i); });
  return {id, true};
}

bool state_graph::explore(const netlist& n, std::span<const logic> inputs, race_model m,
                          const graph_limits& lim, std::string& stop) {
  starts = size();
  std::vector<logic> v(inputs.begin(), inputs.end());
  std::vector<std::uint64_t> cur(words_);
  std::vector<gate_id> excited;
  edge_begin.clear();
  edge_to.clear();
  const std::size_t gates = n.gate_count();
  for (explored = 0; explored < size(); ++explored) {
    const std::uint32_t i = explored;
    if (size() > lim.max_states) {
      stop = fmt::format(
          "state budget reached: {} states found, {} of them explored (--max-states {})", size(), i,
          lim.max_states);
      break;
    }
    // bytes() is a few capacity reads, so the guard is checked at every state:
    // one gmw state can add up to 2^20 edges.
    if (lim.max_bytes && lim.held_bytes + bytes() > lim.max_bytes) {
      stop = fmt::format(
          "memory limit reached: the state graphs hold {:.1f} MiB after {} states, {} of them "
          "explored (--max-memory {} MiB)",
          static_cast<double>(lim.held_bytes + bytes()) / (1 << 20), size(), i,
          lim.max_bytes >> 20);
      break;
    }
    if (edge_to.size() > UINT32_MAX - (std::size_t{1} << 21)) {
      stop = fmt::format("edge limit reached: {} edges after {} states ({} explored)",
                         edge_to.size(), size(), i);
      break;
    }
    std::memcpy(cur.data(), state(i), words_ * 8);
    for (gate_id g = 0; g < gates; ++g) v[n.gate_out[g]] = from_bool((cur[g >> 6] >> (g & 63)) & 1);
    excited.clear();
    for (gate_id g = 0; g < gates; ++g) {
      const logic present = v[n.gate_out[g]];
      // A gc gate with set and reset both true gives x: its output may take
      // either value, so it counts as excited (it may flip).
      if (eval_gate(n, g, v.data(), present) != present) excited.push_back(g);
    }
    edge_begin.push_back(static_cast<std::uint32_t>(edge_to.size()));
    if (excited.size() >= 2) any_race = true;
    if (m == race_model::single || excited.size() == 1) {
      for (gate_id g : excited) {
        cur[g >> 6] ^= std::uint64_t{1} << (g & 63);
        edge_to.push_back(intern(cur.data(), i).first);
        cur[g >> 6] ^= std::uint64_t{1} << (g & 63);
      }
      continue;
    }
    if (excited.size() > static_cast<std::size_t>(lim.max_excited)) {
      edge_begin.pop_back();
      stop = fmt::format(
          "state {} has {} excited gates; gmw would need {} successors from it (the limit is {} "
          "excited gates): use --model single or ternary",
          i, excited.size(), (std::uint64_t{1} << std::min<std::size_t>(excited.size(), 63)) - 1,
          lim.max_excited);
      break;
    }
    // Every non-empty subset of the excited gates, in Gray-code order: one bit
    // toggles from one subset to the next.
    const std::uint64_t subsets = std::uint64_t{1} << excited.size();
    for (std::uint64_t j = 1; j < subsets; ++j) {
      const gate_id g = excited[std::countr_zero(j)];
      cur[g >> 6] ^= std::uint64_t{1} << (g & 63);
      edge_to.push_back(intern(cur.data(), i).first);
    }
  }
  edge_begin.push_back(static_cast<std::uint32_t>(edge_to.size()));
  return explored == size();
}

scc_info strongly_connected(const state_graph& g) {
  const std::uint32_t n = g.size();
  auto out_begin = [&](std::uint32_t v) { return v < g.explored ? g.edge_begin[v] : 0u; };
  auto out_end = [&](std::uint32_t v) { return v < g.explored ? g.edge_begin[v + 1] : 0u; };
  scc_info r;
  r.comp.assign(n, no_id);
  for_each_component(
      n, out_begin, out_end, [&](std::uint32_t e) { return g.edge_to[e]; },
      [&](std::span<const std::uint32_t> members) {
        for (std::uint32_t v : members) r.comp[v] = r.count;
        ++r.count;
      });

  const std::size_t words = g.words();
  r.size.assign(r.count, 0);
  r.terminal.assign(r.count, 1);
  r.nontransient.assign(r.count, 0);
  r.slot.assign(r.count, no_id);
  for (std::uint32_t v = 0; v < n; ++v) ++r.size[r.comp[v]];
  std::uint32_t slots = 0;
  for (std::uint32_t c = 0; c < r.count; ++c)
    if (r.size[c] > 1) r.slot[c] = slots++;
  r.fired_inside.assign(std::size_t{slots} * words, 0);
  std::vector<std::uint64_t> always(std::size_t{slots} * words, ~std::uint64_t{0}), ex(words);
  for (std::uint32_t v = 0; v < n; ++v) {
    const std::uint32_t c = r.comp[v], sl = r.slot[c];
    std::fill(ex.begin(), ex.end(), 0);
    for (auto e = out_begin(v); e < out_end(v); ++e) {
      const std::uint32_t w = g.edge_to[e];
      const bool inside = r.comp[w] == c;
      if (!inside) r.terminal[c] = 0;
      for (std::size_t k = 0; k < words; ++k) {
        const std::uint64_t fired = g.state(v)[k] ^ g.state(w)[k];
        ex[k] |= fired;
        if (inside) r.fired_inside[std::size_t{sl} * words + k] |= fired;
      }
    }
    if (sl != no_id)
      for (std::size_t k = 0; k < words; ++k) always[std::size_t{sl} * words + k] &= ex[k];
  }
  // A cycle is transient when some gate stays excited and unchanged along it;
  // a component holds a cycle that is not when no gate is excited in all of its
  // states without ever firing inside it (the cycle can then visit, for every
  // gate, a state where it rests or an edge where it fires).
  for (std::uint32_t c = 0; c < r.count; ++c) {
    if (r.slot[c] == no_id) continue;
    bool ok = true;
    for (std::size_t k = 0; k < words; ++k)
      if (always[std::size_t{r.slot[c]} * words + k] &
          ~r.fired_inside[std::size_t{r.slot[c]} * words + k])
        ok = false;
    r.nontransient[c] = ok;
  }
  return r;
}

std::vector<bool> hazard_gates(const state_graph& g, const scc_info& s,
                               std::span<const gate_id> gates) {
  const std::uint32_t n = g.size();
  const std::size_t k = gates.size(), words = g.words();
  std::vector<bool> out(k, false);
  if (k == 0 || n == 0) return out;
  // States grouped by component; components in topological order are ids descending.
  std::vector<std::uint32_t> first(s.count + 1, 0), order(n);
  for (std::uint32_t v = 0; v < n; ++v) ++first[s.comp[v] + 1];
  for (std::uint32_t c = 0; c < s.count; ++c) first[c + 1] += first[c];
  {
    std::vector<std::uint32_t> at(first.begin(), first.end() - 1);
    for (std::uint32_t v = 0; v < n; ++v) order[at[s.comp[v]]++] = v;
  }
  // toggles[c * k + j]: most changes of gate j on a path from a start into c, capped at 2; 255 =
  // unreached
  std::vector<std::uint8_t> toggles(std::size_t{s.count} * k, 255);
  for (std::uint32_t v = 0; v < g.starts && v < n; ++v)
    for (std::size_t j = 0; j < k; ++j) toggles[std::size_t{s.comp[v]} * k + j] = 0;
  auto fires = [&](std::uint32_t a, std::uint32_t b, gate_id gate) {
    return ((g.state(a)[gate >> 6] ^ g.state(b)[gate >> 6]) >> (gate & 63)) & 1;
  };
  for (std::uint32_t c = s.count; c-- > 0;) {
    std::uint8_t* t = &toggles[std::size_t{c} * k];
    if (s.slot[c] != no_id)
      for (std::size_t j = 0; j < k; ++j) {
        const gate_id gate = gates[j];
        if (t[j] != 255 &&
            ((s.fired_inside[std::size_t{s.slot[c]} * words + (gate >> 6)] >> (gate & 63)) & 1))
          t[j] = 2;  // a cycle that fires the gate: it can change any number of times
      }
    for (std::uint32_t i = first[c]; i < first[c + 1]; ++i) {
      const std::uint32_t v = order[i];
      if (v >= g.explored) continue;
      for (auto e = g.edge_begin[v]; e < g.edge_begin[v + 1]; ++e) {
        const std::uint32_t w = g.edge_to[e], d = s.comp[w];
        if (d == c) continue;
        for (std::size_t j = 0; j < k; ++j) {
          if (t[j] == 255) continue;
          const std::uint8_t nt = static_cast<std::uint8_t>(
              std::min(2, t[j] + static_cast<int>(fires(v, w, gates[j]))));
          std::uint8_t& dt = toggles[std::size_t{d} * k + j];
          if (dt == 255 || nt > dt) dt = nt;
        }
      }
    }
  }
  for (std::uint32_t c = 0; c < s.count; ++c)
    for (std::size_t j = 0; j < k; ++j)
      if (toggles[std::size_t{c} * k + j] == 2 && toggles[std::size_t{c} * k + j] != 255)
        out[j] = true;
  return out;
}

}  // namespace settle
