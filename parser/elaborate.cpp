// Elaboration: IR scopes -> flat netlist, with an explicit work stack (no recursion over the
// hierarchy).
#include <fmt/format.h>

#include <span>
#include <unordered_map>
#include <unordered_set>

#include "parser/ir.hpp"

namespace settle::ir {
namespace {

std::string at_text(source_loc l) { return fmt::format("{}:{}", l.line, l.col); }

std::string cat(std::string_view a, std::string_view b, std::string_view c = {}) {
  std::string s;
  s.reserve(a.size() + b.size() + c.size());
  s.append(a).append(b).append(c);
  return s;
}

/// One placed scope waiting to be elaborated.
struct frame {
  const scope_def* def = nullptr;
  std::uint32_t scope = 0;
  std::string prefix;                                      // "deb." for an instance
  std::vector<std::pair<std::string_view, net_id>> bound;  // port -> parent net
  bool dry = false;                                        // check an unused block only
};

/// The names of one placed scope. At top level the netlist's own name table
/// doubles as the scope's (the full name is the local name), which saves two
/// big hash tables.
struct scope_names {
  bool top = false;
  std::unordered_map<std::string_view, net_id> local;
  std::unordered_map<std::string_view, source_loc> taken;
  std::unordered_set<std::string_view> in_ports;  // a block's input ports
};

class elaborator {
 public:
  elaborator(file& f, reporter& rep) : f_(f), rep_(rep) {}

  void run(netlist& nl) {
    nl.begin();
    reserve(nl);
    index_blocks();
    find_recursion();
    std::vector<frame> work;
    work.push_back(frame{&f_.top, 0, "", {}, false});
    drain(nl, work);
    if (aborted_) return;
    // Arcs go in once every gate is placed (the netlist sizes its arc index
    // by the gates it has when the first arc arrives).
    for (const auto& [g, at] : pending_arcs_)
      nl.set_arcs(g, std::span<const gate_delay>(arc_delays_.data() + at,
                                                 nl.fanin_begin[g + 1] - nl.fanin_begin[g]));
    // Unused blocks are checked in scratch netlists whose arcs are not kept.
    pending_arcs_.clear();
    nl.finish();
    top_inits(nl);
    final_checks(nl);
    // Blocks never placed are still checked, in a scratch netlist.
    for (std::size_t b = 0; b < f_.blocks.size(); ++b) {
      if (used_[b] || duplicate_[b]) continue;
      // An imported module library may hold many modules a design never places.
      if (!f_.blocks[b].rep)
        rep_.warning(f_.blocks[b].id.loc,
                     fmt::format("block '{}' is never instantiated", f_.blocks[b].id.name));
      netlist scratch;
      scratch.begin();
      std::vector<bool> saved_input;
      saved_input.swap(is_input_);
      std::vector<source_loc> saved_decl;
      saved_decl.swap(decl_loc_);
      std::vector<reporter*> saved_rep, saved_gate_rep;
      saved_rep.swap(decl_rep_);
      saved_gate_rep.swap(gate_rep_);
      work.push_back(frame{&f_.blocks[b], 0, cat(f_.blocks[b].id.name, "."), {}, true});
      drain(scratch, work);
      is_input_.swap(saved_input);
      decl_loc_.swap(saved_decl);
      decl_rep_.swap(saved_rep);
      gate_rep_.swap(saved_gate_rep);
    }
  }

 private:
  void index_blocks() {
    used_.assign(f_.blocks.size(), false);
    duplicate_.assign(f_.blocks.size(), false);
    for (std::size_t i = 0; i < f_.blocks.size(); ++i) {
      auto& b = f_.blocks[i];
      auto [it, fresh] = block_.emplace(b.id.name, static_cast<std::uint32_t>(i));
      if (!fresh) {
        rep_of(b).error(b.id.loc, fmt::format("block '{}' is already defined at {}", b.id.name,
                                              at_text(f_.blocks[it->second].id.loc)));
        duplicate_[i] = true;
      }
    }
  }

