// The ISCAS-85/89 `.bench` importer: a hand-written line parser building a flat netlist.
#include <fmt/format.h>

#include <algorithm>
#include <cctype>
#include <optional>
#include <string>
#include <string_view>
#include <unordered_map>
#include <unordered_set>
#include <vector>

#include "parser/load.hpp"

namespace settle {
namespace {

// What a `y = KIND(...)` line may name. `dff` is expanded into six NAND gates.
enum class bench_kind : std::uint8_t { and_, or_, nand, nor, not_, buff, xor_, xnor, dff };

std::optional<bench_kind> kind_from(std::string_view word) {
  std::string up(word);
  for (auto& c : up) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  static const std::unordered_map<std::string, bench_kind> table = {
      {"AND", bench_kind::and_}, {"OR", bench_kind::or_},   {"NAND", bench_kind::nand},
      {"NOR", bench_kind::nor},  {"NOT", bench_kind::not_}, {"BUFF", bench_kind::buff},
      {"BUF", bench_kind::buff}, {"XOR", bench_kind::xor_}, {"XNOR", bench_kind::xnor},
      {"DFF", bench_kind::dff}};
  auto it = table.find(up);
  if (it == table.end()) return std::nullopt;
  return it->second;
}

gate_kind to_gate_kind(bench_kind k) {
  switch (k) {
    case bench_kind::and_:
      return gate_kind::and_;
    case bench_kind::or_:
      return gate_kind::or_;
    case bench_kind::nand:
      return gate_kind::nand;
    case bench_kind::nor:
      return gate_kind::nor;
    case bench_kind::not_:
      return gate_kind::inv;
    case bench_kind::buff:
      return gate_kind::buf;
    case bench_kind::xor_:
      return gate_kind::xor_;
    case bench_kind::xnor:
      return gate_kind::xnor;
    case bench_kind::dff:
      break;
  }
  return gate_kind::nand;
}

// A name as written, with where it was written.
struct word {
  std::string_view text;
  source_loc loc;
};

struct gate_line {
  word out;
  bench_kind kind = bench_kind::and_;
  std::vector<word> args;
};

// The parsed file before nets are created.
struct bench_file {
  std::vector<word> inputs, outputs;
  std::vector<gate_line> gates;
  std::vector<std::string_view> lines;  // every line of the text, for diagnostics
};

// A net name runs until white space, a control byte or one of the punctuation
// characters (a NUL in a name is a damaged file; the diagnostic shows it as \0).
bool name_char(char c) {
  const auto u = static_cast<unsigned char>(c);
  return c != '(' && c != ')' && c != ',' && c != '=' && c != '#' && u > 0x20 && u != 0x7f;
}

class reader {
 public:
  reader(std::string_view text, const std::string& name, diagnostics& diags)
      : text_(text), name_(name), diags_(diags) {}

  /// Splits the text into lines and parses each; returns false on any syntax error.
  bool read(bench_file& out) {
    std::size_t pos = 0;
    while (pos < text_.size()) {
      auto end = text_.find('\n', pos);
      if (end == std::string_view::npos) end = text_.size();
      auto line = text_.substr(pos, end - pos);
      if (!line.empty() && line.back() == '\r') line.remove_suffix(1);
      out.lines.push_back(line);
      pos = end + 1;
    }
    bool ok = true;
    for (std::size_t i = 0; i < out.lines.size(); ++i)
      ok &= parse_line(out, static_cast<std::uint32_t>(i));
    return ok;
  }

  void error(const bench_file& f, source_loc loc, std::string message) {
    diagnostic d;
    d.file = name_;
    d.line = loc.line;
    d.col = loc.col;
    d.message = std::move(message);
    if (loc.line >= 1 && loc.line <= f.lines.size()) set_source_line(d, f.lines[loc.line - 1]);
    diags_.add(std::move(d));
  }

