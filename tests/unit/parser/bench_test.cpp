// The .bench importer against the published ISCAS figures, its flip-flop expansion and its errors.
#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "parser/load.hpp"
#include "sim/kernel/run.hpp"

using namespace settle;

namespace {

const std::string iscas_dir = std::string(SETTLE_SOURCE_DIR) + "/tests/data/iscas";

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// One row of stats.csv: the counts of a circuit's lines.
struct stats_row {
  std::string name;
  std::uint32_t inputs, outputs, dffs, gates, inverters, buffs;
};

std::vector<stats_row> read_stats() {
  std::ifstream in(iscas_dir + "/stats.csv");
  std::string line;
  std::getline(in, line);
  REQUIRE(line.rfind("name,inputs,outputs,dffs,gates,inverters,buffs", 0) == 0);
  std::vector<stats_row> rows;
  while (std::getline(in, line)) {
    if (line.empty()) continue;
    std::vector<std::string> cell;
    std::stringstream s(line);
    for (std::string c; std::getline(s, c, ',');) cell.push_back(c);
    REQUIRE(cell.size() >= 7);
    auto u = [&](int i) { return static_cast<std::uint32_t>(std::stoul(cell[i])); };
    rows.push_back({cell[0], u(1), u(2), u(3), u(4), u(5), u(6)});
  }
  return rows;
}

std::optional<design> load(const std::string& text, diagnostics& diags, load_options opt = {}) {
  return load_bench_text(text, "t.bench", opt, diags);
}

// The only error of a text that must fail, as "line:col: message".
std::string only_error(const std::string& text, load_options opt = {}) {
  diagnostics diags;
  auto d = load(text, diags, opt);
  REQUIRE_FALSE(d);
  REQUIRE(diags.items.size() >= 1);
  const auto& e = diags.items.front();
  CHECK(e.severity == diagnostic::level::error);
  CHECK(e.file == "t.bench");
  return std::to_string(e.line) + ":" + std::to_string(e.col) + ": " + e.message;
}

// Settles the NAND network by repeatedly firing one unstable gate at a time
// (a zero-delay reference, independent of the kernel); values are 0/1 only.
void settle_nands(const netlist& n, std::vector<int>& v) {
  for (int round = 0; round < 100; ++round) {
    bool changed = false;
    for (gate_id g = 0; g < n.gate_count(); ++g) {
      REQUIRE(n.kind[g] == gate_kind::nand);
      int all = 1;
      for (auto i = n.fanin_begin[g]; i < n.fanin_begin[g + 1]; ++i) all &= v[n.fanin[i]];
      if (v[n.gate_out[g]] != !all) v[n.gate_out[g]] = !all, changed = true;
    }
    if (!changed) return;
  }
  FAIL("the flip-flop did not settle");
}

}  // namespace

// Counts per file against stats.csv, whose columns follow the ISCAS-85 and
// ISCAS-89 benchmark descriptions: Brglez and Fujiwara 1985 (ISCAS-85),
// Brglez, Bryan and Kozminski 1989 (ISCAS-89).
TEST_CASE("every shared .bench file loads with the published line counts", "[parser][bench]") {
  // The project carries its copy of the benchmarks: a missing file is a failure, never a skip.
  REQUIRE(std::filesystem::exists(iscas_dir + "/stats.csv"));
  auto rows = read_stats();
  CHECK(rows.size() >= 30);
  // Every shared file has its row, so none escapes the check.
  std::size_t files = 0;
  for (const auto& e : std::filesystem::directory_iterator(iscas_dir)) {
    if (e.path().extension() != ".bench") continue;
    ++files;
    const auto stem = e.path().stem().string();
    CHECK(
        std::any_of(rows.begin(), rows.end(), [&](const stats_row& r) { return r.name == stem; }));
  }
  CHECK(files == rows.size());
  for (const auto& row : rows) {
    INFO(row.name);
    const auto path = iscas_dir + "/" + row.name + ".bench";
    diagnostics diags;
    auto d = load_bench_text(slurp(path), path, load_options{}, diags);
    REQUIRE(d);
    CHECK(diags.error_count() == 0);
    const auto& s = d->source;
    CHECK(s.format == "bench");
    CHECK(s.inputs == row.inputs);
    CHECK(s.outputs == row.outputs);
    CHECK(s.dffs == row.dffs);
    CHECK(s.gates == row.gates);
    CHECK(s.inverters == row.inverters);
    CHECK(s.buffers == row.buffs);
    // Six NAND gates per flip-flop (METHODS.md section 7), one gate per other line.
    CHECK(d->nets.gate_count() == row.gates + row.inverters + row.buffs + 6 * row.dffs);
    // The generated clock is one more input when there is a flip-flop, and a
    // net read but defined nowhere (s400 has one) floats as one more.
    std::size_t floating = 0;
    for (const auto& w : diags.items)
      floating += w.message.find("is never driven") != std::string::npos;
    CHECK(floating == (row.name == "s400" ? 1 : 0));
    CHECK(d->nets.inputs.size() == row.inputs + floating + (row.dffs > 0 ? 1 : 0));
    CHECK(d->nets.outputs.size() == row.outputs);
    // Every net other than the constants has exactly one driver (issue 2).
    std::size_t inputs = 0;
    for (net_id i = 2; i < d->nets.net_count(); ++i) inputs += d->nets.driver[i] == no_id;
    CHECK(inputs == d->nets.inputs.size());
    CHECK(d->nets.scopes.size() == 1 + row.dffs);
  }
}

