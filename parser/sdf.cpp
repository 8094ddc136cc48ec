// The SDF reader: the tree of parser/sdf_grammar.cpp read into sdf_file
// (IEEE 1497-2001, written from memory of the standard).
#include "parser/sdf.hpp"

#include <fmt/format.h>

#include <algorithm>
#include <fstream>
#include <sstream>

#include "parser/sdf_parse.hpp"
#include "sim/model/time_parse.hpp"

namespace settle {
namespace {

using sdfgrammar::node;

std::string upper(std::string_view s) {
  std::string u(s);
  for (auto& c : u) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  return u;
}

/// Constructs of IEEE 1497 that settle reads past: skipped as a whole, with a warning.
bool known_unused(const std::string& k) {
  static const char* const words[] = {
      "TIMINGCHECK",    "TIMINGENV", "LABEL",          "PATHPULSE", "PATHPULSEPERCENT",
      "NETDELAY",       "DEVICE",    "SETUP",          "HOLD",      "SETUPHOLD",
      "RECOVERY",       "REMOVAL",   "RECREM",         "SKEW",      "WIDTH",
      "PERIOD",         "NOCHANGE",  "PATHCONSTRAINT", "SUM",       "DIFF",
      "SKEWCONSTRAINT", "ARRIVAL",   "DEPARTURE",      "SLACK",     "WAVEFORM",
      "INCLUDE"};
  return std::find(std::begin(words), std::end(words), k) != std::end(words);
}

class reader {
 public:
  reader(sdf_file& f, diagnostics& diags) : f_(f), diags_(diags) {}

  bool read() {
    sdfgrammar::node root;
    sdfgrammar::syntax_error err;
    if (!sdfgrammar::parse_tree(f_.text, root, err)) {
      error(err.pos, err.message);
      return false;
    }
    if (head(root) != "DELAYFILE") {
      error(root.kids.empty() ? root.pos : root.kids[0].pos,
            fmt::format("expected 'DELAYFILE', found '{}'", shown_head(root)));
      return false;
    }
    for (std::size_t i = 1; i < root.kids.size() && !failed_; ++i) top_item(root.kids[i]);
    return !failed_;
  }

 private:
  sdf_pos pos_of(const char* p) const {
    sdf_pos r{1, 1};
    const char* b = f_.text.data();
    const char* e = p ? std::min(p, b + f_.text.size()) : b;
    const char* line_start = b;
    for (const char* q = b; q != e; ++q)
      if (*q == '\n') ++r.line, line_start = q + 1;
    r.col = static_cast<std::uint32_t>(e - line_start) + 1;
    return r;
  }
  void report(diagnostic::level lv, const char* p, std::string msg) {
    diags_.add(sdf_diagnostic(f_, lv, pos_of(p), std::move(msg)));
  }
  void error(const char* p, std::string msg) {
    if (failed_) return;
    failed_ = true;
    report(diagnostic::level::error, p, std::move(msg));
  }
  void warn(const char* p, std::string msg) {
    report(diagnostic::level::warning, p, std::move(msg));
  }

  static std::string head(const node& n) {
    if (!n.is_list || n.kids.empty() || n.kids[0].is_list || n.kids[0].quoted) return "";
    return upper(n.kids[0].text);
  }
  static std::string shown_head(const node& n) {
    if (!n.is_list) return n.text;
    if (n.kids.empty()) return "()";
    return n.kids[0].is_list ? "(" : n.kids[0].text;
  }
  /// Requires `n` to be a list with a keyword: false after the error.
  bool keyed(const node& n, const char* what) {
    if (head(n).empty()) {
      error(
          n.is_list && !n.kids.empty() ? n.kids[0].pos : n.pos,
          fmt::format("expected {}, found {}", what,
                      n.is_list ? (n.kids.empty() ? std::string("'()'") : "'" + shown_head(n) + "'")
                                : "'" + n.text + "'"));
      return false;
    }
    return true;
  }
  void skipped(const node& n) {
    warn(n.kids[0].pos,
         fmt::format("SDF construct '{}' is not used by settle: skipped", n.kids[0].text));
  }
  /// The one string or word a header entry holds ("" after an error).
  std::string one_value(const node& n) {
    if (n.kids.size() == 1) return "";
    if (n.kids.size() != 2 || n.kids[1].is_list) {
      error(n.kids.size() > 2 ? n.kids[2].pos : n.kids[1].pos,
            fmt::format("'{}' takes one value", n.kids[0].text));
      return "";
    }
    return n.kids[1].text;
  }

