// VCD writer: timescale choice (one per design), identifier codes, same-instant coalescing, scopes
// (IEEE Std 1364-2005 clause 18).
#include "waves/vcd.hpp"

#include <catch2/catch.hpp>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "parser/load.hpp"
#include "sim/model/corner.hpp"
#include "tests/unit/load_design.hpp"

using namespace settle;

namespace {

// A small netlist: top-level nets a, y and an instance "mon" holding mon.n1
// and an alias mon.out of y.
struct fixture {
  netlist n;
  net_id a = 0, y = 0, inner = 0;
  fixture() {
    n.begin();
    n.scopes.push_back(scope{"mon", "ring", 0});
    a = n.add_net("a", 0);
    y = n.add_net("y", 0);
    inner = n.add_net("mon.n1", 1);
    gate_delay d;
    d.rise = d.fall = {5000, 5000, 5000};
    n.add_gate(gate_kind::inv, inner, {a}, {}, d);
    n.add_gate(gate_kind::buf, y, {inner}, {}, d);
    n.aliases.push_back(net_alias{1, "out", y});
    n.finish();
  }
  std::string dump(const std::vector<change>& changes, time_fs end, vcd_options o = {}) {
    o.date = "fixed";
    o.version = "settle test";
    vcd_writer w(n, o);
    std::vector<logic> init(n.net_count(), logic::x);
    init[0] = logic::zero;
    init[1] = logic::one;
    w.on_start(init);
    w.on_changes(changes);
    w.on_finish(end);
    return w.str();
  }
};

std::vector<std::string> lines(const std::string& s) {
  std::vector<std::string> out;
  std::istringstream in(s);
  for (std::string l; std::getline(in, l);) out.push_back(l);
  return out;
}

std::string between(const std::string& s, const std::string& a, const std::string& b) {
  auto i = s.find(a);
  if (i == std::string::npos) return "";
  i += a.size();
  return s.substr(i, s.find(b, i) - i);
}

}  // namespace

TEST_CASE("identifier codes are base-94 over printable ASCII", "[waves][vcd]") {
  // IEEE 1364-2005 18.2.1: an identifier code is one or more printable ASCII
  // characters, '!' (33) to '~' (126).
  CHECK(vcd_code(0) == "!");
  CHECK(vcd_code(93) == "~");
  CHECK(vcd_code(94) == "!!");
  CHECK(vcd_code(94 + 94 * 94 - 1) == "~~");
  CHECK(vcd_code(94 + 94 * 94) == "!!!");
  std::set<std::string> seen;
  for (std::uint64_t i = 0; i < 200000; ++i) {
    const auto c = vcd_code(i);
    for (char ch : c) REQUIRE((ch >= 33 && ch <= 126));
    REQUIRE(seen.insert(c).second);
  }
}

TEST_CASE("the timescale is the coarsest power of ten dividing every time", "[waves][vcd]") {
  // IEEE 1364-2005 18.2.3.5: time_number is 1, 10 or 100; units s ms us ns ps fs.
  // Without vcd_options::timescale the writer picks the unit from the times
  // it wrote; the commands always pass the design's (next test), and this
  // choice remains the fallback when a written time does not fit it.
  fixture f;
  CHECK(between(f.dump({{5000, f.a, logic::one}, {15000, f.a, logic::zero}}, 20000), "$timescale ",
                " $end") == "1 ps");
  CHECK(between(f.dump({{1500, f.a, logic::one}}, 3000), "$timescale ", " $end") == "100 fs");
  CHECK(between(f.dump({{10'000'000, f.a, logic::one}}, 50'000'000), "$timescale ", " $end") ==
        "10 ns");
  CHECK(between(f.dump({{7, f.a, logic::one}}, 10), "$timescale ", " $end") == "1 fs");
  CHECK(between(f.dump({}, 0), "$timescale ", " $end") == "1 fs");
  CHECK(vcd_timescale(15) == "1 s");
  CHECK(vcd_timescale(17) == "100 s");
  // Times are written in the chosen unit: 5ps and 15ps at 1 ps are #5 and #15.
  const auto v = f.dump({{5000, f.a, logic::one}, {15000, f.a, logic::zero}}, 20000);
  CHECK(v.find("\n#5\n1!\n#15\n0!\n#20\n") != std::string::npos);
}

