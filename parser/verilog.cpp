// The structural Verilog reader: comments and directives, statements, modules,
// and their lowering into the IR scopes the .settle elaborator flattens.
#include "parser/verilog.hpp"

#include <fmt/format.h>
#include <sys/stat.h>

#include <algorithm>
#include <cctype>
#include <cerrno>
#include <cmath>
#include <cstring>
#include <deque>
#include <fstream>
#include <memory>
#include <sstream>
#include <unordered_map>
#include <unordered_set>
#include <vector>

#include "parser/ir.hpp"
#include "parser/lexical.hpp"
#include "parser/verilog_parse.hpp"

namespace settle {
namespace {

constexpr auto id_start = lexical::ident_start;
constexpr auto id_char = lexical::verilog_ident_char;
bool space(char c) { return std::isspace(static_cast<unsigned char>(c)) != 0; }
/// Bounds on one statement (see reader::statement).
constexpr int max_nesting = 256;
constexpr std::size_t max_operators = 10000;

bool is_primitive(std::string_view w) {
  for (const char* k : {"and", "nand", "or", "nor", "xor", "xnor", "buf", "not", "assign"})
    if (w == k) return true;
  return false;
}

/// The `timescale in effect from an offset of the text on: the unit in fs
/// (0 before any directive) and the precision delays are rounded to.
struct timescale_mark {
  std::size_t offset = 0;
  long double unit = 0, precision = 0;
};

/// Keywords that begin constructs outside the structural subset, with what to call them.
const char* unsupported_word(std::string_view w) {
  static const std::unordered_map<std::string_view, const char*> words = {
      {"inout", "'inout'"},
      {"reg", "'reg'"},
      {"always", "'always' (behavioural code)"},
      {"initial", "'initial' (behavioural code)"},
      {"parameter", "'parameter'"},
      {"localparam", "'localparam'"},
      {"defparam", "'defparam'"},
      {"generate", "'generate'"},
      {"genvar", "'genvar'"},
      {"function", "'function'"},
      {"task", "'task'"},
      {"integer", "'integer'"},
      {"real", "'real'"},
      {"time", "'time'"},
      {"supply0", "'supply0'"},
      {"supply1", "'supply1'"},
      {"tri", "'tri'"},
      {"wand", "'wand'"},
      {"wor", "'wor'"},
      {"bufif0", "the 'bufif0' gate"},
      {"bufif1", "the 'bufif1' gate"},
      {"notif0", "the 'notif0' gate"},
      {"notif1", "the 'notif1' gate"},
      {"pullup", "the 'pullup' gate"},
      {"pulldown", "the 'pulldown' gate"},
      {"nmos", "the 'nmos' switch"},
      {"pmos", "the 'pmos' switch"},
      {"cmos", "the 'cmos' switch"},
      {"tran", "the 'tran' switch"},
      {"event", "'event'"},
  };
  auto it = words.find(w);
  return it == words.end() ? nullptr : it->second;
}

/// A place in one of the files read: the file (0: the one given, others
/// included) and the line and column within it.
struct vloc : source_loc {
  std::uint32_t file = 0;
};

/// The files one read takes text from: the one given and those it includes,
/// each with its own reporter, so that a diagnostic names the file it is in.
class file_set {
 public:
  struct source {
    std::string owned;  // an included file's text
    std::string_view text;
    std::string name;
    std::unique_ptr<ir::reporter> rep;
    std::int32_t parent = -1;  // the including file
    dev_t dev = 0;
    ino_t ino = 0;
    bool identified = false;
  };

  file_set(std::string_view text, const std::string& name, diagnostics& diags) : diags_(diags) {
    auto& f = files_.emplace_back();
    f.text = text;
    f.name = name;
    f.rep = std::make_unique<ir::reporter>(text, name, diags);
    struct stat st {};
    if (::stat(name.c_str(), &st) == 0) f.dev = st.st_dev, f.ino = st.st_ino, f.identified = true;
  }
  std::uint32_t add(std::string text, std::string name, std::uint32_t parent, dev_t dev,
                    ino_t ino) {
    auto& f = files_.emplace_back();
    f.owned = std::move(text);
    f.text = f.owned;
    f.name = std::move(name);
    f.rep = std::make_unique<ir::reporter>(f.text, f.name, diags_);
    f.parent = static_cast<std::int32_t>(parent);
    f.dev = dev, f.ino = ino, f.identified = true;
    return static_cast<std::uint32_t>(files_.size() - 1);
  }
  const source& operator[](std::uint32_t i) const { return files_[i]; }
  ir::reporter& reporter(std::uint32_t i) { return *files_[i].rep; }
  void error(const vloc& at, const std::string& msg) { files_[at.file].rep->error(at, msg); }
  void warning(const vloc& at, const std::string& msg) { files_[at.file].rep->warning(at, msg); }
  std::size_t errors() const {
    std::size_t n = 0;
    for (auto& f : files_) n += f.rep->errors();
    return n;
  }
  /// "L:C" for a place in file `here`, "FILE:L:C" for one in another file.
  std::string where(const vloc& at, std::uint32_t here) const {
    return at.file == here ? fmt::format("{}:{}", at.line, at.col)
                           : fmt::format("{}:{}:{}", files_[at.file].name, at.line, at.col);
  }

 private:
  diagnostics& diags_;
  std::deque<source> files_;
};

struct vsignal {
  std::string_view name;
  std::string dir;  // "input", "output" or "" (a wire)
  bool vector = false, has_dir_decl = false, has_wire_decl = false;
  int msb = 0, lsb = 0;
  vloc loc;
};

template <typename T>
struct timed {
  T stmt;
  long double unit = 0, precision = 0;
};

struct vmodule {
  std::string_view name;
  vloc loc;
  std::size_t begin = 0;  // where its header starts in the text read
  bool ansi = false;
  std::vector<vast::raw> header;  // non-ANSI port names, in order
  std::vector<std::string_view> port_order;
  std::unordered_map<std::string_view, std::size_t> index;
  std::vector<vsignal> sigs;
  std::vector<timed<vast::gate_stmt>> gates;
  std::vector<timed<vast::assign_stmt>> assigns;
  std::vector<vast::inst_stmt> insts;
  /// Simple module paths of its specify blocks: `(SRC => DST) = DELAY;`
  /// (parallel, bit by bit) or `(SRC, ... *> DST, ...) = DELAY;` (full).
  struct path {
    std::vector<vast::raw> from, to;
    bool full = false;
    vast::raw delay;  ///< from the '=' to the ';'
    long double unit = 0, precision = 0;
    vloc loc;  ///< its opening parenthesis
  };
  std::vector<path> paths;
};

/// A user-defined primitive: its ports, state and table (level-sensitive rows).
struct udp_def {
  std::string_view name;
  vloc loc;
  std::vector<std::string> ports;  // the output first
  bool sequential = false;
  logic initial = logic::x;
  bool has_initial = false;
  struct row {
    std::string ins;  // one symbol per input
    char state = 0;   // sequential tables: the present-state symbol
    char out = 0;
    vloc loc;
  };
  std::vector<row> rows;
  // The lowering: a C-element (sequential) or, for combinational tables, the
  // output for every binary input combination (bit k of the index = input k).
  bool celem = false;
  std::vector<bool> truth;
};

/// A bit of a connection: a net's full name in its scope, "0", "1" or x_bit.
using bits = std::vector<std::string_view>;

/// The net an x or z constant bit reads: one per module that uses one, a
/// buffer of itself, which holds x for ever.
constexpr std::string_view x_bit = "1'bx";

class reader {
 public:
  reader(std::string_view text, const std::string& name, const load_options& opt,
         diagnostics& diags)
      : text_(text), name_(name), opt_(opt), rep_(text, name, diags) {}

  /// Reads every module of the text (and of the files it includes).
  bool read() {
    clean_ = std::string(text_);
    segs_.push_back({0, 0, 0});
    preprocess();
    if (rep_.errors()) return false;
    find_udp_names();
    statements();
    return rep_.errors() == 0;
  }

  /// The modules as blocks for a .settle file that imports this one: each
  /// scope reports through the reporter of its own file.
  std::vector<ir::scope_def> library(std::vector<std::string>& where) {
    std::vector<ir::scope_def> out;
    for (auto& m : modules_) {
      out.push_back(lower(m));
      out.back().rep = &rep_.reporter(m.loc.file);
      where.push_back(fmt::format("{}:{}:{}", rep_[m.loc.file].name, m.loc.line, m.loc.col));
    }
    return out;
  }
  std::size_t errors() const { return rep_.errors(); }

  std::optional<design> run() {
    if (!read()) return std::nullopt;
    if (modules_.empty()) {
      rep_.error(loc(clean_.data() + clean_.size()), "the file holds no module");
      return std::nullopt;
    }
    const vmodule* top = choose_top();
    if (!top) return std::nullopt;
    ir::file f;
    f.text = text_;
    for (auto& m : modules_) {
      ir::scope_def s = lower(m);
      if (m.loc.file != 0) s.rep = &rep_.reporter(m.loc.file);
      if (&m == top)
        f.top = std::move(s);
      else
        f.blocks.push_back(std::move(s));
    }
    if (rep_.errors()) return std::nullopt;
    design d;
    d.path = name_;
    ir::elaborate(f, d.nets, rep_.reporter(0));
    if (rep_.errors()) return std::nullopt;
    d.source.format = "verilog";
    d.source.inputs = static_cast<std::uint32_t>(d.nets.inputs.size());
    d.source.outputs = static_cast<std::uint32_t>(d.nets.outputs.size());
    for (auto k : d.nets.kind) {
      if (k == gate_kind::inv)
        ++d.source.inverters;
      else if (k == gate_kind::buf)
        ++d.source.buffers;
      else
        ++d.source.gates;
    }
    d.nets.blocks = static_cast<std::uint32_t>(f.blocks.size());
    return d;
  }