  void top_item(const node& n) {
    if (!keyed(n, "a header entry or 'CELL'")) return;
    const std::string k = head(n);
    if (k == "CELL") return cell(n);
    if (k == "SDFVERSION")
      f_.version = one_value(n);
    else if (k == "DESIGN")
      f_.design = one_value(n);
    else if (k == "DATE")
      f_.date = one_value(n);
    else if (k == "VENDOR")
      f_.vendor = one_value(n);
    else if (k == "PROGRAM")
      f_.program = one_value(n);
    else if (k == "VERSION")
      f_.program_version = one_value(n);
    else if (k == "PROCESS")
      f_.process = one_value(n);
    else if (k == "VOLTAGE" || k == "TEMPERATURE") {
      // operating conditions: informative here
    } else if (k == "DIVIDER")
      divider(n);
    else if (k == "TIMESCALE")
      timescale(n);
    else if (known_unused(k))
      skipped(n);
    else
      error(n.kids[0].pos, fmt::format("unknown SDF construct '{}' in DELAYFILE", n.kids[0].text));
  }

  void divider(const node& n) {
    if (n.kids.size() != 2 || n.kids[1].is_list ||
        (n.kids[1].text != "." && n.kids[1].text != "/")) {
      error(n.kids.size() >= 2 ? n.kids[1].pos : n.pos, "DIVIDER takes '.' or '/'");
      return;
    }
    f_.divider = n.kids[1].text[0];
  }

  void timescale(const node& n) {
    std::string t;
    for (std::size_t i = 1; i < n.kids.size(); ++i) {
      if (n.kids[i].is_list) return error(n.kids[i].pos, "TIMESCALE takes a number and a unit");
      t += n.kids[i].text;
    }
    const char* at = n.kids.size() > 1 ? n.kids[1].pos : n.pos;
    std::size_t i = 0;
    while (i < t.size() && (std::isdigit(static_cast<unsigned char>(t[i])) || t[i] == '.')) ++i;
    std::string num = t.substr(0, i), unit = t.substr(i);
    for (auto& c : unit) c = static_cast<char>(std::tolower(static_cast<unsigned char>(c)));
    // 1, 10 or 100 (a fraction of zeros allowed: 1.0) and one of s ms us ns ps fs (IEEE 1497)
    if (auto dot = num.find('.'); dot != std::string::npos) {
      if (num.find_first_not_of('0', dot + 1) != std::string::npos)
        num.clear();
      else
        num.resize(dot);
    }
    static const std::pair<const char*, int> units[] = {{"fs", 0}, {"ps", 3},  {"ns", 6},
                                                        {"us", 9}, {"ms", 12}, {"s", 15}};
    int e = -1;
    for (auto& [u, x] : units)
      if (unit == u) e = x;
    const int digits = num == "1" ? 0 : num == "10" ? 1 : num == "100" ? 2 : -1;
    if (e < 0 || digits < 0) {
      error(at, fmt::format(
                    "TIMESCALE '{}' is not 1, 10 or 100 followed by s, ms, us, ns, ps or fs", t));
      return;
    }
    f_.timescale_exponent = e + digits;
    f_.timescale = num + unit;
  }

  void cell(const node& n) {
    sdf_cell c;
    c.pos = pos_of(n.pos);
    bool has_type = false, has_inst = false;
    for (std::size_t i = 1; i < n.kids.size() && !failed_; ++i) {
      const node& k = n.kids[i];
      if (!keyed(k, "'CELLTYPE', 'INSTANCE' or a timing specification")) return;
      const std::string w = head(k);
      if (w == "CELLTYPE") {
        if (i != 1) return error(k.kids[0].pos, "CELLTYPE must come first in a CELL");
        c.celltype = one_value(k);
        has_type = true;
      } else if (w == "INSTANCE") {
        if (!has_type || has_inst)
          return error(k.kids[0].pos, "INSTANCE must follow CELLTYPE, once, in a CELL");
        has_inst = true;
        instance(k, c);
      } else if (w == "DELAY") {
        if (!has_inst) return error(k.kids[0].pos, "a CELL needs its INSTANCE before DELAY");
        delay(k, c);
      } else if (known_unused(w)) {
        skipped(k);
      } else {
        return error(k.kids[0].pos,
                     fmt::format("unknown SDF construct '{}' in CELL", k.kids[0].text));
      }
    }
    if (failed_) return;
    if (!has_type) return error(n.pos, "a CELL needs a CELLTYPE");
    if (!has_inst) return error(n.pos, "a CELL needs an INSTANCE");
    f_.cells.push_back(std::move(c));
  }