TEST_CASE("same-instant changes keep only the final value", "[waves][vcd]") {
  fixture f;
  // a: 0 at time 0 (folds into $dumpvars), then a zero-width pulse at 10ps
  // (1 then 0 again: nothing written), then 1 at 20ps written once.
  const auto v = f.dump({{0, f.a, logic::one},
                         {0, f.a, logic::zero},
                         {10000, f.a, logic::one},
                         {10000, f.a, logic::zero},
                         {20000, f.a, logic::x},
                         {20000, f.a, logic::one},
                         {20000, f.y, logic::zero}},
                        30000);
  const auto dumpvars = between(v, "$dumpvars\n", "$end");
  CHECK(dumpvars == "0!\nx\"\nx#\n");
  const auto body = v.substr(v.find("$dumpvars"));
  // Times 20ps and 30ps give a 10 ps timescale: #2 and #3; nothing at #1.
  CHECK(between(v, "$timescale ", " $end") == "10 ps");
  CHECK(body.find("#1\n") == std::string::npos);
  CHECK(body.find("#2\n1!\n0\"\n#3\n") != std::string::npos);
  // Strictly increasing times (IEEE 1364-2005 18.2: the section is time ordered).
  long last = -1;
  for (const auto& l : lines(body))
    if (!l.empty() && l[0] == '#') {
      const long t = std::stol(l.substr(1));
      CHECK(t > last);
      last = t;
    }
}

TEST_CASE("scopes follow the instance hierarchy and aliases share codes", "[waves][vcd]") {
  fixture f;
  const auto v = f.dump({{5000, f.a, logic::one}}, 10000, vcd_options{"ring.top", "", "", {}});
  // The top scope name is sanitised ('.' -> '_') and the change noted in $comment.
  CHECK(v.find("$scope module ring_top $end\n$var wire 1 ! a $end\n$var wire 1 \" y $end\n"
               "$scope module mon $end\n$var wire 1 # n1 $end\n$var wire 1 \" out $end\n"
               "$upscope $end\n$upscope $end\n$enddefinitions $end\n") != std::string::npos);
  CHECK(v.find("$comment\n") != std::string::npos);
  CHECK(v.find("ring_top = ring.top") != std::string::npos);
  int depth = 0;
  for (const auto& l : lines(v)) {
    if (l.rfind("$scope", 0) == 0) ++depth;
    if (l.rfind("$upscope", 0) == 0) --depth;
    CHECK(depth >= 0);
  }
  CHECK(depth == 0);
}

TEST_CASE("only the selected nets are dumped, constants never", "[waves][vcd]") {
  fixture f;
  const auto v = f.dump({{5000, f.a, logic::one}, {5000, f.y, logic::one}}, 10000,
                        vcd_options{"t", "", "", {f.y}});
  CHECK(v.find(" a $end") == std::string::npos);
  CHECK(v.find("$var wire 1 ! y $end") != std::string::npos);
  CHECK(v.find("$const") == std::string::npos);
  CHECK(v.find("#5\n1!\n") != std::string::npos);
}

TEST_CASE("long runs spill to disk and keep every instant", "[waves][vcd]") {
  fixture f;
  // 4 million instants of about 10 bytes each exceed the 32 MiB memory chunk.
  const std::uint64_t instants = 4'000'000;
  std::vector<change> c;
  c.reserve(instants);
  for (std::uint64_t i = 1; i <= instants; ++i)
    c.push_back({i * 1000, f.a, i % 2 ? logic::one : logic::zero});
  const auto v = f.dump(c, (instants + 1) * 1000);
  CHECK(between(v, "$timescale ", " $end") == "1 ps");
  std::uint64_t times = 0, last = 0;
  bool increasing = true;
  for (std::size_t p = v.find("$dumpvars"); (p = v.find("\n#", p)) != std::string::npos; ++p) {
    const auto t = std::stoull(v.substr(p + 2, 24));
    increasing = increasing && t > last;
    last = t, ++times;
  }
  CHECK(increasing);
  CHECK(times == instants + 1);  // every instant and the end
  CHECK(last == instants + 1);
}

TEST_CASE("names that meet after sanitising stay distinct", "[waves][vcd]") {
  // ISCAS nets a.b, a_b and a_b_2 (the ISCAS format allows dots in names): a reference name in
  // a $var is one identifier without '.', and two variables of one scope need two names
  // (IEEE 1364-2005, 18.2.3.8 and 18.2.1).
  netlist n;
  n.begin();
  const net_id dotted = n.add_net("a.b", 0);
  const net_id plain = n.add_net("a_b", 0);
  const net_id suffixed = n.add_net("a_b_2", 0);
  const net_id q = n.add_net("q", 0);
  gate_delay d;
  d.rise = d.fall = {5000, 5000, 5000};
  n.add_gate(gate_kind::and_, q, {dotted, plain, suffixed}, {}, d);
  n.finish();
  vcd_options o;
  o.date = "fixed";
  vcd_writer w(n, o);
  std::vector<logic> init(n.net_count(), logic::x);
  w.on_start(init);
  w.on_finish(10000);
  std::multiset<std::string> names;
  for (const auto& l : lines(w.str()))
    if (l.rfind("$var ", 0) == 0) {
      std::istringstream in(l);
      std::string var, type, size, code, name;
      in >> var >> type >> size >> code >> name;
      CHECK(name.find('.') == std::string::npos);
      names.insert(name);
    }
  CHECK(names.size() == 4);
  for (const auto& name : names) CHECK(names.count(name) == 1);
  CHECK(names.count("a_b") == 1);
  CHECK(names.count("a_b_2") == 1);
  CHECK(names.count("a_b_3") == 1);  // a.b: a_b and a_b_2 are taken as written
}