 private:
  vloc loc(const char* p) { return loc_at(static_cast<std::size_t>(p - clean_.data())); }
  /// The file, line and column of an offset of the text read (includes spliced in).
  vloc loc_at(std::size_t off) {
    auto it = std::upper_bound(segs_.begin(), segs_.end(), off,
                               [](std::size_t o, const segment& g) { return o < g.begin; });
    const segment& g = *(it - 1);
    const auto& f = rep_[g.file];
    const std::size_t foff = std::min(g.file_off + (off - g.begin), f.text.size());
    vloc v;
    static_cast<source_loc&>(v) = rep_.reporter(g.file).loc_of(f.text.data() + foff);
    v.file = g.file;
    return v;
  }
  /// The file an offset of the text read belongs to.
  std::uint32_t file_at(std::size_t off) const {
    auto it = std::upper_bound(segs_.begin(), segs_.end(), off,
                               [](std::size_t o, const segment& g) { return o < g.begin; });
    return (it - 1)->file;
  }
  std::string_view intern(std::string s) { return pool_.emplace_back(std::move(s)); }

  // ---- Comments, attributes and compiler directives -----------------------

  void blank(std::size_t from, std::size_t to) {
    for (auto i = from; i < to && i < clean_.size(); ++i)
      if (clean_[i] != '\n') clean_[i] = ' ';
  }

  void preprocess() {
    std::string& s = clean_;
    std::size_t i = 0;
    while (i < s.size()) {
      if (s.compare(i, 2, "//") == 0) {
        auto e = s.find('\n', i);
        if (e == std::string::npos) e = s.size();
        blank(i, e);
        i = e;
      } else if (s.compare(i, 2, "/*") == 0) {
        auto e = s.find("*/", i + 2);
        if (e == std::string::npos) {
          rep_.error(loc_at(i), "this comment is never closed (no '*/')");
          blank(i, s.size());
          return;
        }
        blank(i, e + 2);
        i = e + 2;
      } else if (s.compare(i, 2, "(*") == 0 && (i + 2 >= s.size() || s[i + 2] != ')')) {
        auto e = s.find("*)", i + 2);
        if (e == std::string::npos) {
          rep_.error(loc_at(i), "this attribute is never closed (no '*)')");
          blank(i, s.size());
          return;
        }
        blank(i, e + 2);
        i = e + 2;
      } else if (s[i] == '`') {
        i = directive(i);
      } else if (s[i] == '"') {
        rep_.error(loc_at(i), "strings are not supported by settle's structural reader");
        return;
      } else {
        ++i;
      }
    }
  }

  /// One compiler directive at `at`; returns where scanning goes on.
  std::size_t directive(std::size_t at) {
    std::string& s = clean_;
    std::size_t e = at + 1;
    while (e < s.size() && id_char(s[e])) ++e;
    const std::string word = s.substr(at + 1, e - at - 1);
    auto line_end = s.find('\n', at);
    if (line_end == std::string::npos) line_end = s.size();
    if (word == "celldefine" || word == "endcelldefine" || word == "resetall") {
      blank(at, e);
      return e;
    }
    if (word == "timescale") {
      timescale(at, e, line_end);
      blank(at, line_end);
      return line_end;
    }
    if (word == "include") return include(at, e, line_end);
    rep_.error(
        loc_at(at),
        fmt::format("the directive '`{}' is not supported by settle's structural reader", word));
    blank(at, line_end);
    return line_end;
  }

  /// `timescale 1ns / 10ps: each side 1, 10 or 100 and a unit s ms us ns ps fs.
  void timescale(std::size_t at, std::size_t from, std::size_t to) {
    const std::string& s = clean_;
    std::size_t i = from;
    auto skip = [&] {
      while (i < to && space(s[i])) ++i;
    };
    auto one = [&](long double& out) -> bool {
      skip();
      const auto start = i;
      while (i < to && std::isdigit(static_cast<unsigned char>(s[i]))) ++i;
      const std::string num = s.substr(start, i - start);
      skip();
      const auto ustart = i;
      while (i < to && std::isalpha(static_cast<unsigned char>(s[i]))) ++i;
      const std::string unit = s.substr(ustart, i - ustart);
      static const std::unordered_map<std::string, int> exp = {{"s", 15}, {"ms", 12}, {"us", 9},
                                                               {"ns", 6}, {"ps", 3},  {"fs", 0}};
      auto it = exp.find(unit);
      if ((num != "1" && num != "10" && num != "100") || it == exp.end()) {
        rep_.error(loc_at(start),
                   "expected a time such as 1ns, 10ps or 100fs in `timescale (1, 10 or 100 "
                   "and a unit s ms us ns ps fs)");
        return false;
      }
      out = std::stold(num) * std::pow(10.0L, it->second);
      return true;
    };
    timescale_mark m;
    m.offset = at;
    if (!one(m.unit)) return;
    skip();
    if (i >= to || s[i] != '/') {
      rep_.error(loc_at(i), "expected '/' and the precision in `timescale");
      return;
    }
    ++i;
    if (!one(m.precision)) return;
    skip();
    if (i < to) {
      rep_.error(loc_at(i), "unexpected text after `timescale");
      return;
    }
    if (m.precision > m.unit) {
      rep_.error(loc_at(at), "the `timescale precision is coarser than its unit");
      return;
    }
    if (m.precision < 1) {
      rep_.error(loc_at(at),
                 "settle's time step is 1fs: a `timescale precision below 1fs is not supported");
      return;
    }
    scales_.push_back(m);
  }

  /// `include "PATH" at `at`: PATH (relative to the including file) is read
  /// and spliced in after the directive's line, which must hold nothing else
  /// but a comment. Returns where scanning goes on: the included text.
  std::size_t include(std::size_t at, std::size_t from, std::size_t line_end) {
    std::string& s = clean_;
    std::size_t q = from;
    while (q < line_end && space(s[q])) ++q;
    if (q >= line_end || s[q] != '"') {
      rep_.error(loc_at(q), "expected a quoted file name after `include");
      blank(at, line_end);
      return line_end;
    }
    const std::size_t close = s.find('"', q + 1);
    if (close == std::string::npos || close >= line_end || close == q + 1) {
      rep_.error(loc_at(q), "expected a quoted file name after `include");
      blank(at, line_end);
      return line_end;
    }
    std::size_t rest = close + 1;
    while (rest < line_end && space(s[rest])) ++rest;
    if (rest < line_end && s.compare(rest, 2, "//") != 0) {
      rep_.error(loc_at(rest), "unexpected text after `include \"FILE\" on its line");
      blank(at, line_end);
      return line_end;
    }
    const vloc where = loc_at(q);
    const std::string path = s.substr(q + 1, close - q - 1);
    blank(at, close + 1);
    const std::uint32_t parent = file_at(at);
    std::string full = path;
    if (path.front() != '/') {
      const std::string& outer = rep_[parent].name;
      const auto slash = outer.rfind('/');
      if (slash != std::string::npos) full = outer.substr(0, slash + 1) + path;
    }
    struct stat st {};
    const int err = ::stat(full.c_str(), &st) != 0 ? errno : S_ISDIR(st.st_mode) ? EISDIR : 0;
    std::ifstream in(full, std::ios::binary);
    if (err || !in) {
      rep_.error(where, fmt::format("cannot read the included file '{}': {}", full,
                                    std::strerror(err ? err : EIO)));
      return line_end;
    }
    // A file that includes itself, directly or through others, never ends.
    std::vector<std::uint32_t> chain;
    for (auto f = static_cast<std::int32_t>(parent); f >= 0; f = rep_[f].parent)
      chain.push_back(static_cast<std::uint32_t>(f));
    for (std::size_t k = 0; k < chain.size(); ++k) {
      const auto& f = rep_[chain[k]];
      if (!f.identified || f.dev != st.st_dev || f.ino != st.st_ino) continue;
      std::string cycle;
      for (std::size_t j = k + 1; j-- > 0;) cycle += rep_[chain[j]].name + " -> ";
      rep_.error(where, fmt::format("`include cycle: {}{}", cycle, full));
      return line_end;
    }
    std::ostringstream body;
    body << in.rdbuf();
    std::string text = body.str();
    const std::uint32_t g = rep_.add(text, full, parent, st.st_dev, st.st_ino);
    if (text.empty() || text.back() != '\n') text.push_back('\n');
    if (line_end == s.size()) s.push_back('\n');
    const std::size_t p = line_end + 1, n = text.size();
    s.insert(p, text);
    includes_.push_back({at, where});
    // Split the segment the directive is in around the spliced text.
    auto it = std::upper_bound(segs_.begin(), segs_.end(), at,
                               [](std::size_t o, const segment& x) { return o < x.begin; });
    const segment cur = *(it - 1);
    for (auto j = it; j != segs_.end(); ++j) j->begin += n;
    const segment after{p + n, cur.file, cur.file_off + (p - cur.begin)};
    it = segs_.insert(it, after);
    segs_.insert(it, segment{p, g, 0});
    return line_end;
  }

  const timescale_mark* scale_at(const char* p) const {
    const auto off = static_cast<std::size_t>(p - clean_.data());
    const timescale_mark* best = nullptr;
    for (auto& m : scales_)
      if (m.offset <= off) best = &m;
    return best;
  }

  // ---- Statements and modules ---------------------------------------------

  std::string_view word_at(std::size_t i) const {
    std::size_t e = i;
    while (e < clean_.size() && id_char(clean_[e])) ++e;
    return std::string_view(clean_).substr(i, e - i);
  }