  void instance(const node& k, sdf_cell& c) {
    if (k.kids.size() == 1) return;  // (INSTANCE): the top
    if (k.kids.size() != 2 || k.kids[1].is_list || k.kids[1].quoted)
      return error(k.kids.size() > 2 ? k.kids[2].pos : k.kids[1].pos,
                   "INSTANCE takes one path (or '*', or nothing for the top)");
    c.instance = k.kids[1].text;
    c.segments = split_sdf_path(c.instance, f_.divider);
    for (auto& s : c.segments) {
      if (s.empty())
        return error(k.kids[1].pos,
                     fmt::format("INSTANCE path '{}' has an empty name", c.instance));
      c.wildcard = c.wildcard || s == "*";
    }
  }

  void delay(const node& d, sdf_cell& c) {
    for (std::size_t i = 1; i < d.kids.size() && !failed_; ++i) {
      const node& k = d.kids[i];
      if (!keyed(k, "'ABSOLUTE' or 'INCREMENT'")) return;
      const std::string w = head(k);
      if (w == "ABSOLUTE" || w == "INCREMENT") {
        for (std::size_t j = 1; j < k.kids.size() && !failed_; ++j)
          def(k.kids[j], w == "INCREMENT", c);
      } else if (known_unused(w)) {
        skipped(k);
      } else {
        error(k.kids[0].pos, fmt::format("unknown SDF construct '{}' in DELAY", k.kids[0].text));
      }
    }
  }

  /// A port, or an edge-qualified port `(posedge a)`.
  bool port_spec(const node& p, std::string& port, std::string* edge) {
    if (!p.is_list && !p.quoted) {
      port = p.text;
      return true;
    }
    static const char* const edges[] = {"posedge", "negedge", "01", "10", "0z", "z1", "1z", "z0"};
    if (edge && p.is_list && p.kids.size() == 2 && !p.kids[0].is_list && !p.kids[1].is_list) {
      std::string e = p.kids[0].text;
      for (auto& ch : e) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
      if (std::find(std::begin(edges), std::end(edges), e) != std::end(edges)) {
        *edge = e;
        port = p.kids[1].text;
        return true;
      }
    }
    error(
        p.is_list && !p.kids.empty() ? p.kids[0].pos : p.pos,
        edge ? "expected a port or an edge-qualified port such as (posedge a)" : "expected a port");
    return false;
  }

  void def(const node& n, bool increment, sdf_cell& c) {
    if (!keyed(n, "'IOPATH', 'COND', 'CONDELSE', 'INTERCONNECT' or 'PORT'")) return;
    sdf_entry e;
    e.increment = increment;
    e.pos = pos_of(n.pos);
    const std::string w = head(n);
    if (w == "COND" || w == "CONDELSE") {
      const node& last = n.kids.back();
      if (n.kids.size() < (w == "COND" ? 3u : 2u) || head(last) != "IOPATH")
        return error(n.kids.size() > 1 ? last.pos : n.kids[0].pos,
                     fmt::format("{} needs its condition and then (IOPATH ...)", w));
      if (w == "CONDELSE") {
        if (n.kids.size() != 2) return error(n.kids[1].pos, "CONDELSE takes only (IOPATH ...)");
        e.condelse = true;
      } else {
        std::size_t first = n.kids[1].quoted ? 2 : 1;  // an optional name string
        if (first >= n.kids.size() - 1)
          return error(last.pos, "COND needs a condition before (IOPATH ...)");
        const char* b = n.kids[first].pos;
        std::string cond(b, last.pos);
        while (!cond.empty() && std::isspace(static_cast<unsigned char>(cond.back())))
          cond.pop_back();
        e.cond = cond;
      }
      return iopath(last, e, c);
    }
    if (w == "IOPATH") return iopath(n, e, c);
    if (w == "INTERCONNECT" || w == "PORT") {
      e.what = w == "PORT" ? sdf_entry::kind::port : sdf_entry::kind::interconnect;
      const std::size_t ports = w == "PORT" ? 1 : 2;
      if (n.kids.size() < ports + 2)
        return error(n.kids[0].pos,
                     fmt::format("{} needs {} and its delay values", w,
                                 ports == 1 ? "a port" : "a driver port, a load port"));
      if (!port_spec(n.kids[1], e.from, nullptr)) return;
      if (ports == 2 && !port_spec(n.kids[2], e.to, nullptr)) return;
      if (!values(n, ports + 1, e)) return;
      if (e.values.size() > 2) {
        warn(n.kids[ports + 3].pos,
             fmt::format("{}: only the first two values (rise, fall) are used", w));
        e.values.resize(2);
      }
      c.entries.push_back(std::move(e));
      return;
    }
    if (known_unused(w)) return skipped(n);
    error(n.kids[0].pos, fmt::format("unknown SDF construct '{}' in {}", n.kids[0].text,
                                     increment ? "INCREMENT" : "ABSOLUTE"));
  }

