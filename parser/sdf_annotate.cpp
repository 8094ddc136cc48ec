// SDF back-annotation onto the flat netlist: IOPATH entries become arcs of
// the gate driving the cell's output (the gates between, in a cell of
// several, take zero delay); INTERCONNECT and PORT entries an added delay on
// the load gate's arc from that net (an approximation: the netlist has no
// element for a wire of its own, so the delay joins the load's arc).
#include <fmt/format.h>

#include <algorithm>
#include <unordered_map>
#include <unordered_set>

#include "parser/sdf.hpp"
#include "sim/model/time.hpp"

namespace settle {
namespace {

class annotator {
 public:
  annotator(netlist& n, const sdf_file& f, diagnostics& diags, sdf_report& r)
      : n_(n), f_(f), diags_(diags), r_(r) {}

  void run() {
    prepare();
    for (const auto& c : f_.cells) cell(c);
    finish();
  }

 private:
  void warn(sdf_pos at, std::string msg) {
    diags_.add(sdf_diagnostic(f_, diagnostic::level::warning, at, std::move(msg)));
  }

  std::uint32_t scope_of_gate(gate_id g) const {
    return g < n_.gate_scope.size() ? n_.gate_scope[g] : 0;
  }
  bool within(std::uint32_t s, std::uint32_t ancestor) const {
    for (;;) {
      if (s == ancestor) return true;
      if (s == 0 || s >= n_.scopes.size()) return false;
      s = n_.scopes[s].parent;
      if (s == no_id) return false;
    }
  }

  void prepare() {
    const auto arcs = n_.fanin.size();
    if (r_.touched.size() != arcs) {
      r_.touched.assign(arcs, 0);
      r_.path.resize(arcs);
      r_.wire_rise.assign(arcs, {});
      r_.wire_fall.assign(arcs, {});
      for (gate_id g = 0; g < n_.gate_count(); ++g) {
        const auto own = n_.arcs_of(g);
        for (auto i = n_.fanin_begin[g]; i < n_.fanin_begin[g + 1]; ++i)
          r_.path[i] = own.empty() ? n_.delay[g] : own[i - n_.fanin_begin[g]];
      }
    }
    const auto scopes = n_.scopes.size();
    full_.assign(scopes, "");
    children_.assign(scopes, {});
    gates_in_.assign(scopes, 0);
    for (std::uint32_t s = 1; s < scopes; ++s) {
      const auto p = n_.scopes[s].parent;
      // parents come before their children
      full_[s] = (p == 0 || p == no_id ? "" : full_[p] + ".") + n_.scopes[s].name;
      if (p != no_id && p < scopes) children_[p].push_back(s);
    }
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      for (std::uint32_t s = scope_of_gate(g);;) {
        ++gates_in_[s];
        if (s == 0) break;
        s = n_.scopes[s].parent;
        if (s == no_id || s >= scopes) break;
      }
  }

  /// The scopes a CELL's INSTANCE path names.
  std::vector<std::uint32_t> matches(const sdf_cell& c) const {
    std::vector<std::uint32_t> at{0};
    for (const auto& seg : c.segments) {
      std::vector<std::uint32_t> next;
      for (auto s : at)
        for (auto ch : children_[s])
          if (seg == "*" || n_.scopes[ch].name == seg) next.push_back(ch);
      at = std::move(next);
    }
    return at;
  }

  /// Resolves a port path (instances joined by the DIVIDER, then the port)
  /// below scope `s`: its scope and net, or no_id.
  std::pair<std::uint32_t, net_id> port_at(std::uint32_t s, const std::string& path) const {
    const std::vector<std::string> seg = split_sdf_path(path, f_.divider);
    for (std::size_t i = 0; i + 1 < seg.size(); ++i) {
      std::uint32_t found = no_id;
      for (auto ch : children_[s])
        if (n_.scopes[ch].name == seg[i]) found = ch;
      if (found == no_id) return {no_id, no_id};
      s = found;
    }
    const std::string name = (full_[s].empty() ? "" : full_[s] + ".") + seg.back();
    return {s, n_.find(name)};
  }