  void statements() {
    const std::string& s = clean_;
    std::size_t i = 0;
    vmodule* cur = nullptr;
    while (true) {
      while (i < s.size() && space(s[i])) ++i;
      if (i >= s.size()) break;
      const std::string_view first = id_start(s[i]) ? word_at(i) : std::string_view{};
      if (first == "endmodule") {
        if (!cur) rep_.error(loc_at(i), "'endmodule' without a module");
        for (auto& inc : includes_)
          if (cur && inc.first > cur->begin && inc.first < i) {
            rep_.error(inc.second, fmt::format("`include inside module '{}' is not supported; "
                                               "include files between modules",
                                               cur->name));
            return;
          }
        cur = nullptr;
        i += first.size();
        continue;
      }
      if (first == "primitive") {
        if (cur) {
          rep_.error(
              loc_at(i),
              fmt::format("'primitive' inside module '{}' (no 'endmodule' before it)", cur->name));
          return;
        }
        i = udp(i);
        if (rep_.errors()) return;
        continue;
      }
      if (first == "specify") {
        if (!cur) {
          rep_.error(loc_at(i), "'specify' outside a module");
          return;
        }
        i = specify(i, *cur);
        if (rep_.errors()) return;
        continue;
      }
      if (first == "endprimitive" || first == "endspecify") {
        rep_.error(loc_at(i), fmt::format("'{}' without its opening keyword", first));
        return;
      }
      if (auto what = unsupported_word(first)) {
        rep_.error(loc_at(i),
                   fmt::format("{} is not supported by settle's structural reader", what));
        return;  // the rest would be misread
      }
      if (!first.empty() && first != "module") {
        auto k = i + first.size();
        while (k < s.size() && space(s[k])) ++k;
        if (k < s.size() && s[k] == '#' && !is_primitive(first) && !udp_names_.count(first)) {
          rep_.error(loc_at(k),
                     "parameter overrides (#(...) on a module instance) are not supported by "
                     "settle's structural reader");
          return;
        }
      }
      // The statement runs to the next ';' (an 'endmodule' first means it is missing).
      std::size_t e = i + first.size();
      std::size_t last_text = e;
      bool found = false;
      while (e < s.size()) {
        if (s[e] == ';') {
          found = true;
          break;
        }
        if (id_start(s[e]) && (e == 0 || !id_char(s[e - 1]))) {
          auto w = word_at(e);
          if (w == "endmodule" || w == "module") break;
          e += w.size();
          last_text = e;
          continue;
        }
        if (!space(s[e])) last_text = e + 1;
        ++e;
      }
      if (!found) {
        rep_.error(loc_at(last_text), "expected ';'");
        return;
      }
      statement(std::string_view(s).substr(i, e - i), cur);
      if (rep_.errors()) return;
      i = e + 1;
    }
    if (cur) rep_.error(cur->loc, fmt::format("module '{}' has no 'endmodule'", cur->name));
  }

  /// Reads `specify ... endspecify` at offset i into m.paths; returns the
  /// offset after `endspecify`.
  std::size_t specify(std::size_t i, vmodule& m) {
    const std::string& s = clean_;
    const std::size_t open = i;
    i += std::string_view("specify").size();
    auto refuse = [&](std::size_t at, const std::string& what) {
      rep_.error(loc_at(at),
                 fmt::format("{} is not supported by settle's structural reader", what));
      return s.size();
    };
    while (true) {
      while (i < s.size() && space(s[i])) ++i;
      if (i >= s.size() || word_at(i) == "endmodule") {
        rep_.error(loc_at(open), "'specify' has no 'endspecify'");
        return s.size();
      }
      const auto w = id_start(s[i]) ? word_at(i) : std::string_view{};
      if (w == "endspecify") return i + w.size();
      if (w == "specparam") return refuse(i, "'specparam'");
      if (w == "if" || w == "ifnone") return refuse(i, "a state-dependent module path");
      if (w == "showcancelled" || w == "noshowcancelled" || w == "pulsestyle_onevent" ||
          w == "pulsestyle_ondetect")
        return refuse(i, fmt::format("'{}'", w));
      if (s[i] == '$') return refuse(i, "a timing check");
      if (s[i] != '(') {
        rep_.error(loc_at(i), "expected a module path such as (a => y) = 10; or 'endspecify'");
        return s.size();
      }
      const std::size_t close = s.find(')', i);
      const std::size_t semi = s.find(';', i);
      if (close == std::string::npos || semi == std::string::npos || semi < close) {
        rep_.error(loc_at(i), "expected a module path such as (a => y) = 10;");
        return s.size();
      }
      vmodule::path p;
      p.loc = loc_at(i);
      const std::string_view inside = std::string_view(s).substr(i + 1, close - i - 1);
      auto arrow = inside.find("=>");
      if (arrow == std::string_view::npos) {
        arrow = inside.find("*>");
        p.full = true;
      }
      if (arrow == std::string_view::npos) {
        rep_.error(p.loc, "expected '=>' or '*>' in a module path");
        return s.size();
      }
      if (arrow > 0 && (inside[arrow - 1] == '+' || inside[arrow - 1] == '-'))
        return refuse(i + 1 + arrow - 1, "a module path polarity (+=> -=> +*> -*>)");
      // The terminals: names or bit- and part-selects, separated by commas.
      auto terms = [&](std::size_t b, std::size_t e, std::vector<vast::raw>& out) {
        std::size_t k = b;
        while (k < e) {
          while (k < e && (space(s[k]) || s[k] == ',')) ++k;
          if (k >= e) break;
          if (!id_start(s[k])) {
            rep_.error(loc_at(k), "expected a net in a module path");
            return false;
          }
          const auto name = word_at(k);
          if (name == "posedge" || name == "negedge") {
            refuse(k, "an edge-sensitive module path");
            return false;
          }
          std::size_t t = k + name.size();
          while (t < e && space(s[t])) ++t;
          if (t < e && s[t] == '[') {
            const auto rb = s.find(']', t);
            if (rb == std::string::npos || rb >= e) {
              rep_.error(loc_at(t), "expected ']'");
              return false;
            }
            t = rb + 1;
          }
          std::string text;
          for (std::size_t c = k; c < t; ++c)
            if (!space(s[c])) text += s[c];
          out.push_back(vast::raw{text, s.data() + k});
          k = t;
        }
        if (out.empty()) {
          rep_.error(loc_at(b), "expected a net in a module path");
          return false;
        }
        return true;
      };
      const std::size_t a = i + 1 + arrow;
      if (!terms(i + 1, a, p.from) || !terms(a + 2, close, p.to)) return s.size();
      std::size_t q = close + 1;
      while (q < semi && space(s[q])) ++q;
      if (q >= semi || s[q] != '=') {
        rep_.error(loc_at(q), "expected '=' and the path delay");
        return s.size();
      }
      p.delay = vast::raw{s.substr(q, semi - q), s.data() + q};
      const timescale_mark* ts = scale_at(s.data() + q);
      p.unit = ts ? ts->unit : 0;
      p.precision = ts ? ts->precision : 0;
      m.paths.push_back(std::move(p));
      i = semi + 1;
    }
  }

  void statement(std::string_view text, vmodule*& cur) {
    // The grammar and the expression lowering recurse once per level of
    // parentheses or ?:, and the lowering once per binary operator: bound both
    // so that no input can exhaust the stack.
    int depth = 0;
    std::size_t ops = 0;
    for (std::size_t k = 0; k < text.size(); ++k) {
      const char c = text[k];
      depth += c == '(' || c == '?';
      depth -= c == ')';
      ops += c == '&' || c == '|' || c == '^' || c == '?';
      if (depth > max_nesting) {
        rep_.error(
            loc(text.data() + k),
            fmt::format("expressions nested deeper than {} levels are not supported", max_nesting));
        return;
      }
      if (ops > max_operators) {
        rep_.error(
            loc(text.data() + k),
            fmt::format("a statement with more than {} operators is not supported", max_operators));
        return;
      }
    }
    vast::statement st;
    vgrammar::syntax_error err;
    if (!vgrammar::parse_statement(text, st, err)) {
      rep_.error(loc(err.pos), err.message);
      return;
    }
    if (auto* h = boost::get<vast::module_hdr>(&st)) {
      if (cur) {
        rep_.error(loc(h->name.pos),
                   fmt::format("module '{}' begins inside module '{}' (no 'endmodule' before it)",
                               h->name.text, cur->name));
        return;
      }
      for (auto& m : modules_)
        if (m.name == h->name.text) {
          const vloc here = loc(h->name.pos);
          rep_.error(here, fmt::format("module '{}' is already defined at {}", h->name.text,
                                       rep_.where(m.loc, here.file)));
          return;
        }
      cur = &modules_.emplace_back();
      cur->begin = static_cast<std::size_t>(text.data() - clean_.data());
      module_header(*cur, *h);
      return;
    }
    if (!cur) {
      rep_.error(loc(text.data()), "expected 'module': this statement is outside any module");
      return;
    }
    const timescale_mark* ts = scale_at(text.data());
    const long double unit = ts ? ts->unit : 0, precision = ts ? ts->precision : 0;
    if (auto* dcl = boost::get<vast::decl_stmt>(&st)) {
      declare(*cur, *dcl);
    } else if (auto* g = boost::get<vast::gate_stmt>(&st)) {
      cur->gates.push_back({std::move(*g), unit, precision});
    } else if (auto* a = boost::get<vast::assign_stmt>(&st)) {
      cur->assigns.push_back({std::move(*a), unit, precision});
    } else if (auto* in = boost::get<vast::inst_stmt>(&st)) {
      cur->insts.push_back(std::move(*in));
    }
  }

  bool decode_range(const vast::raw& r, int& msb, int& lsb) {
    if (std::sscanf(r.text.c_str(), " [ %d : %d ]", &msb, &lsb) != 2) {
      rep_.error(loc(r.pos), "expected a range [MSB:LSB]");
      return false;
    }
    if (msb < 0 || lsb < 0) {
      rep_.error(loc(r.pos),
                 "negative bit indices are not supported by settle's structural reader");
      return false;
    }
    return true;
  }

  /// Adds or completes a signal; `dir` "" for a wire declaration.
  void add_signal(vmodule& m, const vast::raw& name, const std::string& dir,
                  const boost::optional<vast::raw>& range, bool header) {
    int msb = 0, lsb = 0;
    if (range && !decode_range(*range, msb, lsb)) return;
    const auto key = intern(name.text);
    auto it = m.index.find(key);
    if (it == m.index.end()) {
      if (!m.ansi && !header && !dir.empty()) {
        bool listed = false;
        for (auto& h : m.header) listed = listed || h.text == name.text;
        if (!listed) {
          rep_.error(loc(name.pos),
                     fmt::format("'{}' is declared {} but is not in the port list of module '{}'",
                                 name.text, dir, m.name));
          return;
        }
      }
      vsignal s{key, dir, bool(range), !dir.empty(), dir.empty(), msb, lsb, loc(name.pos)};
      m.index.emplace(key, m.sigs.size());
      m.sigs.push_back(s);
      return;
    }
    vsignal& s = m.sigs[it->second];
    // `output y; wire y;` (either order) describes one net; anything else repeats a name.
    const bool completes = (dir.empty() && s.has_dir_decl && !s.has_wire_decl) ||
                           (!dir.empty() && !s.has_dir_decl && s.has_wire_decl);
    if (!completes || m.ansi) {
      rep_.error(loc(name.pos), fmt::format("'{}' is already declared at {}:{}", name.text,
                                            s.loc.line, s.loc.col));
      return;
    }
    if (bool(range) != s.vector || (range && (s.msb != msb || s.lsb != lsb))) {
      rep_.error(loc(name.pos), fmt::format("'{}' is declared with another range at {}:{}",
                                            name.text, s.loc.line, s.loc.col));
      return;
    }
    if (!dir.empty()) {
      s.dir = dir;
      s.has_dir_decl = true;
    } else {
      s.has_wire_decl = true;
    }
  }