TEST_CASE("bench syntax: case, comments, BUF, forward use, no final newline", "[parser][bench]") {
  diagnostics diags;
  auto d = load(
      "# demo: a panel-switch debouncer output stage\n"
      "INPUT(press)  # the contact\n"
      "\n"
      "\tINPUT( hold )\n"
      "OUTPUT(lamp)\n"
      "OUTPUT(press)\n"
      "lamp = nand(press_n , hold_b)\n"
      "press_n = Not(press)\r\n"
      "hold_b = BUF(hold)\n"
      "x = xnor(press, hold, lamp)",
      diags);
  REQUIRE(d);
  CHECK(diags.items.empty());
  const auto& n = d->nets;
  CHECK(n.gate_count() == 4);
  CHECK(n.inputs.size() == 2);
  REQUIRE(n.outputs.size() == 2);
  CHECK(n.outputs[1] == n.find("press"));  // an OUTPUT may be an INPUT
  const auto lamp = n.driver[n.find("lamp")];
  CHECK(n.kind[lamp] == gate_kind::nand);
  CHECK(n.gate_loc[lamp].line == 7);
  CHECK(n.gate_loc[lamp].col == 1);
  CHECK(n.kind[n.driver[n.find("press_n")]] == gate_kind::inv);
  CHECK(n.kind[n.driver[n.find("hold_b")]] == gate_kind::buf);
  const auto x = n.driver[n.find("x")];
  CHECK(n.kind[x] == gate_kind::xnor);
  CHECK(n.fanin_begin[x + 1] - n.fanin_begin[x] == 3);
  CHECK(n.delay[x].rise == load_options{}.bench_delay);
  CHECK(n.delay[x].fall == load_options{}.bench_delay);
  CHECK_FALSE(n.delay[x].transport);
  CHECK(d->source.inputs == 2);
  CHECK(d->source.outputs == 2);
  CHECK(d->source.gates == 2);
  CHECK(d->source.inverters == 1);
  CHECK(d->source.buffers == 1);
  CHECK(d->source.dffs == 0);
}

TEST_CASE("the --delay range reaches every imported gate", "[parser][bench]") {
  load_options opt;
  opt.bench_delay = delay_range{10000, 15000, 20000};
  diagnostics diags;
  auto d = load("INPUT(a)\nOUTPUT(q)\nq = DFF(a)\n", diags, opt);
  REQUIRE(d);
  for (gate_id g = 0; g < d->nets.gate_count(); ++g)
    CHECK(d->nets.delay[g].rise == opt.bench_delay);
}