  void iopath(const node& n, sdf_entry& e, sdf_cell& c) {
    if (n.kids.size() < 4)
      return error(n.kids[0].pos,
                   "IOPATH needs an input port, an output port and its delay values");
    if (!port_spec(n.kids[1], e.from, &e.edge) || !port_spec(n.kids[2], e.to, nullptr)) return;
    // (RETAIN ...) may follow the ports: skipped
    std::size_t first = 3;
    while (first < n.kids.size() && head(n.kids[first]) == "RETAIN") skipped(n.kids[first++]);
    if (!values(n, first, e)) return;
    const auto count = e.values.size();
    if (count == 3) {
      warn(n.kids[first + 2].pos, "IOPATH: the third value (the change to z) is ignored");
    } else if (count == 6 || count == 12) {
      warn(n.kids[first + 2].pos,
           fmt::format("IOPATH: of {} values only the first two (rise, fall) are used", count));
    } else if (count > 3) {
      return error(n.kids[first + 3].pos,
                   fmt::format("IOPATH takes 1, 2, 3, 6 or 12 delay values, not {}", count));
    }
    if (e.values.size() > 2) e.values.resize(2);
    c.entries.push_back(std::move(e));
  }

  /// The delay values n.kids[first..]: each `()`, `(V)` or `(MIN:TYP:MAX)`.
  bool values(const node& n, std::size_t first, sdf_entry& e) {
    if (first >= n.kids.size())
      return error(n.kids[0].pos, fmt::format("{} needs its delay values", n.kids[0].text)), false;
    for (std::size_t i = first; i < n.kids.size(); ++i) {
      const node& v = n.kids[i];
      if (!v.is_list) {
        error(v.pos,
              fmt::format("expected a delay value in parentheses such as (1:2:3), found '{}'",
                          v.text));
        return false;
      }
      auto t = value(v);
      if (failed_) return false;
      e.values.push_back(t);
    }
    return true;
  }

  std::optional<sdf_triple> value(const node& v) {
    if (v.kids.empty()) return std::nullopt;
    if (v.kids[0].is_list) {
      // (rvalue rvalue ...): pulse limits follow the delay
      if (v.kids.size() > 1)
        warn(v.kids[1].pos, "pulse rejection limits are not used by settle: ignored");
      for (auto& k : v.kids)
        if (!k.is_list) return error(k.pos, "expected a delay value in parentheses"), std::nullopt;
      return value(v.kids[0]);
    }
    std::string text;
    for (auto& k : v.kids) {
      if (k.is_list || k.quoted)
        return error(k.pos, "expected a number or MIN:TYP:MAX in a delay value"), std::nullopt;
      text += k.text;
    }
    sdf_triple t;
    t.pos = pos_of(v.pos);
    std::vector<std::string> parts(1);
    for (char ch : text) {
      if (ch == ':')
        parts.emplace_back();
      else
        parts.back() += ch;
    }
    if (parts.size() != 1 && parts.size() != 3)
      return error(v.kids[0].pos, fmt::format("'{}' is not a number or MIN:TYP:MAX", text)),
             std::nullopt;
    std::optional<std::int64_t>* slot[3] = {&t.min, &t.typ, &t.max};
    bool any = false;
    for (std::size_t i = 0; i < parts.size(); ++i) {
      if (parts[i].empty()) continue;
      std::int64_t x = 0;
      std::string why;
      if (!rnumber(parts[i], x, why)) return error(v.kids[0].pos, why), std::nullopt;
      if (parts.size() == 1)
        t.min = t.typ = t.max = x;
      else
        *slot[i] = x;
      any = true;
    }
    if (!any) return error(v.kids[0].pos, "a delay triple needs at least one value"), std::nullopt;
    if (t.min && t.typ && *t.min > *t.typ)
      return error(v.kids[0].pos, fmt::format("'{}': min is larger than typ", text)), std::nullopt;
    if (t.typ && t.max && *t.typ > *t.max)
      return error(v.kids[0].pos, fmt::format("'{}': typ is larger than max", text)), std::nullopt;
    if (t.min && t.max && *t.min > *t.max)
      return error(v.kids[0].pos, fmt::format("'{}': min is larger than max", text)), std::nullopt;
    return t;
  }