  void module_header(vmodule& m, const vast::module_hdr& h) {
    m.name = intern(h.name.text);
    m.loc = loc(h.name.pos);
    m.ansi = !h.ports.empty() && h.ports.front().dir.has_value();
    std::string dir;
    boost::optional<vast::raw> range;
    for (std::size_t i = 0; i < h.ports.size(); ++i) {
      const auto& p = h.ports[i];
      if (!m.ansi) {
        if (p.dir || p.range) {
          rep_.error(loc(p.name.pos),
                     "a port list either declares every port (ANSI style) or only names them");
          return;
        }
        for (auto& prev : m.header)
          if (prev.text == p.name.text) {
            rep_.error(loc(p.name.pos), fmt::format("port '{}' is listed twice", p.name.text));
            return;
          }
        m.header.push_back(p.name);
        m.port_order.push_back(intern(p.name.text));
        continue;
      }
      if (p.dir) {
        dir = *p.dir;
        range = p.range;
      } else if (p.range) {
        range = p.range;
      }
      add_signal(m, p.name, dir, range, true);
      m.port_order.push_back(intern(p.name.text));
    }
  }

  void declare(vmodule& m, const vast::decl_stmt& d) {
    if (m.ansi && d.kind != "wire") {
      rep_.error(
          loc(d.names.front().pos),
          fmt::format(
              "module '{}' declares its ports in its header (ANSI style); '{}' cannot be declared "
              "again in its body",
              m.name, d.kind));
      return;
    }
    for (auto& n : d.names)
      add_signal(m, n, d.kind == "wire" ? std::string() : d.kind, d.range, false);
  }

  // ---- User-defined primitives --------------------------------------------

  void find_udp_names() {
    const std::string& s = clean_;
    for (std::size_t i = s.find("primitive"); i != std::string::npos;
         i = s.find("primitive", i + 1)) {
      if ((i > 0 && id_char(s[i - 1])) || (i + 9 < s.size() && id_char(s[i + 9]))) continue;
      auto k = i + 9;
      while (k < s.size() && space(s[k])) ++k;
      if (k < s.size() && id_start(s[k])) udp_names_.insert(intern(std::string(word_at(k))));
    }
  }

  const udp_def* udp_named(std::string_view n) const {
    for (auto& u : udps_)
      if (u.name == n) return &u;
    return nullptr;
  }

  /// Reads `primitive NAME (PORTS); declarations; [initial Q = V;] table ROWS endtable
  /// endprimitive` starting at `at`; returns the offset after `endprimitive`.
  std::size_t udp(std::size_t at) {
    const std::string& s = clean_;
    std::size_t i = at + 9;
    auto skip = [&] {
      while (i < s.size() && space(s[i])) ++i;
    };
    auto fail = [&](std::size_t where, std::string msg) {
      rep_.error(loc_at(where), std::move(msg));
      return s.size();
    };
    auto word = [&]() -> std::string {
      skip();
      if (i >= s.size() || !id_start(s[i])) return {};
      auto w = std::string(word_at(i));
      i += w.size();
      return w;
    };
    auto expect = [&](char c) {
      skip();
      if (i < s.size() && s[i] == c) {
        ++i;
        return true;
      }
      return false;
    };
    auto found = [&] {
      skip();
      return i >= s.size() ? std::string("the end of the file") : fmt::format("'{}'", s[i]);
    };
    udp_def u;
    skip();
    const auto name_at = i;
    const std::string name = word();
    if (name.empty()) return fail(i, "expected the primitive's name, found " + found());
    u.name = intern(name);
    u.loc = loc_at(name_at);
    if (udp_named(u.name) || module_named(u.name))
      return fail(name_at, fmt::format("'{}' is already defined", name));
    if (!expect('(')) return fail(i, "expected '(' and the primitive's ports, found " + found());
    do {
      skip();
      const auto p_at = i;
      auto p = word();
      if (p.empty()) return fail(p_at, "expected a port name, found " + found());
      u.ports.push_back(p);
    } while (expect(','));
    if (!expect(')')) return fail(i, "expected ')', found " + found());
    if (!expect(';')) return fail(i, "expected ';', found " + found());
    if (u.ports.size() < 2)
      return fail(name_at, "a primitive needs an output and at least one input");
    std::unordered_set<std::string> outputs, inputs, regs;
    for (;;) {
      skip();
      const auto w_at = i;
      const std::string w = word();
      if (w == "output" || w == "input" || w == "reg") {
        std::string kind = w;
        if (w == "output") {
          auto save = i;
          if (word() == "reg")
            regs.insert("");  // marks "output reg" for the name below
          else
            i = save;
        }
        do {
          skip();
          const auto n_at = i;
          auto n = word();
          if (n.empty()) return fail(n_at, "expected a port name, found " + found());
          if (std::find(u.ports.begin(), u.ports.end(), n) == u.ports.end())
            return fail(n_at, fmt::format("'{}' is not a port of primitive '{}'", n, name));
          if (kind == "output") outputs.insert(n);
          if (kind == "input") inputs.insert(n);
          if (kind == "reg" || regs.count("")) regs.insert(n);
        } while (expect(','));
        regs.erase("");
        if (!expect(';')) return fail(i, "expected ';', found " + found());
        continue;
      }
      if (w == "initial") {
        skip();
        const auto q_at = i;
        if (word() != u.ports[0]) return fail(q_at, "expected the output after 'initial'");
        if (!expect('=')) return fail(i, "expected '=', found " + found());
        skip();
        const auto v_at = i;
        while (i < s.size() && (std::isalnum(static_cast<unsigned char>(s[i])) || s[i] == '\''))
          ++i;
        const std::string v = s.substr(v_at, i - v_at);
        if (v == "0" || v == "1'b0" || v == "1'B0")
          u.initial = logic::zero;
        else if (v == "1" || v == "1'b1" || v == "1'B1")
          u.initial = logic::one;
        else if (v == "1'bx" || v == "1'bX")
          u.initial = logic::x;
        else
          return fail(v_at, "expected 0, 1, 1'b0, 1'b1 or 1'bx after 'initial Q ='");
        u.has_initial = true;
        if (!expect(';')) return fail(i, "expected ';', found " + found());
        continue;
      }
      if (w == "table") break;
      return fail(w_at,
                  w.empty()
                      ? "expected 'table', found " + found()
                      : fmt::format("expected a declaration, 'initial' or 'table', found '{}'", w));
    }
    if (outputs.size() != 1 || !outputs.count(u.ports[0]))
      return fail(name_at,
                  fmt::format("primitive '{}' must declare its first port '{}' as its one output",
                              name, u.ports[0]));
    for (std::size_t k = 1; k < u.ports.size(); ++k)
      if (!inputs.count(u.ports[k]))
        return fail(name_at, fmt::format("port '{}' of primitive '{}' is not declared an input",
                                         u.ports[k], name));
    u.sequential = regs.count(u.ports[0]) > 0;
    if (u.has_initial && !u.sequential)
      return fail(name_at, "'initial' needs a sequential primitive (declare its output 'reg')");
    const std::size_t n = u.ports.size() - 1;
    // Rows: N input symbols, ':' [state ':'] output ';'.
    for (;;) {
      skip();
      const auto r_at = i;
      if (word_at(i) == "endtable") {
        i += 8;
        break;
      }
      if (i >= s.size()) return fail(at, "this primitive's table has no 'endtable'");
      udp_def::row r;
      r.loc = loc_at(r_at);
      std::vector<std::string> fields(1);
      std::vector<std::size_t> field_at{i};
      while (i < s.size() && s[i] != ';') {
        const char c = s[i];
        if (c == ':') {
          fields.emplace_back();
          field_at.push_back(i + 1);
        } else if (c == '(' || std::strchr("rRfFpPnN*", c)) {
          return fail(
              i,
              "edge-sensitive table entries are not supported yet by settle's structural reader "
              "(only level-sensitive tables)");
        } else if (std::strchr("01xX?bB-", c)) {
          fields.back() += static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
        } else if (!space(c)) {
          return fail(i, fmt::format("'{}' is not a table symbol (0 1 x ? b -)", c));
        }
        ++i;
      }
      if (i >= s.size()) return fail(r_at, "expected ';' at the end of this table row");
      ++i;
      const std::size_t want = u.sequential ? 3 : 2;
      if (fields.size() != want)
        return fail(r_at, fmt::format("a {} table row has {} fields separated by ':'",
                                      u.sequential ? "sequential" : "combinational", want));
      if (fields[0].size() != n)
        return fail(r_at,
                    fmt::format("this row gives {} input symbols; primitive '{}' has {} inputs",
                                fields[0].size(), name, n));
      r.ins = fields[0];
      if (u.sequential) {
        if (fields[1].size() != 1) return fail(field_at[1], "expected one present-state symbol");
        r.state = fields[1][0];
      }
      const auto& o = fields.back();
      if (o.size() != 1 || std::strchr("01x-", o[0]) == nullptr || (o[0] == '-' && !u.sequential))
        return fail(field_at.back(), u.sequential ? "expected an output 0, 1, x or -"
                                                  : "expected an output 0, 1 or x");
      r.out = o[0];
      u.rows.push_back(r);
    }
    skip();
    if (word_at(i) != "endprimitive") return fail(i, "expected 'endprimitive', found " + found());
    i += 12;
    if (!analyse(u)) return s.size();
    udps_.push_back(std::move(u));
    return i;
  }