  /// Depth-first search over the block graph with an explicit stack; an edge
  /// back into the current path is a recursive instantiation.
  void find_recursion() {
    enum : std::uint8_t { white, grey, black };
    std::vector<std::uint8_t> colour(f_.blocks.size(), white);
    struct item {
      std::uint32_t block;
      std::size_t next;
    };
    for (std::uint32_t root = 0; root < f_.blocks.size(); ++root) {
      if (colour[root] != white || duplicate_[root]) continue;
      std::vector<item> path{{root, 0}};
      colour[root] = grey;
      while (!path.empty()) {
        auto& top = path.back();
        const auto& insts = f_.blocks[top.block].insts;
        if (top.next == insts.size()) {
          colour[top.block] = black;
          path.pop_back();
          continue;
        }
        const inst& in = insts[top.next++];
        auto it = block_.find(in.block.name);
        if (it == block_.end()) continue;
        if (colour[it->second] == grey) {
          std::string cycle;
          bool on = false;
          for (auto& p : path) {
            on = on || p.block == it->second;
            if (on) cycle += cat(f_.blocks[p.block].id.name, " -> ");
          }
          rep_of(f_.blocks[top.block])
              .error(in.block.loc,
                     fmt::format("recursive instantiation: {}{}", cycle, in.block.name));
          recursive_.insert(&in);
        } else if (colour[it->second] == white) {
          colour[it->second] = grey;
          path.push_back({it->second, 0});
        }
      }
    }
  }

  /// A top-level net name must not repeat one already in the netlist.
  bool claim_net_top(const netlist& nl, const ref& r) {
    const net_id n = nl.find(r.name);
    if (n == no_id) return true;
    cur_->error(r.loc, fmt::format("name '{}' is already declared at {}", r.name,
                                   where_text(decl_rep(n), decl_loc_[n])));
    return false;
  }

  /// Sizes the netlist's arrays for the top level, which holds most gates of big flat files.
  void reserve(netlist& nl) {
    const auto nets = f_.top.ins.size() + f_.top.outs.size() + f_.top.wires.size() + 2;
    const auto gates = f_.top_gates.size();
    nl.reserve_nets(nets);
    nl.aliases.reserve(nets);
    is_input_.reserve(nets);
    decl_loc_.reserve(nets);
    nl.kind.reserve(gates);
    nl.gate_out.reserve(gates);
    nl.fanin_begin.reserve(gates + 1);
    nl.code_begin.reserve(gates + 1);
    nl.delay.reserve(gates);
    nl.gate_loc.reserve(gates);
    nl.fanin.reserve(f_.top_reads);
  }

  net_id new_net(netlist& nl, std::string name, std::uint32_t scope, source_loc loc, bool input) {
    net_id id = nl.add_net(std::move(name), scope);
    is_input_.resize(nl.net_count(), false);
    decl_loc_.resize(nl.net_count());
    is_input_[id] = input;
    decl_loc_[id] = loc;
    if (cur_ != &rep_) {
      decl_rep_.resize(nl.net_count(), nullptr);
      decl_rep_[id] = cur_;
    }
    return id;
  }

  void drain(netlist& nl, std::vector<frame>& work) {
    while (!work.empty()) {
      frame fr = std::move(work.back());
      work.pop_back();
      place(nl, fr, work);
    }
  }

  /// Elaborates one scope: its names, gates, inits, and pushes its instances.
  void place(netlist& nl, const frame& fr, std::vector<frame>& work) {
    const scope_def& d = *fr.def;
    cur_ = &rep_of(d);
    cur_scope_ = fr.scope;
    scope_names names;
    names.top = fr.def == &f_.top;
    declare_names(nl, fr, names);
    auto place_one = [&](const gate& g, const scope_def& pools) {
      place_gate(nl, d, names, g, pools);
    };
    for (auto& g : d.gates) place_one(g, d);
    if (names.top && !stream_top_gates(place_one)) return;
    // Top-level inits may name nets inside instances: applied after elaboration.
    if (!names.top)
      for (auto& in : d.inits) {
        net_id n = lookup(nl, names, in.net);
        if (n != no_id) nl.init[n] = in.value;
      }
    for (auto& in : d.insts) place_instance(nl, fr, names, in, work);
  }

  /// A name declared in the scope: false (after reporting) when it is taken.
  bool claim(const netlist& nl, scope_names& names, const ref& r) {
    if (names.top && !claim_net_top(nl, r)) return false;
    auto [it, fresh] = names.taken.emplace(r.name, r.loc);
    if (!fresh)
      cur_->error(r.loc,
                  fmt::format("name '{}' is already declared at {}", r.name, at_text(it->second)));
    return fresh;
  }