 private:
  // One line: blank, comment, INPUT(x), OUTPUT(y) or y = KIND(a, ...).
  bool parse_line(bench_file& f, std::uint32_t index) {
    line_ = f.lines[index];
    if (auto hash = line_.find('#'); hash != std::string_view::npos) line_ = line_.substr(0, hash);
    number_ = index + 1;
    at_ = 0;
    skip_space();
    if (at_ == line_.size()) return true;
    auto first = name(f, "a net name, INPUT or OUTPUT");
    if (!first) return false;
    skip_space();
    if (peek() == '(') {
      std::string up(first->text);
      for (auto& c : up) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
      if (up != "INPUT" && up != "OUTPUT") {
        error(f, first->loc,
              fmt::format("expected INPUT or OUTPUT before '(', found '{}'", first->text));
        return false;
      }
      ++at_;
      skip_space();
      auto net = name(f, "a net name");
      if (!net || !expect(f, ')') || !end_of_line(f)) return false;
      (up == "INPUT" ? f.inputs : f.outputs).push_back(*net);
      return true;
    }
    if (!expect(f, '=')) return false;
    skip_space();
    auto kind_word = name(f, "a gate kind");
    if (!kind_word) return false;
    auto kind = kind_from(kind_word->text);
    if (!kind) {
      error(f, kind_word->loc,
            fmt::format("unknown gate kind '{}' (AND OR NAND NOR NOT BUFF BUF XOR XNOR DFF)",
                        kind_word->text));
      return false;
    }
    skip_space();
    if (!expect(f, '(')) return false;
    gate_line g{*first, *kind, {}};
    for (;;) {
      skip_space();
      auto arg = name(f, "a net name");
      if (!arg) return false;
      g.args.push_back(*arg);
      skip_space();
      if (peek() == ',') {
        ++at_;
        continue;
      }
      if (!expect(f, ')')) return false;
      break;
    }
    if (!end_of_line(f)) return false;
    const bool unary =
        *kind == bench_kind::not_ || *kind == bench_kind::buff || *kind == bench_kind::dff;
    if (unary && g.args.size() != 1) {
      error(f, g.args[1].loc,
            fmt::format("{} takes exactly one input, found {}", kind_word->text, g.args.size()));
      return false;
    }
    f.gates.push_back(std::move(g));
    return true;
  }

  char peek() const { return at_ < line_.size() ? line_[at_] : '\0'; }
  source_loc here() const { return {number_, static_cast<std::uint32_t>(at_ + 1)}; }
  void skip_space() {
    while (at_ < line_.size() && (line_[at_] == ' ' || line_[at_] == '\t')) ++at_;
  }

  std::optional<word> name(bench_file& f, const char* what) {
    auto start = at_;
    while (at_ < line_.size() && name_char(line_[at_])) ++at_;
    if (at_ == start) {
      error(f, here(), fmt::format("expected {}, found {}", what, found()));
      return std::nullopt;
    }
    return word{line_.substr(start, at_ - start), {number_, static_cast<std::uint32_t>(start + 1)}};
  }

  bool expect(bench_file& f, char c) {
    skip_space();
    if (peek() == c) {
      ++at_;
      return true;
    }
    error(f, here(), fmt::format("expected '{}', found {}", c, found()));
    return false;
  }

  bool end_of_line(bench_file& f) {
    skip_space();
    if (at_ == line_.size()) return true;
    error(f, here(), fmt::format("expected the end of the line, found {}", found()));
    return false;
  }

  std::string found() const {
    if (at_ >= line_.size()) return "the end of the line";
    return fmt::format("'{}'", line_[at_]);
  }

  std::string_view text_;
  const std::string& name_;
  diagnostics& diags_;
  std::string_view line_;
  std::uint32_t number_ = 0;
  std::size_t at_ = 0;
};

// Builds the netlist from a parsed file; reports undefined and doubly driven nets.
class builder {
 public:
  builder(const std::string& file, const bench_file& f, const load_options& opt, reader& r,
          diagnostics& diags, design& d)
      : file_(file), f_(f), opt_(opt), r_(r), diags_(diags), n_(d.nets) {}

  bool build() {
    n_.begin();
    delay_.rise = delay_.fall = opt_.bench_delay;
    delay_.transport = false;
    bool ok = true;
    // Drivers: inputs first, then gate outputs, in line order.
    for (const auto& in : f_.inputs) ok &= define(in);
    for (const auto& g : f_.gates) ok &= define(g.out);
    for (const auto& g : f_.gates)
      for (const auto& a : g.args) read(a);
    for (const auto& out : f_.outputs) {
      if (!used(out)) {
        ok = false;
        continue;
      }
      auto id = net_of(out.text);
      if (std::find(n_.outputs.begin(), n_.outputs.end(), id) != n_.outputs.end()) {
        warn(out.loc, fmt::format("net '{}' is listed as an output more than once", out.text));
        continue;
      }
      n_.outputs.push_back(id);
    }
    if (!ok) return false;
    for (const auto& in : f_.inputs) n_.inputs.push_back(net_of(in.text));
    n_.inputs.insert(n_.inputs.end(), floating_.begin(), floating_.end());
    const bool has_dff = std::any_of(f_.gates.begin(), f_.gates.end(),
                                     [](const gate_line& g) { return g.kind == bench_kind::dff; });
    if (has_dff) ok &= add_clock();
    for (const auto& g : f_.gates) ok &= g.kind == bench_kind::dff ? add_flip_flop(g) : add_gate(g);
    if (!ok) return false;
    n_.finish();
    return true;
  }

