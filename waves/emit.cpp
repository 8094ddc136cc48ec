// The elaborated design written back as `.settle` text: hierarchy, gates, exact delays, stimulus.
#include "waves/emit.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

#include <algorithm>
#include <map>

#include "sim/model/time_parse.hpp"

namespace settle {
namespace {

// The reserved words of parser/LANGUAGE.md; tests/unit/waves/emit_test.cpp holds
// them to the parser's own list (waves/ may not include the parser).
constexpr const char* reserved[] = {"input", "output",    "wire",   "default", "delay", "rise",
                                    "fall",  "transport", "block",  "inst",    "init",  "stimulus",
                                    "at",    "after",     "clock",  "settle",  "run",   "expect",
                                    "watch", "when",      "always", "never",   "gauge"};

bool start_char(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_'; }
bool name_char(char c) { return start_char(c) || (c >= '0' && c <= '9'); }

// A hierarchical reference `a.b.c` of identifiers, as stimulus and init take it.
bool dotted_ref(std::string_view s) {
  std::size_t b = 0;
  for (;;) {
    const auto e = std::min(s.find('.', b), s.size());
    if (!settle_identifier(s.substr(b, e - b))) return false;
    if (e == s.size()) return true;
    b = e + 1;
  }
}
// A full net name where a reference may be hierarchical (init at top level, stimulus).
std::string ref_name(std::string_view s) {
  return dotted_ref(s) ? std::string(s) : fmt::format("\"{}\"", s);
}

std::string range_text(const delay_range& r) {
  if (r.min == r.max && r.typ == r.min) return time_literal(r.min);
  // A two-time range reads back with typ at the midpoint, rounded down.
  if (r.typ == r.min + (r.max - r.min) / 2) return time_literal(r.min) + ".." + time_literal(r.max);
  return time_literal(r.min) + ".." + time_literal(r.typ) + ".." + time_literal(r.max);
}

/// A delay body: one range, or `rise R fall F`.
std::string body_text(const gate_delay& d) {
  return d.rise == d.fall ? range_text(d.rise)
                          : "rise " + range_text(d.rise) + " fall " + range_text(d.fall);
}

std::string delay_text(const gate_delay& d) {
  std::string s = d.rise == d.fall ? "delay " + body_text(d) : body_text(d);
  if (d.transport) s += " transport";
  return s;
}

char value_char(logic v) { return v == logic::zero ? '0' : v == logic::one ? '1' : 'x'; }

/// Writes the netlist with names given by `name_of(net)` (a local or full name).
class writer {
 public:
  explicit writer(const design& d) : d_(d), n_(d.nets) {}

  emit_result run(const std::string& version) {
    emit_result r;
    for (gate_id g = 0; g < n_.gate_count(); ++g)
      if (n_.kind[g] == gate_kind::dff) {
        r.error = fmt::format(
            "gate '{}' is a flip-flop primitive, which the .settle language has no form for",
            n_.gate_name(g));
        return r;
      }
    std::string body;
    r.flat = !hierarchy(body);
    if (r.flat) body = flat();
    r.text = fmt::format("# {} of {}{}\n", version, printable(d_.path),
                         d_.source.format.empty() ? "" : " (" + d_.source.format + ")");
    r.text +=
        "# The elaborated design, one delay per gate or per arc, written back in the .settle "
        "language.\n";
    if (r.flat && n_.blocks)
      r.text +=
          "# Its blocks could not be rebuilt from what the netlist keeps: every net is written\n"
          "# at top level under its full name.\n";
    r.text += body;
    r.text += stimulus_text();
    return r;
  }

 private:
  static std::string printable(std::string_view s) {
    std::string o;
    for (char c : s) o += static_cast<unsigned char>(c) < 0x20 ? '?' : c;
    return o;
  }

  // ---- gates
  template <class Name>
  void expr_text(gate_id g, std::span<const std::uint32_t> code, Name&& name,
                 std::vector<std::pair<std::string, int>>& st) const {
    const auto fb = n_.fanin_begin[g];
    for (auto w : code) {
      switch (opcode(w)) {
        case op::input:
          st.emplace_back(name(n_.fanin[fb + operand(w)]), 5);
          break;
        case op::const0:
          st.emplace_back("0", 5);
          break;
        case op::const1:
          st.emplace_back("1", 5);
          break;
        case op::inv: {
          auto& t = st.back();
          t.first = t.second >= 4 ? "~" + t.first : "~(" + t.first + ")";
          t.second = 4;
          break;
        }
        default: {
          const int lv = opcode(w) == op::and2 ? 3 : opcode(w) == op::xor2 ? 2 : 1;
          const char* sym = lv == 3 ? " & " : lv == 2 ? " ^ " : " | ";
          auto b = std::move(st.back());
          st.pop_back();
          auto& a = st.back();
          // Left-associative: a right operand of the same level keeps its parentheses.
          a.first = (a.second < lv ? "(" + a.first + ")" : a.first) + sym +
                    (b.second <= lv ? "(" + b.first + ")" : b.first);
          a.second = lv;
        }
      }
    }
  }

  template <class Name>
  std::string gate_text(gate_id g, Name&& name) const {
    const auto k = n_.kind[g];
    if (const auto* m = n_.meta_of(g)) {
      // One statement per element: a mutex's second grant is written with its first.
      if (m->gates[0] != g) return "";
      const auto b = n_.fanin_begin[g];
      const std::string params =
          fmt::format(" tau {} window {}", range_text(m->tau), range_text(m->window));
      if (k == gate_kind::syncff)
        return fmt::format("{} = syncff({}, {}) {}{}\n", name(n_.gate_out[g]), name(n_.fanin[b]),
                           name(n_.fanin[b + 1]), delay_text(n_.delay[g]), params);
      return fmt::format("{}, {} = mutex({}, {}) {}{}\n", name(n_.gate_out[g]),
                         name(n_.gate_out[m->gates[1]]), name(n_.fanin[b]), name(n_.fanin[b + 1]),
                         delay_text(n_.delay[g]), params);
    }
    std::string rhs;
    const std::span<const std::uint32_t> code(n_.code.data() + n_.code_begin[g],
                                              n_.code_begin[g + 1] - n_.code_begin[g]);
    if (k == gate_kind::expr || k == gate_kind::gc) {
      std::vector<std::pair<std::string, int>> st;
      expr_text(g, code, name, st);
      rhs = k == gate_kind::expr ? st.at(0).first
                                 : "gc(set: " + st.at(0).first + ", reset: " + st.at(1).first + ")";
    } else {
      rhs = std::string(kind_name(k)) + "(";
      for (auto i = n_.fanin_begin[g]; i < n_.fanin_begin[g + 1]; ++i)
        rhs += (i == n_.fanin_begin[g] ? "" : ", ") + name(n_.fanin[i]);
      rhs += ")";
    }
    if (!n_.has_arcs(g))
      return fmt::format("{} = {} {}\n", name(n_.gate_out[g]), rhs, delay_text(n_.delay[g]));
    // One `from NET DELAY` per distinct net read (a constant never changes,
    // so its arc is not written).
    const auto arcs = n_.arcs_of(g);
    std::string text;
    for (auto i = n_.fanin_begin[g]; i < n_.fanin_begin[g + 1]; ++i) {
      const net_id in = n_.fanin[i];
      if (in <= netlist::const1) continue;
      bool seen = false;
      for (auto j = n_.fanin_begin[g]; j < i; ++j) seen = seen || n_.fanin[j] == in;
      if (seen) continue;
      text += fmt::format("{}from {} {}", text.empty() ? "" : ", ", name(in),
                          body_text(arcs[i - n_.fanin_begin[g]]));
    }
    if (text.empty())
      return fmt::format("{} = {} {}\n", name(n_.gate_out[g]), rhs, delay_text(n_.delay[g]));
    if (n_.delay[g].transport) text += " transport";
    return fmt::format("{} = {} {}\n", name(n_.gate_out[g]), rhs, text);
  }

  // ---- declarations
  static void declare(std::string& out, const char* indent, const char* word,
                      const std::vector<std::string>& names) {
    for (std::size_t i = 0; i < names.size(); i += 8) {
      out += fmt::format("{}{} ", indent, word);
      for (std::size_t j = i; j < names.size() && j < i + 8; ++j)
        out += (j == i ? "" : ", ") + names[j];
      out += "\n";
    }
  }

  std::string inits() const {
    std::vector<std::string> v;
    for (net_id k = 2; k < n_.net_count(); ++k)
      if (n_.init[k] != logic::x)
        v.push_back(ref_name(n_.net_name[k]) + " = " + value_char(n_.init[k]));
    std::string out;
    declare(out, "", "init", v);
    return out;
  }

  std::string flat() const {
    auto name = [&](net_id k) -> std::string {
      return k == netlist::const0 ? "0" : k == netlist::const1 ? "1" : settle_name(n_.net_name[k]);
    };
    std::vector<bool> port(n_.net_count(), false);
    std::vector<std::string> ins, outs, wires;
    for (auto k : n_.inputs) ins.push_back(name(k)), port[k] = true;
    for (auto k : n_.outputs) outs.push_back(name(k)), port[k] = true;
    for (net_id k = 2; k < n_.net_count(); ++k)
      if (!port[k]) wires.push_back(name(k));
    std::string out;
    declare(out, "", "input", ins);
    declare(out, "", "output", outs);
    declare(out, "", "wire", wires);
    for (gate_id g = 0; g < n_.gate_count(); ++g) out += gate_text(g, name);
    return out + inits();
  }

  // ---- hierarchy
  const std::string* local(net_id k, std::uint32_t s) const {
    for (auto a : by_net_[k])
      if (n_.aliases[a].scope == s) return &n_.aliases[a].local;
    return nullptr;
  }
  bool within(std::uint32_t s, std::uint32_t top) const {
    for (; s != no_id; s = s == 0 ? no_id : n_.scopes[s].parent)
      if (s == top) return true;
    return false;
  }

  // Rebuilds blocks and instances; false when the netlist does not give them faithfully.
  bool hierarchy(std::string& out) {
    const auto scopes = n_.scopes.size();
    // No block definitions: nothing to rebuild (an importer's scopes, such as the .bench
    // flip-flops made of gates, are no blocks of a source), so it is written flat.
    if (n_.blocks == 0) return false;
    by_net_.assign(n_.net_count(), {});
    for (std::uint32_t a = 0; a < n_.aliases.size(); ++a) by_net_[n_.aliases[a].net].push_back(a);
    for (std::uint32_t s = 1; s < scopes; ++s)
      if (n_.scopes[s].parent >= s) return false;
    for (net_id k = 2; k < n_.net_count(); ++k)
      if (!local(k, n_.net_scope[k])) return false;
    // An instance name must differ from every name of its parent scope.
    for (std::uint32_t s = 1; s < scopes; ++s)
      for (auto& a : n_.aliases)
        if (a.scope == n_.scopes[s].parent && a.local == n_.scopes[s].name) return false;
    // A gate belongs to the scope that placed it, where its output and inputs all have names.
    place_.assign(n_.gate_count(), 0);
    for (gate_id g = 0; g < n_.gate_count(); ++g) {
      const auto s = g < n_.gate_scope.size() ? n_.gate_scope[g] : 0;
      if (s >= scopes || !local(n_.gate_out[g], s)) return false;
      for (auto i = n_.fanin_begin[g]; i < n_.fanin_begin[g + 1]; ++i)
        if (n_.fanin[i] > netlist::const1 && !local(n_.fanin[i], s)) return false;
      place_[g] = s;
    }
    std::vector<std::vector<gate_id>> gates(scopes);
    for (gate_id g = 0; g < n_.gate_count(); ++g) gates[place_[g]].push_back(g);
    std::map<std::string, std::string> blocks;  // block name -> body, in name order
    std::vector<std::string> order;
    for (std::uint32_t s = 1; s < scopes; ++s) {
      std::string b;
      if (!block_body(s, gates[s], b)) return false;
      auto [it, fresh] = blocks.emplace(n_.scopes[s].block, b);
      if (fresh) order.push_back(n_.scopes[s].block);
      if (it->second != b) return false;  // two instances of one block differ
    }
    std::size_t unplaced = n_.blocks > blocks.size() ? n_.blocks - blocks.size() : 0;
    for (auto& b : order) out += blocks[b] + "\n";
    if (unplaced)
      out += fmt::format(
          "# {} block definition{} never placed; the netlist keeps no body, so empty blocks\n"
          "# keep the count.\n",
          unplaced, unplaced == 1 ? " was" : "s were");
    for (std::size_t i = 1, k = 0; k < unplaced; ++i) {
      const auto name = fmt::format("unplaced_{}", i);
      if (blocks.count(name)) continue;
      out += fmt::format("block {}() {{\n}}\n", name), ++k;
    }
    // The top level.
    auto name = [&](net_id k) -> std::string {
      if (k <= netlist::const1) return k == netlist::const0 ? "0" : "1";
      const auto* l = local(k, 0);
      return settle_name(l ? *l : n_.net_name[k]);
    };
    std::vector<bool> port(n_.net_count(), false);
    std::vector<std::string> ins, outs, wires;
    for (auto k : n_.inputs) ins.push_back(name(k)), port[k] = true;
    for (auto k : n_.outputs) outs.push_back(name(k)), port[k] = true;
    for (net_id k = 2; k < n_.net_count(); ++k)
      if (!port[k] && n_.net_scope[k] == 0) wires.push_back(name(k));
    declare(out, "", "input", ins);
    declare(out, "", "output", outs);
    declare(out, "", "wire", wires);
    for (gate_id g : gates[0]) out += gate_text(g, name);
    for (std::uint32_t c = 1; c < scopes; ++c)
      if (n_.scopes[c].parent == 0) {
        std::string i;
        if (!inst_text(c, "", i)) return false;
        out += i;
      }
    out += inits();
    return true;
  }

  bool inst_text(std::uint32_t c, const char* indent, std::string& out) const {
    const auto p = n_.scopes[c].parent;
    out += fmt::format("{}inst {} {}(", indent, n_.scopes[c].name, n_.scopes[c].block);
    bool first = true;
    for (auto& a : n_.aliases) {
      if (a.scope != c || (a.net > netlist::const1 && n_.net_scope[a.net] == c)) continue;
      std::string target;
      if (a.net <= netlist::const1) {
        target = a.net == netlist::const0 ? "0" : "1";
      } else {
        const auto* l = local(a.net, p);
        if (!l) return false;
        target = p == 0 ? settle_name(*l) : *l;
        if (p != 0 && !settle_identifier(*l)) return false;
      }
      out += fmt::format("{}{}: {}", first ? "" : ", ", a.local, target);
      first = false;
    }
    out += ")\n";
    return true;
  }

  bool block_body(std::uint32_t s, const std::vector<gate_id>& gates, std::string& out) const {
    std::vector<std::string> ins, outs, wires;
    for (auto& a : n_.aliases) {
      if (a.scope != s) continue;
      if (!settle_identifier(a.local)) return false;
      if (a.net > netlist::const1 && n_.net_scope[a.net] == s) {
        wires.push_back(a.local);
        continue;
      }
      const auto drv = a.net > netlist::const1 ? n_.driver[a.net] : no_id;
      (drv != no_id && within(place_[drv], s) ? outs : ins).push_back(a.local);
    }
    out = fmt::format("block {}(", n_.scopes[s].block);
    if (!ins.empty()) out += "in " + fmt::format("{}", fmt::join(ins, ", "));
    if (!outs.empty())
      out += (ins.empty() ? "out " : "; out ") + fmt::format("{}", fmt::join(outs, ", "));
    out += ") {\n";
    declare(out, "    ", "wire", wires);
    auto name = [&](net_id k) -> std::string {
      if (k <= netlist::const1) return k == netlist::const0 ? "0" : "1";
      return *local(k, s);
    };
    for (gate_id g : gates) out += "    " + gate_text(g, name);
    for (std::uint32_t c = s + 1; c < n_.scopes.size(); ++c)
      if (n_.scopes[c].parent == s && !inst_text(c, "    ", out)) return false;
    out += "}\n";
    return true;
  }

  // ---- stimulus
  std::string assigns(const std::vector<assignment>& v) const {
    std::string s;
    for (auto& a : v)
      s += fmt::format("{}{} = {}", s.empty() ? "" : ", ", ref_name(n_.net_name[a.net]),
                       value_char(a.value));
    return s;
  }

  std::string action_text(const stim_action& a) const {
    const auto& st = d_.stim;
    switch (a.what) {
      case stim_action::kind::at:
      case stim_action::kind::after:
        return fmt::format("{} {} {}", a.what == stim_action::kind::at ? "at" : "after",
                           time_literal(a.time), assigns(a.assigns));
      case stim_action::kind::clock: {
        auto s = fmt::format("clock {} period {} high {}", ref_name(n_.net_name[a.clock.net]),
                             time_literal(a.clock.period), time_literal(a.clock.high));
        if (a.clock.cycles) s += fmt::format(" cycles {}", a.clock.cycles);
        if (a.anchored) s += " at " + time_literal(a.time);
        return s;
      }
      case stim_action::kind::rule: {
        const auto& r = st.rules.at(a.index);
        return r.times ? fmt::format("{} times {}", r.text, r.times) : r.text;
      }
      case stim_action::kind::property:
        return st.properties.at(a.index).text;
      case stim_action::kind::gauge:
        return st.gauges.at(a.index).text;
    }
    return {};
  }

  std::string expect_text(const expectation& e) const {
    switch (e.what) {
      case expectation::kind::value:
        return fmt::format("expect {} = {}", ref_name(n_.net_name[e.net]), value_char(e.want));
      case expectation::kind::no_glitch:
        return "expect no glitch on " + ref_name(n_.net_name[e.net]);
      case expectation::kind::within:
        return "expect settle within " + time_literal(e.hi);
      case expectation::kind::oscillating:
        return e.has_range ? fmt::format("expect oscillating period {}..{}", time_literal(e.lo),
                                         time_literal(e.hi))
                           : "expect oscillating";
      case expectation::kind::gauge:
        return fmt::format("expect {} within {}..{}", d_.stim.gauges.at(e.gauge).name,
                           time_literal(e.lo), time_literal(e.hi));
      case expectation::kind::resolves:
        return fmt::format("expect resolves {} within {}", ref_name(n_.net_name[e.net]),
                           time_literal(e.hi));
      default:
        return expectation_words(n_, e);
    }
  }

  std::string stimulus_text() const {
    const auto& st = d_.stim;
    if (st.steps.empty() && st.watch.empty()) return {};
    std::string out = "\nstimulus {\n";
    if (!st.watch.empty()) {
      std::vector<std::string> w;
      for (auto k : st.watch) w.push_back(ref_name(n_.net_name[k]));
      declare(out, "    ", "watch", w);
    }
    for (const auto& s : st.steps) {
      // The step's label holds its input changes as written, one per at/after/clock
      // action, joined by "; " (a statement holds no ';'): they are kept when they
      // match, so that the step's title reads the same.
      std::vector<std::string> pieces;
      if (s.label != "settle")
        for (std::size_t b = 0;;) {
          const auto e = s.label.find("; ", b);
          pieces.push_back(s.label.substr(b, e == std::string::npos ? e : e - b));
          if (e == std::string::npos) break;
          b = e + 2;
        }
      std::size_t inputs = 0;
      for (auto& a : s.actions)
        inputs += a.what == stim_action::kind::at || a.what == stim_action::kind::after ||
                  a.what == stim_action::kind::clock;
      const bool keep = pieces.size() == inputs;
      std::size_t next = 0;
      for (auto& a : s.actions) {
        const bool input = a.what == stim_action::kind::at || a.what == stim_action::kind::after ||
                           a.what == stim_action::kind::clock;
        out += "    " + (input && keep ? pieces[next++] : action_text(a)) + "\n";
      }
      out += s.end == step_spec::end_kind::run ? "    run " + time_literal(s.run_for) + "\n"
                                               : std::string("    settle\n");
      for (auto& e : s.expects) out += "    " + expect_text(e) + "\n";
    }
    return out + "}\n";
  }

  const design& d_;
  const netlist& n_;
  std::vector<std::vector<std::uint32_t>> by_net_;
  std::vector<std::uint32_t> place_;
};

}  // namespace

bool settle_identifier(std::string_view name) {
  if (name.empty() || !start_char(name[0])) return false;
  for (char c : name)
    if (!name_char(c)) return false;
  return std::none_of(std::begin(reserved), std::end(reserved),
                      [&](const char* w) { return name == w; });
}

std::string settle_name(std::string_view name) {
  return settle_identifier(name) ? std::string(name) : fmt::format("\"{}\"", name);
}

emit_result settle_text(const design& d, const std::string& version) {
  return writer(d).run(version);
}

}  // namespace settle