  /// The net a name in the scope refers to (0 and 1 are the constants), or
  /// no_id after reporting.
  net_id lookup(const netlist& nl, const scope_names& names, const ref& r) {
    if (r.name == "0" && !r.quoted) return netlist::const0;
    if (r.name == "1" && !r.quoted) return netlist::const1;
    if (names.top) {
      const net_id n = nl.find(r.name);
      if (n != no_id) return n;
    } else {
      auto it = names.local.find(r.name);
      if (it != names.local.end()) return it->second;
    }
    cur_->error(r.loc, fmt::format("unknown net '{}'", r.name));
    return no_id;
  }

  /// The scope's own names: the top level's inputs and outputs or a block's
  /// ports, then wires and instance names.
  void declare_names(netlist& nl, const frame& fr, scope_names& names) {
    const scope_def& d = *fr.def;
    if (names.top) {
      for (auto& r : d.ins) declare(nl, fr, names, r, as_input);
      for (auto& r : d.outs) declare(nl, fr, names, r, as_output);
    } else {
      declare_ports(nl, fr, names);
    }
    for (auto& r : d.wires) declare(nl, fr, names, r, as_wire);
    for (auto& i : d.insts) claim(nl, names, i.id);
    // The declarations are in the netlist now; their list can go.
    if (names.top) f_.top.wires = {};
  }

  enum role { as_input, as_output, as_wire };
  /// A net of the scope's own.
  void declare(netlist& nl, const frame& fr, scope_names& names, const ref& r, role ro) {
    const bool input = ro == as_input;
    if (names.top ? !claim_net_top(nl, r) : !claim(nl, names, r)) return;
    net_id id = new_net(nl, cat(fr.prefix, r.name), fr.scope, r.loc, input);
    if (!names.top) names.local.emplace(r.name, id);
    nl.aliases.push_back({fr.scope, std::string(r.name), id});
    if (ro == as_input) nl.inputs.push_back(id);
    if (ro == as_output) nl.outputs.push_back(id);
  }

  /// A block's ports: a bound port names its parent's net; an unbound one
  /// gets a net of its own (an input only when an unused block is checked).
  void declare_ports(netlist& nl, const frame& fr, scope_names& names) {
    const scope_def& d = *fr.def;
    auto bound = [&](std::string_view port) -> net_id {
      for (auto& [p, n] : fr.bound)
        if (p == port) return n;
      return no_id;
    };
    for (int dir = 0; dir < 2; ++dir)
      for (auto& r : dir == 0 ? d.ins : d.outs) {
        if (dir == 0) names.in_ports.insert(r.name);
        net_id n = bound(r.name);
        if (n == no_id) {
          if (claim(nl, names, r)) {
            n = new_net(nl, cat(fr.prefix, r.name), fr.scope, r.loc, dir == 0 && fr.dry);
            names.local.emplace(r.name, n);
            nl.aliases.push_back({fr.scope, std::string(r.name), n});
          }
          continue;
        }
        if (!claim(nl, names, r)) continue;
        names.local.emplace(r.name, n);
        nl.aliases.push_back({fr.scope, std::string(r.name), n});
        nl.add_name(cat(fr.prefix, r.name), n);
      }
  }

  /// Places gate `g` of scope `d`, its reads and program in `pools`.
  void place_gate(netlist& nl, const scope_def& d, const scope_names& names, const gate& g,
                  const scope_def& pools) {
    net_id out = lookup(nl, names, g.out);
    const bool ok = out != no_id && can_drive(nl, d, names, g.out, out);
    // A gate with an unknown input is still placed (reading constant 0) so
    // that its output does not also show up as undriven; the design is
    // rejected anyway.
    fanin_.clear();
    for (auto i = g.reads_begin; i < g.reads_end; ++i) {
      net_id n = lookup(nl, names, pools.read_pool[i]);
      fanin_.push_back(n == no_id ? netlist::const0 : n);
    }
    const bool with_arcs = g.arcs_end > g.arcs_begin;
    const gate_delay delay = with_arcs ? arcs_of(nl, names, g, d, pools) : delay_of(g, d);
    program_.assign(pools.code_pool.begin() + g.code_begin, pools.code_pool.begin() + g.code_end);
    if (!ok) return;
    const gate_id placed = nl.add_gate(g.kind, out, fanin_, program_, delay, g.out.loc);
    switch (g.meta) {
      case gate::meta_role::none:
        break;
      case gate::meta_role::first_grant:
        first_grant_ = placed;  // its partner is placed next
        break;
      case gate::meta_role::second_grant:
        if (first_grant_ != no_id) nl.add_meta({{first_grant_, placed}, g.tau, g.window});
        first_grant_ = no_id;
        break;
      case gate::meta_role::syncff:
        nl.add_meta({{placed, no_id}, g.tau, g.window});
        break;
    }
    if (with_arcs) {
      pending_arcs_.emplace_back(static_cast<gate_id>(nl.gate_count() - 1), arc_delays_.size());
      arc_delays_.insert(arc_delays_.end(), gate_arcs_.begin(), gate_arcs_.end());
    }
    if (cur_scope_ != 0 || !nl.gate_scope.empty()) {
      nl.gate_scope.resize(nl.gate_count(), 0);
      nl.gate_scope.back() = cur_scope_;
    }
    if (cur_ != &rep_) {
      gate_rep_.resize(nl.gate_count(), nullptr);
      gate_rep_.back() = cur_;
    }
  }