  std::string shown(std::uint32_t s) const { return s == 0 ? "the top" : "'" + full_[s] + "'"; }

  void cell(const sdf_cell& c) {
    const auto found = matches(c);
    if (found.empty()) {
      r_.unmatched_instances.push_back(c.instance.empty() ? "(top)" : c.instance);
      warn(c.pos, fmt::format("INSTANCE '{}' matches no instance of the design", c.instance));
      return;
    }
    std::size_t used = 0;
    for (auto s : found) {
      const std::string& block = n_.scopes[s].block;
      if (s != 0 && !c.celltype.empty() && block != c.celltype) {
        if (!c.wildcard)
          warn(c.pos, fmt::format("instance '{}' is a '{}', not the CELLTYPE '{}': skipped",
                                  full_[s], block, c.celltype));
        continue;
      }
      ++used;
      for (const auto& e : c.entries) entry(s, e);
    }
    if (used == 0 && c.wildcard) {
      r_.unmatched_instances.push_back(c.instance);
      warn(c.pos, fmt::format("INSTANCE '{}' matches no instance of CELLTYPE '{}'", c.instance,
                              c.celltype));
    }
  }

  void entry(std::uint32_t s, const sdf_entry& e) {
    if (e.what == sdf_entry::kind::iopath) return iopath(s, e);
    wire(s, e);
  }

  static std::string words(const sdf_entry& e) {
    return (e.edge.empty() ? e.from : "(" + e.edge + " " + e.from + ")") + " -> " + e.to;
  }

  void iopath(std::uint32_t s, const sdf_entry& e) {
    const std::string prefix = full_[s].empty() ? "" : full_[s] + ".";
    const net_id in = n_.find(prefix + e.from), out = n_.find(prefix + e.to);
    if (in == no_id || out == no_id) {
      warn(e.pos, fmt::format("IOPATH {}: {} has no port '{}': skipped", words(e), shown(s),
                              in == no_id ? e.from : e.to));
      return;
    }
    const gate_id g = n_.driver[out];
    if (g == no_id || !within(scope_of_gate(g), s)) {
      warn(e.pos, fmt::format("IOPATH {}: port '{}' of {} is not driven by its gate: skipped",
                              words(e), e.to, shown(s)));
      return;
    }
    std::vector<std::uint32_t> at, between;
    if (gates_in_[s] == 1) {
      for (auto i = n_.fanin_begin[g]; i < n_.fanin_begin[g + 1]; ++i)
        if (n_.fanin[i] == in) at.push_back(i);
    } else {
      cone(s, in, g, at, between);
    }
    if (at.empty()) {
      warn(e.pos, fmt::format("IOPATH {}: '{}' {} the gate driving '{}' in {}: skipped", words(e),
                              e.from, gates_in_[s] == 1 ? "is not an input of" : "does not reach",
                              e.to, shown(s)));
      return;
    }
    // Inside a cell of several gates the path's delay is the output gate's:
    // the gates between take none (a cell's module path is its whole delay).
    if (!e.increment)
      for (auto i : between) {
        r_.path[i].rise = r_.path[i].fall = delay_range{};
        r_.touched[i] = 1;
      }
    const bool qualified = !e.cond.empty() || e.condelse || !e.edge.empty();
    if (qualified)
      warn(e.pos, fmt::format("IOPATH {}{}: settle takes the widest range over the conditions "
                              "and edges of this arc",
                              e.cond.empty() ? (e.condelse ? "under CONDELSE " : "")
                                             : "under COND " + e.cond + " ",
                              words(e)));
    for (auto i : at) {
      bool merge = false;
      if (!e.increment) {
        // a further condition or edge of an arc set in this file widens it,
        // and so does a second source meeting the first inside a cell
        auto [it, fresh] = set_here_.emplace(i, set_by{qualified, in});
        const bool met = !fresh && it->second.from != in;
        merge = !fresh && (qualified || it->second.qualified || met);
        it->second.qualified = it->second.qualified || qualified;
        if (met && !met_at_) met_at_ = e.pos;
        met_ += met;
      }
      set(r_.path[i].rise, e.values[0], e.increment, merge);
      set(r_.path[i].fall, e.values.size() > 1 ? e.values[1] : e.values[0], e.increment, merge);
      r_.touched[i] = 1;
    }
  }