  /// The output a level-sensitive table gives for binary inputs (and present
  /// state q): '0', '1', 'x', '-' or 0 when no row matches; reports conflicts.
  char table_out(const udp_def& u, std::uint32_t m, int q, bool& ok) {
    auto match = [](char sym, int v) { return sym == '?' || sym == 'b' || sym == (v ? '1' : '0'); };
    char got = 0;
    const udp_def::row* first = nullptr;
    for (auto& r : u.rows) {
      bool hit = true;
      for (std::size_t k = 0; k < r.ins.size() && hit; ++k) hit = match(r.ins[k], (m >> k) & 1);
      if (hit && u.sequential) hit = match(r.state, q);
      if (!hit) continue;
      char o = r.out == '-' ? (q ? '1' : '0') : r.out;
      if (got && o != got) {
        rep_.error(r.loc, fmt::format("this row contradicts the row at {}:{}", first->loc.line,
                                      first->loc.col));
        ok = false;
        return 0;
      }
      got = o;
      first = first ? first : &r;
    }
    return got;
  }

  bool analyse(udp_def& u) {
    const std::size_t n = u.ports.size() - 1;
    if (n > 10) {
      rep_.error(u.loc, "primitives with more than 10 inputs are not supported");
      return false;
    }
    auto combo = [&](std::uint32_t m) {
      std::string t;
      for (std::size_t k = 0; k < n; ++k)
        t += fmt::format("{}{}={}", k ? ", " : "", u.ports[k + 1], (m >> k) & 1);
      return t;
    };
    bool ok = true;
    const std::uint32_t count = 1u << n;
    if (!u.sequential) {
      u.truth.assign(count, false);
      for (std::uint32_t m = 0; m < count && ok; ++m) {
        const char o = table_out(u, m, 0, ok);
        if (!ok) return false;
        if (o != '0' && o != '1') {
          rep_.error(
              u.loc,
              fmt::format("primitive '{}' gives no binary output for {} (settle's reader needs one "
                          "for every binary input)",
                          u.name, combo(m)));
          return false;
        }
        u.truth[m] = o == '1';
      }
      return true;
    }
    // Sequential: only the C-element (Muller and Bartky 1959) is supported: the
    // output follows the inputs when they all agree and holds otherwise.
    for (std::uint32_t m = 0; m < count; ++m)
      for (int q = 0; q < 2; ++q) {
        const char o = table_out(u, m, q, ok);
        if (!ok) return false;
        const char want = m == 0 ? '0' : m == count - 1 ? '1' : (q ? '1' : '0');
        if (o != want) {
          rep_.error(
              u.loc,
              fmt::format("the sequential table of '{}' is not a C-element (for {} and present "
                          "state {} it gives {}, a C-element {}); other sequential tables are "
                          "not supported yet",
                          u.name, combo(m), q, o ? std::string(1, o) : "nothing", want));
          return false;
        }
      }
    u.celem = true;
    return true;
  }

  /// One instance of a primitive: terms[0] the output, the rest its inputs.
  void lower_udp(const udp_def& u, const std::vector<std::string_view>& term,
                 const std::vector<vloc>& at, const gate_delay& delay, vloc where,
                 ir::scope_def& s) {
    if (term.size() != u.ports.size()) {
      rep_.error(where, fmt::format("primitive '{}' has {} ports; this instance connects {}",
                                    u.name, u.ports.size(), term.size()));
      return;
    }
    ir::gate gt;
    gt.out = ref_of(term[0], at[0]);
    gt.has_delay = true;
    gt.delay = delay;
    gt.reads_begin = static_cast<std::uint32_t>(s.read_pool.size());
    gt.code_begin = static_cast<std::uint32_t>(s.code_pool.size());
    if (u.celem) {
      gt.kind = gate_kind::celem;
      for (std::size_t k = 1; k < term.size(); ++k) s.read_pool.push_back(ref_of(term[k], at[k]));
      if (u.has_initial) s.inits.push_back({ref_of(term[0], at[0]), u.initial});
    } else {
      // Sum of the minterms whose output is 1 (the gate is evaluated over the
      // binary resolutions of its x inputs, so x follows exactly).
      gt.kind = gate_kind::expr;
      std::vector<std::string_view> reads;
      std::vector<std::uint32_t> index;
      for (std::size_t k = 1; k < term.size(); ++k) {
        auto it = std::find(reads.begin(), reads.end(), term[k]);
        index.push_back(static_cast<std::uint32_t>(it - reads.begin()));
        if (it == reads.end()) {
          reads.push_back(term[k]);
          s.read_pool.push_back(ref_of(term[k], at[k]));
        }
      }
      bool any = false;
      for (std::uint32_t m = 0; m < u.truth.size(); ++m) {
        if (!u.truth[m]) continue;
        for (std::size_t k = 0; k < index.size(); ++k) {
          s.code_pool.push_back(encode(op::input, index[k]));
          if (!((m >> k) & 1)) s.code_pool.push_back(encode(op::inv));
          if (k) s.code_pool.push_back(encode(op::and2));
        }
        if (any) s.code_pool.push_back(encode(op::or2));
        any = true;
      }
      if (!any) s.code_pool.push_back(encode(op::const0));
    }
    gt.reads_end = static_cast<std::uint32_t>(s.read_pool.size());
    gt.code_end = static_cast<std::uint32_t>(s.code_pool.size());
    s.gates.push_back(gt);
  }

  // ---- Top module ----------------------------------------------------------

  const vmodule* choose_top() {
    std::unordered_set<std::string_view> used;
    for (auto& m : modules_)
      for (auto& st : m.insts) used.insert(st.module.text);
    if (!opt_.top.empty()) {
      for (auto& m : modules_)
        if (m.name == opt_.top) return &m;
      std::string names;
      for (auto& m : modules_) names += fmt::format("{}'{}'", names.empty() ? "" : ", ", m.name);
      rep_.error({}, fmt::format("--top {}: no module of that name (the file defines {})", opt_.top,
                                 names));
      return nullptr;
    }
    std::vector<const vmodule*> roots;
    for (auto& m : modules_)
      if (!used.count(m.name)) roots.push_back(&m);
    if (roots.size() == 1) return roots.front();
    if (roots.empty()) {
      rep_.error(modules_.front().loc,
                 "every module is instantiated by another: there is no top module");
      return nullptr;
    }
    std::string names;
    for (auto* m : roots) names += fmt::format("{}'{}'", names.empty() ? "" : ", ", m->name);
    rep_.error(roots[1]->loc,
               fmt::format("more than one module is instantiated by no other: {}; choose the top "
                           "module with --top NAME",
                           names));
    return nullptr;
  }

  // ---- Lowering into the IR ------------------------------------------------

  std::string_view bit_name(const vsignal& s, int i) {
    return s.vector ? intern(fmt::format("{}[{}]", s.name, i)) : s.name;
  }

  /// Every bit of a signal, MSB first.
  void all_bits(const vsignal& s, bits& out) {
    if (!s.vector) {
      out.push_back(s.name);
      return;
    }
    const int step = s.msb >= s.lsb ? -1 : 1;
    for (int i = s.msb;; i += step) {
      out.push_back(bit_name(s, i));
      if (i == s.lsb) break;
    }
  }

  /// The bits of a based constant (IEEE 1364-2005 3.5.1), MSB first: "0",
  /// "1", or x_bit for an x or z digit (settle has no high impedance: z
  /// reads as x). Sized constants are cut or extended to their width, with
  /// x when the leftmost digit is x or z and 0 otherwise.
  bool constant_bits(const vast::raw& t, std::size_t q, bits& out) {
    const std::string& x = t.text;
    const char base = static_cast<char>(std::tolower(static_cast<unsigned char>(x[q + 1])));
    const int per = base == 'b' ? 1 : base == 'o' ? 3 : base == 'h' ? 4 : 0;
    std::string digits;
    for (auto k = q + 2; k < x.size(); ++k)
      if (x[k] != '_' && !space(x[k]))
        digits += static_cast<char>(std::tolower(static_cast<unsigned char>(x[k])));
    auto bad = [&](const std::string& why) {
      rep_.error(loc(t.pos), fmt::format("the constant '{}' {}", x, why));
      return false;
    };
    auto unknown = [](char c) { return c == 'x' || c == 'z'; };
    std::string b;  // '0', '1' or 'x', MSB first
    if (per == 0) {
      if (digits.size() == 1 && unknown(digits[0])) {
        b = "x";
      } else {
        unsigned long long v = 0;
        for (char c : digits) {
          if (c < '0' || c > '9') return bad("holds a digit that is not decimal");
          if (v > (~0ULL - 9) / 10) return bad("is wider than 64 bits");
          v = v * 10 + static_cast<unsigned>(c - '0');
        }
        for (; v; v >>= 1) b.insert(b.begin(), (v & 1) ? '1' : '0');
        if (b.empty()) b = "0";
      }
    } else {
      for (char c : digits) {
        int v = 0;
        if (unknown(c)) {
          b.append(static_cast<std::size_t>(per), 'x');
          continue;
        }
        if (c >= '0' && c <= '9')
          v = c - '0';
        else if (c >= 'a' && c <= 'f')
          v = c - 'a' + 10;
        if (!std::isxdigit(static_cast<unsigned char>(c)) || v >= (1 << per))
          return bad(
              fmt::format("holds the digit '{}', which base '{}' does not have", c, x[q + 1]));
        for (int k = per - 1; k >= 0; --k) b += ((v >> k) & 1) ? '1' : '0';
      }
    }
    std::size_t width = b.size();
    if (q > 0) {
      const int w = std::atoi(x.substr(0, q).c_str());
      if (w <= 0) return bad("has a width below 1");
      if (w > 4096) return bad("is wider than 4096 bits");
      width = static_cast<std::size_t>(w);
    }
    if (b.size() > width) b.erase(0, b.size() - width);
    const char fill = b[0] == 'x' ? 'x' : '0';
    b.insert(0, width - b.size(), fill);
    for (char c : b) out.push_back(c == '1' ? "1" : c == '0' ? "0" : x_bit);
    return true;
  }