  /// False (after reporting) when a gate may not drive `out`, the net `r`
  /// names: a constant, an input, or a net another gate drives.
  bool can_drive(const netlist& nl, const scope_def& d, const scope_names& names, const ref& r,
                 net_id out) {
    if (out <= netlist::const1) {
      cur_->error(r.loc, "a gate cannot drive a constant");
      return false;
    }
    if (names.in_ports.count(r.name)) {
      cur_->error(r.loc, fmt::format("port '{}' is an input of block '{}'; a gate cannot drive it",
                                     r.name, d.id.name));
      return false;
    }
    if (is_input_[out]) {
      cur_->error(r.loc,
                  fmt::format("net '{}' is an input; a gate cannot drive it", nl.net_name[out]));
      return false;
    }
    if (nl.driver[out] != no_id) {
      const gate_id other = nl.driver[out];
      reporter& at = other < gate_rep_.size() && gate_rep_[other] ? *gate_rep_[other] : rep_;
      cur_->error(r.loc, fmt::format("net '{}' has two drivers (the other at {})", nl.net_name[out],
                                     where_text(at, nl.gate_loc[other])));
      return false;
    }
    return true;
  }

  /// The arcs of gate `g` (fan-in in fanin_) into gate_arcs_, one per fan-in:
  /// each `from` names a distinct fan-in net; the others take the delay the
  /// gate has without arcs. Returns that delay (the netlist replaces it by the
  /// arcs' envelope).
  gate_delay arcs_of(const netlist& nl, const scope_names& names, const gate& g, const scope_def& d,
                     const scope_def& pools) {
    gate_arcs_.assign(fanin_.size(), gate_delay{});
    std::vector<const arc*> given(fanin_.size(), nullptr);
    for (auto i = g.arcs_begin; i < g.arcs_end; ++i) {
      const arc& a = pools.arc_pool[i];
      const net_id n = lookup(nl, names, a.from);
      if (n == no_id) continue;
      bool found = false;
      for (std::size_t k = 0; k < fanin_.size(); ++k) {
        if (fanin_[k] != n) continue;
        found = true;
        if (given[k]) {
          cur_->error(a.from.loc,
                      fmt::format("gate '{}' already has an arc from '{}' (at {})", g.out.name,
                                  a.from.name, at_text(given[k]->from.loc)));
          break;
        }
        given[k] = &a;
        gate_arcs_[k] = a.delay;
      }
      if (!found)
        cur_->error(a.from.loc, fmt::format("'{}' is not an input of gate '{}'; an arc starts at "
                                            "one of the nets the gate reads",
                                            a.from.name, g.out.name));
    }
    // Only a net fan-in left without an arc needs the gate's own delay; a
    // constant never changes, so any delay serves it.
    bool need_own = false;
    const arc* first = nullptr;
    for (std::size_t k = 0; k < fanin_.size(); ++k) {
      if (given[k] && !first) first = given[k];
      need_own = need_own || (!given[k] && fanin_[k] > netlist::const1);
    }
    gate_delay own = need_own || !first ? delay_of(g, d) : first->delay;
    own.transport = need_own || !first ? own.transport : g.delay.transport;
    for (std::size_t k = 0; k < fanin_.size(); ++k)
      if (!given[k]) gate_arcs_[k] = own;
    return own;
  }

  /// A gate's delay: its own, or else the default of its scope (of the top
  /// level when the block sets none), reported when there is neither.
  gate_delay delay_of(const gate& g, const scope_def& d) {
    gate_delay delay = g.delay;
    if (g.has_delay) return delay;
    const auto& dflt = d.default_delay ? d.default_delay : f_.top.default_delay;
    if (!dflt) {
      cur_->error(g.out.loc, fmt::format("gate '{}' has no delay and no default delay is in scope",
                                         g.out.name));
      return delay;
    }
    delay = *dflt;
    delay.transport = g.delay.transport || dflt->transport;
    return delay;
  }