  /// The arcs of gate `g` (driving a port of cell `s`) from `in` or from a net
  /// between `in` and g, and the arcs of the gates between from `in` or such
  /// a net: every path of gates of the cell from `in` to g.
  void cone(std::uint32_t s, net_id in, gate_id g, std::vector<std::uint32_t>& at,
            std::vector<std::uint32_t>& between) {
    auto inside = [&](gate_id h) { return within(scope_of_gate(h), s); };
    // forward from `in` through the cell's gates (not past g), backward from g
    std::unordered_set<net_id> ahead{in};
    std::vector<net_id> work{in};
    while (!work.empty()) {
      const net_id k = work.back();
      work.pop_back();
      for (auto i = n_.fanout_begin[k]; i < n_.fanout_begin[k + 1]; ++i) {
        const gate_id h = n_.fanout[i];
        if (h == g || !inside(h)) continue;
        if (ahead.insert(n_.gate_out[h]).second) work.push_back(n_.gate_out[h]);
      }
    }
    std::unordered_set<gate_id> behind{g};
    std::vector<gate_id> gates{g};
    while (!gates.empty()) {
      const gate_id h = gates.back();
      gates.pop_back();
      for (auto i = n_.fanin_begin[h]; i < n_.fanin_begin[h + 1]; ++i) {
        const net_id k = n_.fanin[i];
        if (!ahead.count(k)) continue;
        if (h == g)
          at.push_back(i);
        else
          between.push_back(i);
        const gate_id d = k > netlist::const1 ? n_.driver[k] : no_id;
        if (d != no_id && inside(d) && behind.insert(d).second) gates.push_back(d);
      }
    }
    std::sort(at.begin(), at.end());
    std::sort(between.begin(), between.end());
  }

  void wire(std::uint32_t s, const sdf_entry& e) {
    const bool port = e.what == sdf_entry::kind::port;
    const char* what = port ? "PORT" : "INTERCONNECT";
    const auto [ls, net] = port_at(s, port ? e.from : e.to);
    const std::string load = port ? e.from : e.to;
    if (net == no_id) {
      warn(e.pos, fmt::format("{} {}: '{}' names no port below {}: skipped", what,
                              port ? e.from : e.from + " -> " + e.to, load, shown(s)));
      return;
    }
    if (!port) {
      const auto [ds, dnet] = port_at(s, e.from);
      if (dnet != net) {
        warn(e.pos, fmt::format("INTERCONNECT {} -> {}: '{}' {} : skipped", e.from, e.to, e.from,
                                dnet == no_id ? "names no port" : "is not on the same net"));
        return;
      }
      if (ls == s) {
        warn(e.pos, fmt::format("INTERCONNECT {} -> {}: the load '{}' is no instance's port: "
                                "skipped",
                                e.from, e.to, e.to));
        return;
      }
    }
    bool any = false;
    for (auto i = n_.fanout_begin[net]; i < n_.fanout_begin[net + 1]; ++i) {
      const gate_id g = n_.fanout[i];
      if (!within(scope_of_gate(g), ls)) continue;
      for (auto k = n_.fanin_begin[g]; k < n_.fanin_begin[g + 1]; ++k) {
        if (n_.fanin[k] != net) continue;
        set(r_.wire_rise[k], e.values[0], e.increment, false);
        set(r_.wire_fall[k], e.values.size() > 1 ? e.values[1] : e.values[0], e.increment, false);
        r_.touched[k] = 1;
        any = true;
      }
    }
    if (!any)
      warn(e.pos, fmt::format("{}: no gate of {} reads '{}': skipped", what, shown(ls), load));
  }