 private:
  // A net driven by an input line or a gate line; a second driver is an error.
  bool define(const word& w) {
    auto [it, fresh] = first_driver_.emplace(w.text, w.loc);
    if (!fresh) {
      r_.error(f_, w.loc,
               fmt::format("net '{}' already has a driver (line {})", w.text, it->second.line));
      return false;
    }
    auto id = n_.add_net(std::string(w.text), 0);
    n_.aliases.push_back(net_alias{0, std::string(w.text), id});
    return true;
  }

  // A net listed as an output must have a driver.
  bool used(const word& w) {
    if (first_driver_.count(w.text)) return true;
    r_.error(f_, w.loc,
             fmt::format("net '{}' is never driven (no INPUT or gate line defines it)", w.text));
    return false;
  }

  // A net a gate reads but no line defines (s400's Phi1H, say) floats: it
  // becomes an extra input that stays x unless the stimulus drives it, with a
  // warning at its first use, so published circuits with a dangling wire load.
  void read(const word& w) {
    if (first_driver_.count(w.text) || !floating_names_.insert(w.text).second) return;
    warn(w.loc,
         fmt::format("net '{}' is never driven (no INPUT or gate line defines it); it becomes an "
                     "extra input that stays x unless the stimulus drives it",
                     w.text));
    auto id = n_.add_net(std::string(w.text), 0);
    n_.aliases.push_back(net_alias{0, std::string(w.text), id});
    floating_.push_back(id);
  }

  net_id net_of(std::string_view name) const { return n_.find(std::string(name)); }

  void warn(source_loc loc, std::string message) {
    diagnostic d;
    d.severity = diagnostic::level::warning;
    d.file = file_;
    d.line = loc.line;
    d.col = loc.col;
    d.message = std::move(message);
    if (loc.line >= 1 && loc.line <= f_.lines.size()) set_source_line(d, f_.lines[loc.line - 1]);
    diags_.add(std::move(d));
  }

  // The generated clock of every flip-flop: `CK`, or `CK_`, `CK__` ... when
  // the file already has a net of that name.
  bool add_clock() {
    std::string name = "CK";
    while (n_.find(name) != no_id) name += '_';
    if (name != "CK")
      warn({}, fmt::format(
                   "the file already has a net 'CK'; the flip-flops' generated clock input is '{}'",
                   name));
    clock_ = n_.add_net(name, 0);
    n_.aliases.push_back(net_alias{0, name, clock_});
    n_.inputs.push_back(clock_);
    return true;
  }

  bool add_gate(const gate_line& g) {
    std::vector<net_id> in;
    in.reserve(g.args.size());
    for (const auto& a : g.args) in.push_back(net_of(a.text));
    n_.add_gate(to_gate_kind(g.kind), net_of(g.out.text), in, {}, delay_, g.out.loc);
    return true;
  }