  /// binds_: the bindings of `in`, a list `d: {a, b}` replaced by one binding
  /// per bit of the vector port d (its ports d[i], MSB first as declared);
  /// false after reporting a list that does not fit.
  bool bits_of_lists(const scope_def& b, const inst& in) {
    binds_.clear();
    bool ok = true;
    for (std::size_t i = 0; i < in.binds.size(); ++i) {
      const auto& bind = in.binds[i];
      std::vector<const ref*> bits;
      for (auto* list : {&b.ins, &b.outs})
        for (auto& r : *list)
          if (r.name.size() > bind.port.name.size() + 2 && r.name.starts_with(bind.port.name) &&
              r.name[bind.port.name.size()] == '[' && r.name.back() == ']')
            bits.push_back(&r);
      const bool scalar = std::any_of(b.ins.begin(), b.ins.end(),
                                      [&](const ref& r) { return r.name == bind.port.name; }) ||
                          std::any_of(b.outs.begin(), b.outs.end(),
                                      [&](const ref& r) { return r.name == bind.port.name; });
      if (bind.parts == 0 && (scalar || bits.empty())) {
        binds_.push_back(bind);
        continue;
      }
      const std::uint32_t parts = bind.parts ? bind.parts : 1;
      if (bind.part == 0 && (scalar || bits.size() != parts)) {
        cur_->error(bind.port.loc,
                    scalar
                        ? fmt::format("port '{}' of block '{}' is one net; bind it to one net, "
                                      "not a list",
                                      bind.port.name, b.id.name)
                        : fmt::format("port '{}' of block '{}' is {} bits wide: bind it to a "
                                      "list {{...}} of {} nets, most significant first{}",
                                      bind.port.name, b.id.name, bits.size(), bits.size(),
                                      bind.parts ? fmt::format(" (this list has {})", parts) : ""));
        ok = false;
      }
      if (scalar || bits.size() != parts) continue;
      binding bit = bind;
      bit.port.name = bits[bind.part]->name;
      binds_.push_back(bit);
    }
    return ok;
  }

  void place_instance(netlist& nl, const frame& fr, const scope_names& names, const inst& in,
                      std::vector<frame>& work) {
    if (recursive_.count(&in)) return;
    auto it = block_.find(in.block.name);
    if (it == block_.end()) {
      cur_->error(in.block.loc, fmt::format("unknown block '{}'", in.block.name));
      return;
    }
    const scope_def& b = f_.blocks[it->second];
    used_[it->second] = true;
    frame child{&b, 0, cat(fr.prefix, in.id.name, "."), {}, fr.dry};
    if (!bits_of_lists(b, in)) return;
    bool ok = true;
    for (auto& bind : binds_) {
      bool is_in = false, is_out = false;
      for (auto& r : b.ins) is_in = is_in || r.name == bind.port.name;
      for (auto& r : b.outs) is_out = is_out || r.name == bind.port.name;
      if (!is_in && !is_out) {
        cur_->error(bind.port.loc,
                    fmt::format("block '{}' has no port '{}'", b.id.name, bind.port.name));
        ok = false;
        continue;
      }
      bool twice = false;
      for (auto& [p, n] : child.bound) twice = twice || p == bind.port.name;
      if (twice) {
        cur_->error(bind.port.loc, fmt::format("port '{}' is bound twice", bind.port.name));
        ok = false;
        continue;
      }
      if (is_out && (bind.target.name == "0" || bind.target.name == "1")) {
        cur_->error(bind.target.loc,
                    fmt::format("output port '{}' cannot be bound to a constant", bind.port.name));
        ok = false;
        continue;
      }
      net_id n = lookup(nl, names, bind.target);
      if (n == no_id) {
        ok = false;
        continue;
      }
      child.bound.emplace_back(bind.port.name, n);
    }
    for (auto& r : b.ins) {
      bool found = false;
      for (auto& bind : binds_) found = found || bind.port.name == r.name;
      if (!found) {
        cur_->error(in.id.loc,
                    fmt::format("input port '{}' of block '{}' is not bound", r.name, b.id.name));
        ok = false;
      }
    }
    if (!ok) return;
    child.scope = static_cast<std::uint32_t>(nl.scopes.size());
    nl.scopes.push_back(scope{std::string(in.id.name), std::string(b.id.name), fr.scope});
    ++nl.instances;
    work.push_back(std::move(child));
  }