  /// The bits of one term (MSB first); false after reporting.
  bool term_bits(const vmodule& m, const vast::raw& t, bits& out) {
    const std::string& x = t.text;
    const auto q = x.find('\'');
    if (q != std::string::npos) return constant_bits(t, q, out);
    std::size_t e = 0;
    while (e < x.size() && id_char(x[e])) ++e;
    const std::string base = x.substr(0, e);
    auto it = m.index.find(base);
    if (it == m.index.end()) {
      rep_.error(
          loc(t.pos),
          fmt::format("unknown net '{}' (declare it: implicit nets are not supported)", base));
      return false;
    }
    const vsignal& s = m.sigs[it->second];
    const std::string sel = x.substr(e);
    if (sel.find('[') == std::string::npos) {
      all_bits(s, out);
      return true;
    }
    int a = 0, b = 0;
    const bool part = std::sscanf(sel.c_str(), " [ %d : %d ]", &a, &b) == 2;
    if (!part && std::sscanf(sel.c_str(), " [ %d ]", &a) != 1) {
      rep_.error(loc(t.pos), "expected a bit-select [N] or part-select [M:L]");
      return false;
    }
    if (!part) b = a;
    if (!s.vector) {
      rep_.error(loc(t.pos), fmt::format("'{}' is a scalar; it has no bits to select", base));
      return false;
    }
    const int lo = std::min(s.msb, s.lsb), hi = std::max(s.msb, s.lsb);
    if (a < lo || a > hi || b < lo || b > hi) {
      rep_.error(loc(t.pos),
                 fmt::format("'{}' is out of the range [{}:{}] of '{}'", x, s.msb, s.lsb, base));
      return false;
    }
    if (part && a != b && ((a > b) != (s.msb > s.lsb))) {
      rep_.error(loc(t.pos),
                 fmt::format("the part-select '{}' runs against the direction of [{}:{}]", x, s.msb,
                             s.lsb));
      return false;
    }
    const int step = a >= b ? -1 : 1;
    for (int i = a;; i += step) {
      out.push_back(bit_name(s, i));
      if (i == b) break;
    }
    return true;
  }

  bool conn_bits(const vmodule& m, const vast::conn& c, bits& out) {
    for (auto& t : c)
      if (!term_bits(m, t, out)) return false;
    return true;
  }

  /// One delay value in fs.
  bool delay_value(std::string_view num, const char* at, long double unit, long double precision,
                   time_fs& out) {
    if (unit <= 0) {
      rep_.error(loc(at),
                 "a delay needs a `timescale directive before it (for example `timescale 1ns/1ps)");
      return false;
    }
    const long double v = std::stold(std::string(num)) * unit;
    const long double steps = std::round(v / precision);
    if (steps * precision > 1e18L) {
      rep_.error(loc(at), "this delay is too large");
      return false;
    }
    out = static_cast<time_fs>(steps * precision);
    return true;
  }

  /// `#D`, `#(D)`, `#(R, F)`, each value N or MIN:TYP:MAX.
  bool decode_delay(const vast::raw& r, long double unit, long double precision, gate_delay& out) {
    std::vector<delay_range> ranges;
    const std::string& x = r.text;
    std::size_t i = 1;
    std::vector<time_fs> vals;
    auto flush = [&](const char* at) {
      if (vals.size() == 1) vals.assign(3, vals[0]);
      delay_range d{vals[0], vals[1], vals[2]};
      if (!(d.min <= d.typ && d.typ <= d.max)) {
        rep_.error(loc(at), "a MIN:TYP:MAX delay must have MIN <= TYP <= MAX");
        return false;
      }
      ranges.push_back(d);
      vals.clear();
      return true;
    };
    const char* group_at = r.pos + 1;
    while (i < x.size()) {
      const char c = x[i];
      if (std::isdigit(static_cast<unsigned char>(c))) {
        auto e = i;
        while (e < x.size() && (std::isdigit(static_cast<unsigned char>(x[e])) || x[e] == '.')) ++e;
        if (vals.empty()) group_at = r.pos + i;
        time_fs v = 0;
        if (!delay_value(std::string_view(x).substr(i, e - i), r.pos + i, unit, precision, v))
          return false;
        vals.push_back(v);
        i = e;
        continue;
      }
      if (c == ',' && !flush(group_at)) return false;
      ++i;
    }
    if (!vals.empty() && !flush(group_at)) return false;
    if (ranges.size() > 2) {
      rep_.error(
          loc(r.pos),
          "a third delay (the change to z) is not supported: give one delay or two (rise, fall)");
      return false;
    }
    out.rise = ranges[0];
    out.fall = ranges.size() == 2 ? ranges[1] : ranges[0];
    out.transport = false;
    return true;
  }

  gate_delay default_delay() const {
    gate_delay d;
    d.rise = d.fall = opt_.bench_delay;
    return d;
  }

  ir::ref ref_of(std::string_view n, source_loc at) { return ir::ref{n, at}; }

  ir::scope_def lower(const vmodule& m) {
    ir::scope_def s;
    s.id = ir::ref{m.name, m.loc};
    for (auto& h : m.header)
      if (!m.index.count(h.text) || m.sigs[m.index.at(h.text)].dir.empty())
        rep_.error(loc(h.pos),
                   fmt::format("port '{}' of module '{}' has no input or output declaration",
                               h.text, m.name));
    bits b;
    for (auto& sig : m.sigs) {
      b.clear();
      all_bits(sig, b);
      auto& list = sig.dir == "input" ? s.ins : sig.dir == "output" ? s.outs : s.wires;
      for (auto n : b) list.push_back(ref_of(n, sig.loc));
    }
    for (auto& g : m.gates) lower_gates(m, g, s);
    for (auto& a : m.assigns) lower_assigns(m, a, s);
    for (auto& st : m.insts) lower_insts(m, st, s);
    lower_paths(m, s);
    add_x_source(m, s);
    return s;
  }

  /// Declares x_bit and its gate in a module that reads it.
  void add_x_source(const vmodule& m, ir::scope_def& s) {
    bool used = std::any_of(s.read_pool.begin(), s.read_pool.end(),
                            [](const ir::ref& r) { return r.name == x_bit; });
    for (auto& in : s.insts)
      for (auto& b : in.binds) used = used || b.target.name == x_bit;
    if (!used) return;
    s.wires.push_back(ref_of(x_bit, m.loc));
    ir::gate g;
    g.out = ref_of(x_bit, m.loc);
    g.kind = gate_kind::buf;
    g.reads_begin = static_cast<std::uint32_t>(s.read_pool.size());
    s.read_pool.push_back(ref_of(x_bit, m.loc));
    g.reads_end = static_cast<std::uint32_t>(s.read_pool.size());
    g.code_begin = g.code_end = static_cast<std::uint32_t>(s.code_pool.size());
    g.arcs_begin = g.arcs_end = static_cast<std::uint32_t>(s.arc_pool.size());
    g.has_delay = true;
    g.delay = default_delay();  // never used: x in, x out, no event ever
    s.gates.push_back(g);
  }

  /// The gates of one module by the nets they read, for the paths of its specify blocks.
  class gate_graph {
   public:
    explicit gate_graph(const ir::scope_def& s) : s_(s) {
      for (std::size_t h = 0; h < s.gates.size(); ++h) {
        driver_.emplace(s.gates[h].out.name, h);
        for (auto k = s.gates[h].reads_begin; k < s.gates[h].reads_end; ++k)
          readers_[s.read_pool[k].name].push_back(h);
      }
    }
    /// Every path of gates from net `in` to gate g: g's reads of `in` or of a
    /// net between (at), and the reads of such nets by the gates between.
    void cone(std::string_view in, std::size_t g,
              std::vector<std::pair<std::size_t, std::string_view>>& at,
              std::vector<std::pair<std::size_t, std::string_view>>& between) const {
      std::unordered_set<std::string_view> ahead{in};
      std::vector<std::string_view> work{in};
      while (!work.empty()) {
        const auto k = work.back();
        work.pop_back();
        auto it = readers_.find(k);
        if (it == readers_.end()) continue;
        for (auto h : it->second)
          if (h != g && ahead.insert(s_.gates[h].out.name).second)
            work.push_back(s_.gates[h].out.name);
      }
      std::unordered_set<std::size_t> behind{g};
      std::vector<std::size_t> gates{g};
      while (!gates.empty()) {
        const auto h = gates.back();
        gates.pop_back();
        for (auto k = s_.gates[h].reads_begin; k < s_.gates[h].reads_end; ++k) {
          const auto net = s_.read_pool[k].name;
          if (!ahead.count(net)) continue;
          auto& list = h == g ? at : between;
          if (std::find(list.begin(), list.end(), std::pair{h, net}) == list.end())
            list.emplace_back(h, net);
          auto d = driver_.find(net);
          if (d != driver_.end() && behind.insert(d->second).second) gates.push_back(d->second);
        }
      }
    }

   private:
    const ir::scope_def& s_;
    std::unordered_map<std::string_view, std::vector<std::size_t>> readers_;
    std::unordered_map<std::string_view, std::size_t> driver_;
  };