  // Q = DFF(D) becomes the positive-edge-triggered D flip-flop of six NAND
  // gates (three set/reset latches; METHODS.md section 7, the TTL '74 logic
  // without preset and clear):
  //   n1 = NAND(n4, n2)   n2 = NAND(n1, CK)   n3 = NAND(n2, CK, n4)
  //   n4 = NAND(n3, D)    Q  = NAND(n2, qb)   qb = NAND(n3, Q)
  // Internal nets are named Q.n1 .. Q.n4, Q.qb in a scope of their own.
  // Initial state: the reset state of common practice, Q = 0, qb = 1, with the
  // input latches at rest for CK = 0 and D = 0 (n2 = n3 = 1, n4 = 1, n1 = 0).
  // It is stable once CK = 0 is applied, whatever D then is: D = 1 only
  // moves n4 to 0 and n1 to 1, which n2 and n3 ignore while CK = 0.
  bool add_flip_flop(const gate_line& g) {
    if (opt_.dff == "primitive") {
      // One edge-triggered primitive instead (speed comparisons); it starts at 0.
      const net_id q = net_of(g.out.text);
      n_.add_gate(gate_kind::dff, q, {net_of(g.args[0].text), clock_}, {}, delay_, g.out.loc);
      n_.init[q] = logic::zero;
      return true;
    }
    const std::string q_name(g.out.text);
    const auto scope_index = static_cast<std::uint32_t>(n_.scopes.size());
    n_.scopes.push_back(scope{q_name, "dff", 0});
    static constexpr const char* locals[] = {"n1", "n2", "n3", "n4", "qb"};
    net_id inner[5];
    for (int i = 0; i < 5; ++i) {
      auto full = q_name + "." + locals[i];
      if (n_.find(full) != no_id) {
        r_.error(
            f_, g.out.loc,
            fmt::format("the flip-flop's internal net '{}' clashes with a net of the file", full));
        return false;
      }
      inner[i] = n_.add_net(full, scope_index);
      n_.aliases.push_back(net_alias{scope_index, locals[i], inner[i]});
    }
    const net_id n1 = inner[0], n2 = inner[1], n3 = inner[2], n4 = inner[3], qb = inner[4];
    const net_id q = net_of(g.out.text), d = net_of(g.args[0].text);
    // The ports alias the nets outside, as block ports do in the .settle language.
    for (auto [local, id] : {std::pair{"d", d}, std::pair{"ck", clock_}, std::pair{"q", q}}) {
      n_.aliases.push_back(net_alias{scope_index, local, id});
      n_.add_name(q_name + "." + local, id);
    }
    const auto loc = g.out.loc;
    n_.add_gate(gate_kind::nand, n1, {n4, n2}, {}, delay_, loc);
    n_.add_gate(gate_kind::nand, n2, {n1, clock_}, {}, delay_, loc);
    n_.add_gate(gate_kind::nand, n3, {n2, clock_, n4}, {}, delay_, loc);
    n_.add_gate(gate_kind::nand, n4, {n3, d}, {}, delay_, loc);
    n_.add_gate(gate_kind::nand, q, {n2, qb}, {}, delay_, loc);
    n_.add_gate(gate_kind::nand, qb, {n3, q}, {}, delay_, loc);
    n_.init[n1] = logic::zero;
    n_.init[n2] = n_.init[n3] = n_.init[n4] = logic::one;
    n_.init[q] = logic::zero;
    n_.init[qb] = logic::one;
    return true;
  }

  const std::string& file_;
  const bench_file& f_;
  const load_options& opt_;
  reader& r_;
  diagnostics& diags_;
  netlist& n_;
  gate_delay delay_;
  net_id clock_ = no_id;
  std::unordered_map<std::string_view, source_loc> first_driver_;
  std::unordered_set<std::string_view> floating_names_;
  std::vector<net_id> floating_;
};

// The counts `check` reports, from the file's lines as stats.csv defines them.
source_counts count_lines(const bench_file& f) {
  source_counts c;
  c.format = "bench";
  c.inputs = static_cast<std::uint32_t>(f.inputs.size());
  c.outputs = static_cast<std::uint32_t>(f.outputs.size());
  for (const auto& g : f.gates) {
    switch (g.kind) {
      case bench_kind::dff:
        ++c.dffs;
        break;
      case bench_kind::not_:
        ++c.inverters;
        break;
      case bench_kind::buff:
        ++c.buffers;
        break;
      default:
        ++c.gates;
        break;
    }
  }
  return c;
}

}  // namespace

std::optional<design> load_bench_text(std::string_view text, const std::string& name,
                                      const load_options& opt, diagnostics& diags) {
  if (opt.dff != "gates" && opt.dff != "primitive") {
    diagnostic d;
    d.file = name;
    d.message = fmt::format("unknown --dff mode '{}' (expected gates or primitive)", opt.dff);
    diags.add(std::move(d));
    return std::nullopt;
  }
  bench_file file;
  reader r(text, name, diags);
  if (!r.read(file)) return std::nullopt;
  design out;
  out.path = name;
  builder b(name, file, opt, r, diags, out);
  if (!b.build()) return std::nullopt;
  out.source = count_lines(file);
  return out;
}

}  // namespace settle