  /// Parses each top-level gate statement and places it at once, so that no
  /// form of the whole file's gates is ever held. Syntax errors among them
  /// mean, as for any syntax error, that the design is not elaborated: the
  /// elaboration errors found on the way are then dropped.
  template <typename Place>
  bool stream_top_gates(Place& place_gate) {
    const auto before = rep_.errors();
    scope_def pools;
    gate g;
    constexpr std::size_t release_step = std::size_t(8) << 20;
    std::size_t released = 0;
    for (auto p : f_.top_gates) {
      if (f_.release_text && p.begin >= released + release_step)
        f_.release_text(released = p.begin);
      pools.read_pool.clear();
      pools.code_pool.clear();
      pools.arc_pool.clear();
      g = gate{};
      const bool parsed = parse_top_gate(f_, p, g, pools, rep_);
      if (!parsed || rep_.errors() != before) continue;
      rep_.hold(true);
      place_gate(g, pools);
      rep_.hold(false);
    }
    f_.top_gates = {};
    if (rep_.errors() != before) {
      rep_.drop();
      aborted_ = true;
      return false;
    }
    rep_.release();
    return true;
  }

  void top_inits(netlist& nl) {
    for (auto& in : f_.top.inits) {
      net_id n = nl.find(in.net.name);
      if (n == no_id || n <= netlist::const1)
        rep_of(f_.top).error(in.net.loc, fmt::format("unknown net '{}'", in.net.name));
      else
        nl.init[n] = in.value;
    }
  }

  void final_checks(netlist& nl) {
    std::vector<bool> is_output(nl.net_count(), false);
    for (auto n : nl.outputs) is_output[n] = true;
    for (net_id n = 2; n < nl.net_count(); ++n) {
      const bool driven = nl.driver[n] != no_id || is_input_[n];
      const bool read = nl.fanout_begin[n + 1] > nl.fanout_begin[n];
      const auto& name = nl.net_name[n];
      if (!driven && is_output[n])
        decl_rep(n).error(decl_loc_[n], fmt::format("output '{}' is never driven", name));
      else if (!driven && read)
        decl_rep(n).error(decl_loc_[n], fmt::format("net '{}' is read but never driven", name));
      else if (!driven)
        decl_rep(n).warning(decl_loc_[n], fmt::format("net '{}' is declared but never used", name));
      else if (!read && !is_output[n])
        decl_rep(n).warning(decl_loc_[n],
                            is_input_[n] ? fmt::format("input '{}' is never read", name)
                                         : fmt::format("net '{}' is driven but never read", name));
    }
  }

  /// The reporter of the file a scope is written in.
  reporter& rep_of(const scope_def& d) { return d.rep ? *d.rep : rep_; }
  /// The reporter of the file where net `n` is declared.
  reporter& decl_rep(net_id n) {
    return n < decl_rep_.size() && decl_rep_[n] ? *decl_rep_[n] : rep_;
  }
  /// "L:C", or "FILE:L:C" when the place is in another file than the one reported on.
  std::string where_text(const reporter& at, source_loc l) const {
    return &at == cur_ ? at_text(l) : fmt::format("{}:{}", at.file(), at_text(l));
  }

  file& f_;
  reporter& rep_;
  reporter* cur_ = &rep_;        // the reporter of the scope being placed
  std::uint32_t cur_scope_ = 0;  // the scope being placed
  bool aborted_ = false;
  std::unordered_map<std::string_view, std::uint32_t> block_;
  std::vector<bool> used_, duplicate_;
  std::unordered_set<const inst*> recursive_;
  std::vector<bool> is_input_;
  std::vector<source_loc> decl_loc_;
  std::vector<reporter*> decl_rep_;    // per net, when declared in another file (else empty)
  std::vector<reporter*> gate_rep_;    // per gate, likewise
  std::vector<net_id> fanin_;          // the gate being placed
  std::vector<binding> binds_;         // the bindings of the instance being placed, bit by bit
  gate_id first_grant_ = no_id;        // a mutex's first grant, until its second is placed
  std::vector<gate_delay> gate_arcs_;  // its arcs, one per fan-in
  std::vector<std::pair<gate_id, std::size_t>> pending_arcs_;  // gate, first of its arc_delays_
  std::vector<gate_delay> arc_delays_;
  std::vector<std::uint32_t> program_;
};

}  // namespace

void elaborate(file& f, netlist& nl, reporter& rep) { elaborator(f, rep).run(nl); }

}  // namespace settle::ir