namespace {

settle::design load_text(const std::string& text) {
  return settle::testing::load_text(text, "ts.settle");
}

// The $timescale line of a run of `d` at corner `name` with the design's timescale.
std::string run_timescale(const settle::design& d, const std::string& name) {
  std::string err;
  const auto c = parse_corner(name, &err);
  REQUIRE(c);
  delay_table t;
  fill_delays(d.nets, *c, t);
  vcd_options o;
  o.date = "fixed";
  o.timescale = design_timescale(d);
  vcd_writer w(d.nets, o);
  run_stimulus(d, t, run_options{}, &w);
  const auto v = w.str();
  CHECK_FALSE(w.timescale_refined());
  return between(v, "$timescale ", " $end");
}

}  // namespace

TEST_CASE("the timescale is the design's, the same under every corner", "[waves][vcd]") {
  // IEEE 1364-2005 18.2.3.5: the timescale is 1, 10 or 100 of s, ms, us, ns,
  // ps or fs; every #time is a whole multiple of it.
  // Fixed delays of 20 ps and 30 ps, inputs on whole nanoseconds: 10 ps
  // divides every time any corner can produce (typ, min and max coincide).
  const auto fixed = load_text(
      "input a\noutput y\nwire m\nm = not(a) delay 20ps\ny = not(m) delay 30ps\n"
      "stimulus {\n at 0ns a = 0\n settle\n after 1ns a = 1\n settle\n}\n");
  CHECK(design_timescale(fixed) == 4);  // 10^4 fs = 10 ps
  for (const char* c : {"min", "typ", "max", "random:1", "gauss:3#2", "typ@2"})
    CHECK(run_timescale(fixed, c) == "10 ps");
  // A true range (20..30 ps): random corners draw any whole fs in it, so only
  // 1 fs represents every corner, and every corner uses it, typ included.
  const auto ranged = load_text(
      "input a\noutput y\nwire m\nm = not(a) delay 20ps..30ps\ny = not(m) delay 30ps\n"
      "stimulus {\n at 0ns a = 0\n settle\n after 1ns a = 1\n settle\n}\n");
  CHECK(design_timescale(ranged) == 0);
  for (const char* c : {"min", "typ", "max", "random:1"}) CHECK(run_timescale(ranged, c) == "1 fs");
  // Stimulus times count: an input at 1.5 ps needs 100 fs.
  const auto stim = load_text(
      "input a\noutput y\ny = not(a) delay 20ps\nstimulus {\n at 0ns a = 0\n settle\n after 1500fs "
      "a = 1\n settle\n}\n");
  CHECK(design_timescale(stim) == 2);
  CHECK(run_timescale(stim, "max") == "100 fs");
  // So do clock periods and high times: a 10 ns clock high for 2.5 ns, 100 ps.
  const auto clk = load_text(
      "input ck\noutput y\ny = not(ck) delay 1ns\nstimulus {\n clock ck period 10ns high 2500ps "
      "cycles 2\n run 40ns\n}\n");
  CHECK(design_timescale(clk) == 5);
  CHECK(run_timescale(clk, "min") == "100 ps");
  // A time that does not fit the given unit refines it rather than being rounded.
  {
    fixture f;
    vcd_options o;
    o.timescale = 4;  // 10 ps
    o.date = "fixed";
    vcd_writer w(f.n, o);
    std::vector<logic> init(f.n.net_count(), logic::x);
    w.on_start(init);
    const std::vector<change> c{{20000, f.a, logic::one}, {25500, f.a, logic::zero}};
    w.on_changes(c);
    w.on_finish(30000);
    const auto v = w.str();
    CHECK(w.timescale_refined());
    CHECK(between(v, "$timescale ", " $end") == "100 fs");
    CHECK(v.find("\n#255\n") != std::string::npos);
  }
  // A given step limit joins them: --horizon 1234fs needs 1 fs.
  CHECK(design_timescale(fixed, 1234) == 0);
  CHECK(design_timescale(fixed, 5'000'000) == 4);
}