// The flip-flop's behaviour as METHODS.md section 7 states it for the six-NAND
// positive-edge D flip-flop: with CLK = 0, n2 = n3 = 1, n4 = not D, n1 = D;
// on CLK rising, Q = D; while CLK = 1 changes on D are ignored.
TEST_CASE("DFF becomes a six-NAND edge-triggered flip-flop starting in reset", "[parser][bench]") {
  diagnostics diags;
  auto d = load("INPUT(fill)\nOUTPUT(full)\nfull = DFF(fill)\n", diags);
  REQUIRE(d);
  const auto& n = d->nets;
  REQUIRE(n.gate_count() == 6);
  const auto ck = n.find("CK"), dn = n.find("fill"), q = n.find("full");
  REQUIRE(ck != no_id);
  CHECK(n.inputs.back() == ck);
  for (const char* local : {"n1", "n2", "n3", "n4", "qb"}) {
    const auto id = n.find(std::string("full.") + local);
    REQUIRE(id != no_id);
    CHECK(n.net_scope[id] == 1);
  }
  REQUIRE(n.scopes.size() == 2);
  CHECK(n.scopes[1].name == "full");
  CHECK(n.scopes[1].parent == 0);
  CHECK(n.find("full.q") == q);
  CHECK(n.find("full.d") == dn);
  CHECK(n.init[q] == logic::zero);
  CHECK(n.init[n.find("full.qb")] == logic::one);

  std::vector<int> v(n.net_count(), 0);
  v[net_id(netlist::const1)] = 1;
  for (net_id i = 2; i < n.net_count(); ++i) {
    if (n.driver[i] == no_id) continue;
    REQUIRE(n.init[i] != logic::x);  // a known start state
    v[i] = n.init[i] == logic::one;
  }
  auto in = [&](const char* local) { return v[n.find(std::string("full.") + local)]; };
  // Stable at rest: CK = 0, D = 0 changes nothing.
  const auto before = v;
  settle_nands(n, v);
  CHECK(v == before);
  for (int cycle = 0; cycle < 2; ++cycle) {
    for (int dv : {1, 0, 1, 1, 0}) {
      v[ck] = 0, v[dn] = dv;
      settle_nands(n, v);
      const int q_before = v[q];
      CHECK(in("n2") == 1);
      CHECK(in("n3") == 1);
      CHECK(in("n4") == !dv);
      CHECK(in("n1") == dv);
      CHECK(v[q] == q_before);  // no change while the clock is low
      v[ck] = 1;
      settle_nands(n, v);
      CHECK(v[q] == dv);
      CHECK(in("qb") == !dv);
      v[dn] = !dv;  // ignored while CK = 1
      settle_nands(n, v);
      CHECK(v[q] == dv);
    }
  }
}

TEST_CASE("a file net named CK moves the generated clock to CK_ with a warning",
          "[parser][bench]") {
  diagnostics diags;
  auto d = load("INPUT(CK)\nINPUT(CK_)\nOUTPUT(q)\nq = DFF(t)\nt = AND(CK, CK_)\n", diags);
  REQUIRE(d);
  REQUIRE(diags.items.size() == 1);
  CHECK(diags.items[0].severity == diagnostic::level::warning);
  CHECK(diags.items[0].message.find("'CK__'") != std::string::npos);
  CHECK(d->nets.inputs.back() == d->nets.find("CK__"));
  CHECK(d->nets.inputs.size() == 3);
}

// Diagnostics are a contract: whole messages with line and column.
TEST_CASE("bench errors carry line and column", "[parser][bench]") {
  CHECK(only_error("INPUT(a)\nOUTPUT(y)\ny = MUX(a, a)\n") ==
        "3:5: unknown gate kind 'MUX' (AND OR NAND NOR NOT BUFF BUF XOR XNOR DFF)");
  CHECK(only_error("INPUT(a)\nOUTPUT(z)\ny = NOT(a)\n") ==
        "2:8: net 'z' is never driven (no INPUT or gate line defines it)");
  CHECK(only_error("INPUT(a)\nOUTPUT(y)\ny = NOT(a)\n\ny = BUFF(a)\n") ==
        "5:1: net 'y' already has a driver (line 3)");
  CHECK(only_error("INPUT(a)\nINPUT(a)\n") == "2:7: net 'a' already has a driver (line 1)");
  CHECK(only_error("INPUT(a)\na = NOT(a)\n") == "2:1: net 'a' already has a driver (line 1)");
  CHECK(only_error("INPUT(a\n") == "1:8: expected ')', found the end of the line");
  CHECK(only_error("INPUT(a)\ny = AND(a,)\n") == "2:11: expected a net name, found ')'");
  CHECK(only_error("INPUT(a)\ny AND(a)\n") == "2:3: expected '=', found 'A'");
  CHECK(only_error("INPUT(a)\ny = AND a\n") == "2:9: expected '(', found 'a'");
  CHECK(only_error("INPUT(a)\ny = AND(a) extra\n") ==
        "2:12: expected the end of the line, found 'e'");
  CHECK(only_error("GATE(a)\n") == "1:1: expected INPUT or OUTPUT before '(', found 'GATE'");
  CHECK(only_error("INPUT(a)\nINPUT(b)\ny = NOT(a, b)\n") ==
        "3:12: NOT takes exactly one input, found 2");
  CHECK(only_error("INPUT(a)\ny = = AND(a)\n") == "2:5: expected a gate kind, found '='");
  // The offending line travels with the diagnostic for the caret display.
  diagnostics diags;
  CHECK_FALSE(load("INPUT(a)\r\ny = FOO(a)\r\n", diags));
  REQUIRE(diags.items.size() == 1);
  CHECK(diags.items[0].source_line == "y = FOO(a)");
}