  /// Applies one SDF value to a range: replaces it (ABSOLUTE), adds to it
  /// (INCREMENT, never below 0) or widens it (a further condition of an arc).
  static void set(delay_range& d, const std::optional<sdf_triple>& v, bool increment, bool merge) {
    if (!v) return;  // () leaves the edge as it was
    // a part left out takes the others: min and max the nearest written, typ their midpoint
    std::int64_t lo = v->min ? *v->min : v->typ ? *v->typ : *v->max;
    std::int64_t hi = v->max ? *v->max : v->typ ? *v->typ : *v->min;
    std::int64_t mid = v->typ ? *v->typ : lo + (hi - lo) / 2;
    auto add = [](time_fs a, std::int64_t b) -> time_fs {
      if (b >= 0) return saturating_add(a, static_cast<time_fs>(b));
      const auto m = static_cast<time_fs>(-(b + 1)) + 1;
      return m >= a ? 0 : a - m;
    };
    if (increment) {
      d = {add(d.min, lo), add(d.typ, mid), add(d.max, hi)};
      return;
    }
    const delay_range x{add(0, lo), add(0, mid), add(0, hi)};
    if (merge)
      d = {std::min(d.min, x.min), std::max(d.typ, x.typ), std::max(d.max, x.max)};
    else
      d = x;
  }

  void finish() {
    if (met_)
      warn(*met_at_, fmt::format("{} arc{} inside cells of several gates {} timed by more than one "
                                 "IOPATH (inputs meeting before the output gate); each takes the "
                                 "widest range of them",
                                 met_, met_ == 1 ? "" : "s", met_ == 1 ? "is" : "are"));
    std::vector<gate_delay> arcs;
    std::uint64_t annotated = 0, kept = 0;
    for (gate_id g = 0; g < n_.gate_count(); ++g) {
      const auto b = n_.fanin_begin[g], e = n_.fanin_begin[g + 1];
      bool any = false;
      for (auto i = b; i < e; ++i) any = any || r_.touched[i];
      if (!any) {
        ++kept;
        continue;
      }
      arcs.clear();
      for (auto i = b; i < e; ++i) {
        annotated += r_.touched[i];
        gate_delay a = r_.path[i];
        for (auto [x, w] :
             {std::pair{&a.rise, &r_.wire_rise[i]}, std::pair{&a.fall, &r_.wire_fall[i]}}) {
          x->min = saturating_add(x->min, w->min);
          x->typ = saturating_add(x->typ, w->typ);
          x->max = saturating_add(x->max, w->max);
        }
        arcs.push_back(a);
      }
      n_.set_arcs(g, arcs);
    }
    r_.arcs_annotated = annotated;
    r_.gates_kept = kept;
  }

  netlist& n_;
  const sdf_file& f_;
  diagnostics& diags_;
  sdf_report& r_;
  std::vector<std::string> full_;
  std::vector<std::vector<std::uint32_t>> children_;
  std::vector<std::uint32_t> gates_in_;
  /// Arcs an ABSOLUTE IOPATH of this file set: whether a qualified one did, and from where.
  struct set_by {
    bool qualified;
    net_id from;
  };
  std::unordered_map<std::uint32_t, set_by> set_here_;
  std::uint64_t met_ = 0;  ///< arcs a second IOPATH source widened
  std::optional<sdf_pos> met_at_;
};

}  // namespace

bool annotate_sdf(netlist& n, const sdf_file& f, diagnostics& diags, sdf_report& report) {
  ++report.files;
  annotator(n, f, diags, report).run();
  return !diags.has_errors();
}

}  // namespace settle