  /// Each module path times the arcs of the gate that drives its destination,
  /// from its source or the nets between (whose gates take zero delay).
  void lower_paths(const vmodule& m, ir::scope_def& s) {
    if (m.paths.empty()) return;
    // per gate: its arcs, and the path source each output-gate arc came from
    std::vector<std::vector<std::pair<ir::arc, std::string_view>>> per_gate(s.gates.size());
    const gate_graph paths(s);
    std::optional<vloc> met;
    auto is_dir = [&](std::string_view bit, const std::string& dir) {
      for (auto& sig : m.sigs) {
        if (sig.dir != dir) continue;
        bits b;
        all_bits(sig, b);
        for (auto n : b)
          if (n == bit) return true;
      }
      return false;
    };
    for (auto& p : m.paths) {
      gate_delay d;
      if (!decode_delay(p.delay, p.unit, p.precision, d)) continue;
      bits from, to;
      bool ok = true;
      for (auto& t : p.from) ok = ok && term_bits(m, t, from);
      for (auto& t : p.to) ok = ok && term_bits(m, t, to);
      if (!ok) continue;
      if (!p.full && from.size() != to.size()) {
        rep_.error(p.loc, fmt::format("a parallel module path (=>) joins equal widths; this one "
                                      "has {} source bits and {} destination bits",
                                      from.size(), to.size()));
        continue;
      }
      for (std::size_t i = 0; i < from.size(); ++i)
        for (std::size_t j = 0; j < to.size(); ++j) {
          if (!p.full && i != j) continue;
          if (!is_dir(from[i], "input")) {
            rep_.error(p.loc, fmt::format("module path source '{}' is not an input of module '{}'",
                                          from[i], m.name));
            continue;
          }
          if (!is_dir(to[j], "output")) {
            rep_.error(p.loc,
                       fmt::format("module path destination '{}' is not an output of module '{}'",
                                   to[j], m.name));
            continue;
          }
          std::size_t g = 0;
          while (g < s.gates.size() && s.gates[g].out.name != to[j]) ++g;
          if (g == s.gates.size()) {
            rep_.error(p.loc,
                       fmt::format("module path {} to {}: no gate of module '{}' drives '{}' (a "
                                   "path times one gate, from an input it reads to its output)",
                                   from[i], to[j], m.name, to[j]));
            continue;
          }
          std::vector<std::pair<std::size_t, std::string_view>> at, between;
          paths.cone(from[i], g, at, between);
          if (at.empty()) {
            rep_.error(p.loc,
                       fmt::format("module path {} to {}: '{}' reaches the gate driving '{}' "
                                   "through no gate of module '{}'",
                                   from[i], to[j], from[i], to[j], m.name));
            continue;
          }
          // The path's delay is the output gate's, on its arcs from the nets
          // the path runs through; the gates between take none.
          for (const auto& [h, read] : between) {
            const std::string_view net = read;  // a lambda cannot capture a binding (C++17)
            auto& arcs = per_gate[h];
            if (std::none_of(arcs.begin(), arcs.end(),
                             [&](auto& a) { return a.first.from.name == net; }))
              arcs.push_back({ir::arc{ref_of(net, p.loc), gate_delay{}}, {}});
          }
          for (const auto& [h, read] : at) {
            const std::string_view net = read;
            auto& arcs = per_gate[h];
            auto it = std::find_if(arcs.begin(), arcs.end(),
                                   [&](auto& a) { return a.first.from.name == net; });
            if (it == arcs.end() || it->second == from[i]) {
              // a path written twice is an error of the elaboration (two arcs from one net)
              arcs.push_back({ir::arc{ref_of(net, p.loc), d}, from[i]});
              continue;
            }
            auto& w = it->first.delay;
            for (auto [x, y] : {std::pair{&w.rise, &d.rise}, std::pair{&w.fall, &d.fall}})
              *x = {std::min(x->min, y->min), std::max(x->typ, y->typ), std::max(x->max, y->max)};
            if (!met) met = p.loc;
          }
        }
    }
    if (met)
      rep_.warning(*met, fmt::format("module paths of module '{}' meet before the gate driving "
                                     "their output; the arc they share takes the widest range "
                                     "of them",
                                     m.name));
    for (std::size_t g = 0; g < s.gates.size(); ++g) {
      s.gates[g].arcs_begin = static_cast<std::uint32_t>(s.arc_pool.size());
      for (auto& a : per_gate[g]) s.arc_pool.push_back(a.first);
      s.gates[g].arcs_end = static_cast<std::uint32_t>(s.arc_pool.size());
    }
  }

  void lower_gates(const vmodule& m, const timed<vast::gate_stmt>& t, ir::scope_def& s) {
    const auto& g = t.stmt;
    gate_delay delay = default_delay();
    if (g.delay && !decode_delay(*g.delay, t.unit, t.precision, delay)) return;
    static const std::unordered_map<std::string, gate_kind> kinds = {
        {"and", gate_kind::and_}, {"nand", gate_kind::nand}, {"or", gate_kind::or_},
        {"nor", gate_kind::nor},  {"xor", gate_kind::xor_},  {"xnor", gate_kind::xnor},
        {"buf", gate_kind::buf},  {"not", gate_kind::inv}};
    const udp_def* u = nullptr;
    if (!kinds.count(g.kind.text)) {
      u = udp_named(g.kind.text);
      if (!u) {
        rep_.error(loc(g.kind.pos), fmt::format("unknown primitive '{}'", g.kind.text));
        return;
      }
    }
    const gate_kind kind = u ? gate_kind::expr : kinds.at(g.kind.text);
    const bool multi_out = kind == gate_kind::buf || kind == gate_kind::inv;
    for (auto& inst : g.insts) {
      std::vector<std::string_view> term;
      std::vector<vloc> at;
      bool ok = true;
      for (auto& c : inst.terms) {
        bits b;
        if (!conn_bits(m, c, b)) {
          ok = false;
          break;
        }
        if (b.size() != 1) {
          rep_.error(
              loc(c.front().pos),
              fmt::format(
                  "a gate terminal is one bit; this one is {} bits wide (arrays of gate instances "
                  "are not supported)",
                  b.size()));
          ok = false;
          break;
        }
        term.push_back(b[0]);
        at.push_back(loc(c.front().pos));
      }
      if (!ok) continue;
      const vloc where = inst.name ? loc(inst.name->pos) : loc(g.kind.pos);
      if (u) {
        lower_udp(*u, term, at, delay, where, s);
        continue;
      }
      if (term.size() < 2) {
        rep_.error(where, fmt::format("'{}' needs an output and at least one input", g.kind.text));
        continue;
      }
      auto add = [&](std::size_t out, std::size_t in_begin, std::size_t in_end) {
        ir::gate gt;
        gt.out = ref_of(term[out], at[out]);
        gt.kind = kind;
        gt.reads_begin = static_cast<std::uint32_t>(s.read_pool.size());
        for (auto k = in_begin; k < in_end; ++k) s.read_pool.push_back(ref_of(term[k], at[k]));
        gt.reads_end = static_cast<std::uint32_t>(s.read_pool.size());
        gt.code_begin = gt.code_end = static_cast<std::uint32_t>(s.code_pool.size());
        gt.has_delay = true;
        gt.delay = delay;
        s.gates.push_back(gt);
      };
      if (multi_out) {
        for (std::size_t o = 0; o + 1 < term.size(); ++o) add(o, term.size() - 1, term.size());
      } else {
        add(0, 1, term.size());
      }
    }
  }

  // ---- assign: a small precedence parser over the checked expression text ----

  struct node {
    enum kind_t : std::uint8_t { leaf, inv, and2, or2, xor2, xnor2, mux } kind = leaf;
    int a = -1, b = -1, c = -1;
    bits leaf_bits;
    const char* pos = nullptr;
  };

  class expr_parser {
   public:
    expr_parser(reader& r, const vmodule& m, const vast::raw& e, std::vector<node>& nodes)
        : r_(r), m_(m), s_(e.text), base_(e.pos), nodes_(nodes) {}
    int parse() {
      int n = cond();
      return ok_ ? n : -1;
    }

   private:
    void skip() {
      while (i_ < s_.size() && space(s_[i_])) ++i_;
    }
    bool eat(std::string_view t) {
      skip();
      if (s_.compare(i_, t.size(), t) != 0) return false;
      i_ += t.size();
      return true;
    }
    int add(node n) {
      nodes_.push_back(std::move(n));
      return static_cast<int>(nodes_.size() - 1);
    }
    int cond() {
      int c = or_e();
      if (!ok_ || !eat("?")) return c;
      int a = cond();
      eat(":");
      int b = cond();
      node n;
      n.kind = node::mux;
      n.a = a, n.b = b, n.c = c;
      return add(std::move(n));
    }
    int or_e() {
      int l = xor_e();
      while (ok_ && peek_single('|')) {
        ++i_;
        node n;
        n.kind = node::or2;
        n.a = l, n.b = xor_e();
        l = add(std::move(n));
      }
      return l;
    }
    int xor_e() {
      int l = and_e();
      while (ok_) {
        node n;
        if (eat("~^") || eat("^~"))
          n.kind = node::xnor2;
        else if (eat("^"))
          n.kind = node::xor2;
        else
          break;
        n.a = l, n.b = and_e();
        l = add(std::move(n));
      }
      return l;
    }
    int and_e() {
      int l = unary();
      while (ok_ && peek_single('&')) {
        ++i_;
        node n;
        n.kind = node::and2;
        n.a = l, n.b = unary();
        l = add(std::move(n));
      }
      return l;
    }
    bool peek_single(char c) {
      skip();
      return i_ < s_.size() && s_[i_] == c && (i_ + 1 >= s_.size() || s_[i_ + 1] != c);
    }
    int unary() {
      skip();
      bool odd = false;  // ~~a is a: only the parity of the '~' matters
      while (i_ < s_.size() && s_[i_] == '~' && (i_ + 1 >= s_.size() || s_[i_ + 1] != '^')) {
        odd = !odd;
        ++i_;
        skip();
      }
      if (odd) {
        node n;
        n.kind = node::inv;
        n.a = unary();
        return add(std::move(n));
      }
      if (eat("(")) {
        int n = cond();
        eat(")");
        return n;
      }
      if (eat("{")) {  // a concatenation of terms: one leaf of their bits
        node n;
        n.pos = base_ + i_ - 1;
        do {
          node part = term();
          n.leaf_bits.insert(n.leaf_bits.end(), part.leaf_bits.begin(), part.leaf_bits.end());
        } while (ok_ && eat(","));
        eat("}");
        return add(std::move(n));
      }
      return add(term());
    }

    /// A term: a based constant, or a name with an optional select.
    node term() {
      skip();
      const auto start = i_;
      if (i_ < s_.size() && (std::isdigit(static_cast<unsigned char>(s_[i_])) || s_[i_] == '\'')) {
        while (i_ < s_.size() && (std::isalnum(static_cast<unsigned char>(s_[i_])) ||
                                  s_[i_] == '\'' || s_[i_] == '_'))
          ++i_;
      } else {
        while (i_ < s_.size() && id_char(s_[i_])) ++i_;
        auto save = i_;
        skip();
        if (i_ < s_.size() && s_[i_] == '[') {
          auto close = s_.find(']', i_);
          i_ = close == std::string::npos ? s_.size() : close + 1;
        } else {
          i_ = save;
        }
      }
      vast::raw t{s_.substr(start, i_ - start), base_ + start};
      node n;
      n.pos = t.pos;
      if (!r_.term_bits(m_, t, n.leaf_bits)) ok_ = false;
      return n;
    }

    reader& r_;
    const vmodule& m_;
    const std::string& s_;
    const char* base_;
    std::vector<node>& nodes_;
    std::size_t i_ = 0;
    bool ok_ = true;
  };