TEST_CASE("several errors are reported in one run", "[parser][bench]") {
  diagnostics diags;
  CHECK_FALSE(load("INPUT(a)\ny = FOO(a)\nz = AND(a\nw = AND(a, u)\n", diags));
  // FOO and the missing ')' are syntax errors; nets are checked only once the
  // whole file has parsed.
  CHECK(diags.error_count() == 2);
  diagnostics more;
  CHECK_FALSE(load("INPUT(a)\nOUTPUT(p)\nOUTPUT(r)\nw = NOT(a)\nw = BUFF(a)\n", more));
  CHECK(more.error_count() == 3);  // w twice driven, p and r never driven
}

TEST_CASE("a net read but defined nowhere floats as an extra input, with a warning",
          "[parser][bench]") {
  diagnostics diags;
  auto d = load("INPUT(a)\nOUTPUT(y)\n  y = AND(a, b)\nz = OR(b, a)\n", diags);
  REQUIRE(d);
  REQUIRE(diags.items.size() == 1);  // once, at the first use
  const auto& w = diags.items[0];
  CHECK(w.severity == diagnostic::level::warning);
  CHECK(w.line == 3);
  CHECK(w.col == 14);
  CHECK(
      w.message ==
      "net 'b' is never driven (no INPUT or gate line defines it); it becomes an extra input that "
      "stays x unless the stimulus drives it");
  const auto b = d->nets.find("b");
  REQUIRE(b != no_id);
  CHECK(d->nets.driver[b] == no_id);
  CHECK(d->nets.inputs.back() == b);
  CHECK(d->nets.init[b] == logic::x);
  CHECK(d->source.inputs == 1);  // the counts stay those of the file's lines
}

// The edge-triggered primitive and the six-NAND flip-flop (METHODS.md §7) are
// two models of the same positive-edge D flip-flop: clocked with a period long
// enough to settle, s27 (Brglez, Bryan and Kozminski 1989) gives the same
// outputs and flip-flop states cycle by cycle under both.
TEST_CASE("primitive flip-flops clock like the six-NAND ones on s27", "[parser][bench]") {
  const auto path = iscas_dir + "/s27.bench";
  REQUIRE(std::filesystem::exists(path));
  auto build = [&](const char* mode) {
    load_options opt;
    opt.dff = mode;
    diagnostics diags;
    auto d = load_design(path, opt, diags);
    REQUIRE(d);
    for (const char* q : {"G5", "G6", "G7"}) d->stim.watch.push_back(d->nets.find(q));
    const net_id ck = d->nets.find("CK");
    std::uint64_t lfsr = 0xace1;
    for (int cycle = 0; cycle < 40; ++cycle) {
      step_spec low, high;
      stim_action a;
      a.what = stim_action::kind::after;
      a.time = cycle == 0 ? 0 : 2000000;  // 2ns after the previous step
      a.assigns.push_back({ck, logic::zero});
      for (const net_id in : d->nets.inputs) {
        if (in == ck) continue;
        lfsr = lfsr * 6364136223846793005ull + 1442695040888963407ull;
        a.assigns.push_back({in, from_bool(lfsr >> 63)});
      }
      low.actions.push_back(a);
      d->stim.steps.push_back(low);
      stim_action rise;
      rise.what = stim_action::kind::after;
      rise.time = 2000000;
      rise.assigns.push_back({ck, logic::one});
      high.actions.push_back(rise);
      d->stim.steps.push_back(high);
    }
    return std::move(*d);
  };
  const design gates = build("gates"), primitive = build("primitive");
  CHECK(std::count(primitive.nets.kind.begin(), primitive.nets.kind.end(), gate_kind::dff) == 3);
  delay_table tg, tp;
  fill_delays(gates.nets, corner{}, tg);
  fill_delays(primitive.nets, corner{}, tp);
  const auto rg = run_stimulus(gates, tg, {}), rp = run_stimulus(primitive, tp, {});
  REQUIRE(rg.steps.size() == rp.steps.size());
  int changes = 0;
  for (std::size_t i = 0; i < rg.steps.size(); ++i) {
    INFO("step " << i + 1);
    CHECK(rg.steps[i].status == step_status::settled);
    CHECK(rp.steps[i].status == step_status::settled);
    CHECK(rg.steps[i].values == rp.steps[i].values);
    for (auto t : rp.steps[i].transitions) changes += static_cast<int>(t);
  }
  CHECK(changes > 10);  // the flip-flops really moved
}
