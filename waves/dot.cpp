// Writes explored state graphs as Graphviz DOT into one buffer.
#include "waves/dot.hpp"

#include <fmt/format.h>

namespace settle {
namespace {

// A DOT double-quoted string body: quotes and backslashes escaped.
std::string quoted(const std::string& s) {
  std::string out;
  for (char c : s) {
    if (c == '"' || c == '\\') out += '\\';
    out += c == '\n' ? ' ' : c;
  }
  return out;
}

}  // namespace

std::uint64_t kept_states(const explore_result& r) {
  std::uint64_t total = 0;
  for (const auto& s : r.steps)
    if (s.graph) total += s.graph->size();
  return total;
}

std::string state_graph_dot(const netlist& n, const explore_result& r, const std::string& title) {
  fmt::memory_buffer b;
  auto out = std::back_inserter(b);
  const std::string order = state_order_text(n);
  fmt::format_to(out, "digraph \"{}\" {{\n", quoted(title));
  fmt::format_to(out, "  label=\"{} - model {} - state bits: {}\";\n  labelloc=t;\n", quoted(title),
                 model_name(r.model), quoted(order));
  fmt::format_to(out, "  node [shape=ellipse, fontname=\"monospace\"];\n  edge [fontsize=10];\n");
  for (const auto& s : r.steps) {
    if (!s.graph) continue;
    const state_graph& g = *s.graph;
    fmt::format_to(out, "  subgraph cluster_step{} {{\n    label=\"step {}: {}{}\";\n", s.index,
                   s.index, quoted(s.label), s.complete ? "" : " (incomplete)");
    for (std::uint32_t v = 0; v < g.size(); ++v) {
      const std::string bits = g.bits_text(v);
      const bool stable = v < g.explored && g.is_stable(v);
      fmt::format_to(out, "    s{}_{} [label=\"{}\"{}{}];\n", s.index, v, bits,
                     stable ? ", peripheries=2" : "", v < g.starts ? ", style=bold" : "");
    }
    for (std::uint32_t v = 0; v < g.explored; ++v)
      for (auto e = g.edge_begin[v]; e < g.edge_begin[v + 1]; ++e) {
        const std::uint32_t w = g.edge_to[e];
        std::string fired;
        for (gate_id k = 0; k < n.gate_count(); ++k)
          if (g.bit(v, k) != g.bit(w, k)) fired += (fired.empty() ? "" : ",") + n.gate_name(k);
        fmt::format_to(out, "    s{}_{} -> s{}_{} [label=\"{}\"];\n", s.index, v, s.index, w,
                       quoted(fired));
      }
    fmt::format_to(out, "  }}\n");
  }
  fmt::format_to(out, "}}\n");
  return fmt::to_string(b);
}

}  // namespace settle