  /// An SDF real number ([+-] digits [. digits] [e [+-] digits]) in TIMESCALE
  /// units, to femtoseconds exactly (through time_to_fs).
  bool rnumber(const std::string& s, std::int64_t& out, std::string& why) {
    std::size_t i = 0;
    bool neg = false;
    if (i < s.size() && (s[i] == '+' || s[i] == '-')) neg = s[i++] == '-';
    std::string digits;
    long point = -1;
    for (; i < s.size() && (std::isdigit(static_cast<unsigned char>(s[i])) || s[i] == '.'); ++i) {
      if (s[i] == '.') {
        if (point >= 0) break;
        point = static_cast<long>(digits.size());
      } else {
        digits += s[i];
      }
    }
    long e10 = 0;
    bool ok = !digits.empty();
    if (ok && i < s.size() && (s[i] == 'e' || s[i] == 'E')) {
      ++i;
      bool eneg = false;
      if (i < s.size() && (s[i] == '+' || s[i] == '-')) eneg = s[i++] == '-';
      const std::size_t b = i;
      while (i < s.size() && std::isdigit(static_cast<unsigned char>(s[i])) && i - b < 4)
        e10 = e10 * 10 + (s[i++] - '0');
      ok = i > b;
      if (eneg) e10 = -e10;
    }
    if (!ok || i != s.size()) {
      why = fmt::format("'{}' is not a number", s);
      return false;
    }
    if (point < 0) point = static_cast<long>(digits.size());
    // digits x 10^(point - len) x 10^(e10 + timescale) fs: move the point so
    // that the exponent is a multiple of 3 at or above 0 (a unit time_to_fs names)
    long exp = e10 + f_.timescale_exponent;
    long target = exp >= 0 ? exp - exp % 3 : 0;
    point += exp - target;
    std::string number;
    if (point <= 0)
      number = "0." + std::string(static_cast<std::size_t>(-point), '0') + digits;
    else if (point >= static_cast<long>(digits.size()))
      number = digits + std::string(static_cast<std::size_t>(point) - digits.size(), '0');
    else
      number = digits.substr(0, point) + "." + digits.substr(point);
    time_fs v = 0;
    std::string w;
    if (number.size() > 400 || !time_to_fs(number, static_cast<int>(target), v, w) ||
        v > static_cast<time_fs>(INT64_MAX)) {
      why = w.empty() ? fmt::format("'{}' does not fit in 63 bits of femtoseconds", s)
                      : fmt::format("'{}' in TIMESCALE {}: {}", s, f_.timescale, w);
      return false;
    }
    out = neg ? -static_cast<std::int64_t>(v) : static_cast<std::int64_t>(v);
    return true;
  }

  sdf_file& f_;
  diagnostics& diags_;
  bool failed_ = false;
};

}  // namespace

std::optional<sdf_file> read_sdf_text(std::string text, const std::string& name,
                                      diagnostics& diags) {
  sdf_file f;
  f.path = name;
  f.text = std::move(text);
  reader r(f, diags);
  if (!r.read()) return std::nullopt;
  return f;
}

std::optional<sdf_file> read_sdf(const std::string& path, diagnostics& diags) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream ss;
  if (in) ss << in.rdbuf();
  if (!in) {
    diagnostic d;
    d.file = path;
    d.message = "cannot read the SDF file";
    diags.add(std::move(d));
    return std::nullopt;
  }
  return read_sdf_text(ss.str(), path, diags);
}

std::vector<std::string> split_sdf_path(std::string_view p, char divider) {
  std::vector<std::string> out(1);
  for (std::size_t i = 0; i < p.size(); ++i) {
    if (p[i] == '\\' && i + 1 < p.size())
      out.back() += p[++i];
    else if (p[i] == divider)
      out.emplace_back();
    else
      out.back() += p[i];
  }
  return out;
}

diagnostic sdf_diagnostic(const sdf_file& f, diagnostic::level lv, sdf_pos at, std::string msg) {
  diagnostic d;
  d.severity = lv;
  d.file = f.path;
  d.line = at.line;
  d.col = at.col;
  d.message = std::move(msg);
  const std::string_view t = f.text;
  std::size_t b = 0;
  for (std::uint32_t l = 1; l < at.line && b <= t.size(); ++l) b = t.find('\n', b) + 1;
  if (b <= t.size()) {
    const auto e = t.find('\n', b);
    set_source_line(d, t.substr(b, e == std::string_view::npos ? t.size() - b : e - b));
  }
  return d;
}

}  // namespace settle