  /// Checks every operand is `width` bits wide (the select of ?: one bit).
  bool check_widths(const std::vector<node>& nodes, int n, std::size_t width) {
    const node& x = nodes[static_cast<std::size_t>(n)];
    if (x.kind == node::leaf) {
      if (x.leaf_bits.size() == width) return true;
      rep_.error(
          loc(x.pos),
          fmt::format("this operand is {} bit{} wide, the assignment's target {} (settle's reader "
                      "needs equal widths)",
                      x.leaf_bits.size(), x.leaf_bits.size() == 1 ? "" : "s", width));
      return false;
    }
    if (x.kind == node::mux && !check_widths(nodes, x.c, 1)) return false;
    if (!check_widths(nodes, x.a, width)) return false;
    return x.b < 0 || check_widths(nodes, x.b, width);
  }

  /// Emits bit `bit` of node n as postfix code; reads collects distinct nets.
  void emit(const std::vector<node>& nodes, int n, std::size_t bit,
            std::vector<std::string_view>& reads, std::vector<std::uint32_t>& code) {
    const node& x = nodes[static_cast<std::size_t>(n)];
    switch (x.kind) {
      case node::leaf: {
        const auto name = x.leaf_bits.size() == 1 ? x.leaf_bits[0] : x.leaf_bits[bit];
        if (name == "0" || name == "1") {
          code.push_back(encode(name == "1" ? op::const1 : op::const0));
          return;
        }
        auto it = std::find(reads.begin(), reads.end(), name);
        const auto idx = static_cast<std::uint32_t>(it - reads.begin());
        if (it == reads.end()) reads.push_back(name);
        code.push_back(encode(op::input, idx));
        return;
      }
      case node::inv:
        emit(nodes, x.a, bit, reads, code);
        code.push_back(encode(op::inv));
        return;
      case node::mux:
        // c ? a : b = (c & a) | (~c & b); the gate is evaluated over every
        // binary resolution of its x inputs, so the result is exact.
        emit(nodes, x.c, 0, reads, code);
        emit(nodes, x.a, bit, reads, code);
        code.push_back(encode(op::and2));
        emit(nodes, x.c, 0, reads, code);
        code.push_back(encode(op::inv));
        emit(nodes, x.b, bit, reads, code);
        code.push_back(encode(op::and2));
        code.push_back(encode(op::or2));
        return;
      default:
        break;
    }
    emit(nodes, x.a, bit, reads, code);
    emit(nodes, x.b, bit, reads, code);
    switch (x.kind) {
      case node::and2:
        code.push_back(encode(op::and2));
        break;
      case node::or2:
        code.push_back(encode(op::or2));
        break;
      case node::xor2:
        code.push_back(encode(op::xor2));
        break;
      default:
        code.push_back(encode(op::xor2));
        code.push_back(encode(op::inv));
        break;
    }
  }

  void lower_assigns(const vmodule& m, const timed<vast::assign_stmt>& t, ir::scope_def& s) {
    gate_delay delay = default_delay();
    if (t.stmt.delay && !decode_delay(*t.stmt.delay, t.unit, t.precision, delay)) return;
    for (auto& item : t.stmt.items) {
      bits lhs;
      if (!conn_bits(m, item.lhs, lhs)) continue;
      for (std::size_t k = 0; k < lhs.size(); ++k)
        if (lhs[k] == "0" || lhs[k] == "1" || lhs[k] == x_bit) {
          rep_.error(loc(item.lhs.front().pos), "an assignment cannot drive a constant");
          return;
        }
      std::vector<node> nodes;
      expr_parser p(*this, m, item.rhs, nodes);
      const int root = p.parse();
      if (root < 0 || !check_widths(nodes, root, lhs.size())) continue;
      const vloc at = loc(item.lhs.front().pos);
      for (std::size_t k = 0; k < lhs.size(); ++k) {
        ir::gate gt;
        gt.out = ref_of(lhs[k], at);
        gt.has_delay = true;
        gt.delay = delay;
        gt.reads_begin = static_cast<std::uint32_t>(s.read_pool.size());
        gt.code_begin = static_cast<std::uint32_t>(s.code_pool.size());
        const node& r = nodes[static_cast<std::size_t>(root)];
        if (r.kind == node::leaf) {
          // A plain connection `assign y = a;` becomes a buffer.
          gt.kind = gate_kind::buf;
          s.read_pool.push_back(ref_of(r.leaf_bits[k], loc(r.pos)));
        } else {
          gt.kind = gate_kind::expr;
          std::vector<std::string_view> reads;
          std::vector<std::uint32_t> code;
          emit(nodes, root, k, reads, code);
          for (auto n : reads) s.read_pool.push_back(ref_of(n, loc(item.rhs.pos)));
          s.code_pool.insert(s.code_pool.end(), code.begin(), code.end());
        }
        gt.reads_end = static_cast<std::uint32_t>(s.read_pool.size());
        gt.code_end = static_cast<std::uint32_t>(s.code_pool.size());
        s.gates.push_back(gt);
      }
    }
  }

  // ---- Module instances ----------------------------------------------------

  const vmodule* module_named(std::string_view n) const {
    for (auto& m : modules_)
      if (m.name == n) return &m;
    return nullptr;
  }

  void lower_insts(const vmodule& m, const vast::inst_stmt& st, ir::scope_def& s) {
    const vmodule* sub = module_named(st.module.text);
    if (const udp_def* u = sub ? nullptr : udp_named(st.module.text)) {
      for (auto& in : st.insts) {
        std::vector<std::string_view> term;
        std::vector<vloc> at;
        bool ok = true;
        for (auto& c : in.conns) {
          bits b;
          if (c.port) {
            rep_.error(loc(c.port->pos),
                       "a user-defined primitive is connected by position, not by port name");
            ok = false;
            break;
          }
          if (!conn_bits(m, c.value, b)) {
            ok = false;
            break;
          }
          if (b.size() != 1) {
            rep_.error(loc(c.value.front().pos),
                       fmt::format("a primitive terminal is one bit; this one is {} "
                                   "bits wide",
                                   b.size()));
            ok = false;
            break;
          }
          term.push_back(b[0]);
          at.push_back(loc(c.value.front().pos));
        }
        if (ok) lower_udp(*u, term, at, default_delay(), loc(in.name.pos), s);
      }
      return;
    }
    if (!sub) {
      rep_.error(loc(st.module.pos), fmt::format("unknown module '{}'", st.module.text));
      return;
    }
    for (auto& in : st.insts) {
      ir::inst out;
      out.id = ref_of(intern(in.name.text), loc(in.name.pos));
      out.block = ref_of(sub->name, loc(st.module.pos));
      const bool named = !in.conns.empty() && in.conns.front().port.has_value();
      if (!named && in.conns.size() > sub->port_order.size()) {
        rep_.error(loc(in.conns[sub->port_order.size()].value.front().pos),
                   fmt::format("module '{}' has {} ports; this instance connects {}", sub->name,
                               sub->port_order.size(), in.conns.size()));
        continue;
      }
      for (std::size_t k = 0; k < in.conns.size(); ++k) {
        const auto& c = in.conns[k];
        if (c.port.has_value() != named) {
          const char* at = c.port ? c.port->pos : c.value.front().pos;
          rep_.error(loc(at),
                     "an instance connects its ports either all by name or all by position");
          break;
        }
        std::string_view port = named ? std::string_view(c.port->text) : sub->port_order[k];
        const vloc port_at = loc(named ? c.port->pos : c.value.front().pos);
        auto pit = sub->index.find(port);
        if (pit == sub->index.end() ||
            (named && std::find(sub->port_order.begin(), sub->port_order.end(), port) ==
                          sub->port_order.end())) {
          rep_.error(port_at, fmt::format("module '{}' has no port '{}'", sub->name, port));
          continue;
        }
        if (c.value.empty()) continue;  // .p(): left unconnected
        const vsignal& ps = sub->sigs[pit->second];
        bits pb, vb;
        all_bits(ps, pb);
        if (!conn_bits(m, c.value, vb)) continue;
        if (pb.size() != vb.size()) {
          rep_.error(loc(c.value.front().pos),
                     fmt::format("port '{}' of module '{}' is {} bit{} wide; this connection is {}",
                                 port, sub->name, pb.size(), pb.size() == 1 ? "" : "s", vb.size()));
          continue;
        }
        const vloc val_at = loc(c.value.front().pos);
        for (std::size_t b = 0; b < pb.size(); ++b)
          out.binds.push_back({ref_of(pb[b], port_at), ref_of(vb[b], val_at)});
      }
      s.insts.push_back(std::move(out));
    }
  }

  std::string_view text_;
  std::string clean_;
  const std::string& name_;
  const load_options& opt_;
  file_set rep_;
  struct segment {
    std::size_t begin;  // in the text read
    std::uint32_t file;
    std::size_t file_off;  // where it starts in its file
  };
  std::vector<segment> segs_;                           // in order of `begin`
  std::vector<std::pair<std::size_t, vloc>> includes_;  // each `include: offset, its file name
  std::vector<timescale_mark> scales_;
  std::deque<vmodule> modules_;
  std::deque<std::string> pool_;
  std::deque<udp_def> udps_;
  std::unordered_set<std::string_view> udp_names_;
};

}  // namespace

std::optional<design> load_verilog_text(std::string_view text, const std::string& name,
                                        const load_options& opt, diagnostics& diags) {
  reader r(text, name, opt, diags);
  return r.run();
}

namespace {
class library_impl final : public verilog_library {
 public:
  library_impl(std::string text, const std::string& name, const load_options& opt,
               diagnostics& diags)
      : text_(std::move(text)), name_(name), opt_(opt), reader_(text_, name_, opt_, diags) {}
  void read() {
    if (reader_.read()) modules = reader_.library(module_where);
  }
  std::size_t errors() const override { return reader_.errors(); }

 private:
  std::string text_;
  std::string name_;
  load_options opt_;
  reader reader_;
};
}  // namespace

std::unique_ptr<verilog_library> read_verilog_library(std::string text, const std::string& name,
                                                      const load_options& opt, diagnostics& diags) {
  auto lib = std::make_unique<library_impl>(std::move(text), name, opt, diags);
  lib->read();
  return lib;
}

}  // namespace settle
