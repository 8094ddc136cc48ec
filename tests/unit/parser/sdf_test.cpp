// The SDF reader: triples, TIMESCALE conversion to femtoseconds, the value
// counts of IOPATH, COND and edge qualifiers, and skipped constructs, as
// IEEE 1497-2001 writes them (from memory of the standard).
#include "parser/sdf.hpp"

#include <catch2/catch.hpp>
#include <string>

using namespace settle;

namespace {

sdf_file read(const std::string& text, diagnostics& diags) {
  auto f = read_sdf_text(text, "t.sdf", diags);
  std::string all;
  for (auto& x : diags.items) all += format_diagnostic(x);
  INFO(all);
  REQUIRE(f);
  return std::move(*f);
}

std::string wrap(const std::string& scale, const std::string& entries) {
  return "(DELAYFILE (SDFVERSION \"3.0\") (TIMESCALE " + scale +
         ")\n (CELL (CELLTYPE \"inv\") (INSTANCE a/b)\n  (DELAY (ABSOLUTE " + entries + "))))\n";
}

}  // namespace

TEST_CASE("SDF triples in a 100ps TIMESCALE are exact femtoseconds", "[parser]") {
  diagnostics diags;
  auto f = read(wrap("100ps", "(IOPATH a y (1.5:2:2.25) (0.01))"), diags);
  REQUIRE(f.cells.size() == 1);
  const auto& e = f.cells[0].entries.at(0);
  REQUIRE(e.values.size() == 2);
  // 1.5 x 100ps = 150ps = 150000 fs (IEEE 1497: values are in TIMESCALE units)
  CHECK(*e.values[0]->min == 150000);
  CHECK(*e.values[0]->typ == 200000);
  CHECK(*e.values[0]->max == 225000);
  CHECK(*e.values[1]->min == 1000);
  CHECK(f.cells[0].instance == "a/b");
  CHECK(diags.items.empty());
}

TEST_CASE("SDF header, DIVIDER and instance paths", "[parser]") {
  diagnostics diags;
  auto f = read(
      "(DELAYFILE (SDFVERSION \"3.0\") (DESIGN \"ring\") (DIVIDER /) (TIMESCALE 1 ns)\n"
      " (CELL (CELLTYPE \"inv\") (INSTANCE top/u\\/1/st2) (DELAY (ABSOLUTE (IOPATH a y (1)))))\n"
      " (CELL (CELLTYPE \"inv\") (INSTANCE *) (DELAY (INCREMENT (IOPATH a y (-0.5)))))\n"
      " (CELL (CELLTYPE \"top\") (INSTANCE) (DELAY (ABSOLUTE (INTERCONNECT u/y v/a (2:3:4))))))",
      diags);
  CHECK(f.design == "ring");
  CHECK(f.divider == '/');
  CHECK(f.timescale_exponent == 6);
  REQUIRE(f.cells.size() == 3);
  // a backslash escapes the divider (IEEE 1497 escaped identifiers)
  CHECK(f.cells[0].segments == std::vector<std::string>{"top", "u/1", "st2"});
  CHECK(f.cells[1].wildcard);
  CHECK(f.cells[1].entries[0].increment);
  CHECK(*f.cells[1].entries[0].values[0]->typ == -500000);
  CHECK(f.cells[2].segments.empty());
  CHECK(f.cells[2].entries[0].what == sdf_entry::kind::interconnect);
  CHECK(f.cells[2].entries[0].from == "u/y");
  CHECK(f.cells[2].entries[0].to == "v/a");
}

TEST_CASE("SDF COND, edges, empty values and the third value", "[parser]") {
  diagnostics diags;
  auto f = read(wrap("1ns",
                     "(COND a==1'b1 (IOPATH (posedge b) y () (2:3:4) (5)))"
                     " (CONDELSE (IOPATH b y (::7)))"),
                diags);
  const auto& e = f.cells[0].entries;
  REQUIRE(e.size() == 2);
  CHECK(e[0].cond == "a==1'b1");
  CHECK(e[0].edge == "posedge");
  CHECK(e[0].from == "b");
  REQUIRE(e[0].values.size() == 2);  // the third, to z, is dropped with a warning
  CHECK(!e[0].values[0]);
  CHECK(*e[0].values[1]->max == 4000000);
  CHECK(e[1].condelse);
  CHECK(!e[1].values[0]->min);
  CHECK(*e[1].values[0]->max == 7000000);
  REQUIRE(diags.items.size() == 1);
  CHECK(diags.items[0].severity == diagnostic::level::warning);
  CHECK(diags.items[0].message.find("third value") != std::string::npos);
}

TEST_CASE("SDF constructs settle does not use are skipped with a warning", "[parser]") {
  diagnostics diags;
  auto f = read(
      "(DELAYFILE (TIMESCALE 1ps)\n"
      " (CELL (CELLTYPE \"inv\") (INSTANCE u)\n"
      "  (DELAY (PATHPULSE a y (1) (2)) (ABSOLUTE (IOPATH a y (1e1))))\n"
      "  (TIMINGCHECK (SETUP d (posedge ck) (3)))))",
      diags);
  CHECK(*f.cells[0].entries.at(0).values[0]->typ == 10000);  // 1e1 ps
  REQUIRE(diags.items.size() == 2);
  CHECK(diags.items[0].message.find("'PATHPULSE'") != std::string::npos);
  CHECK(diags.items[0].line == 3);
  CHECK(diags.items[0].col == 11);
  CHECK(diags.items[1].message.find("'TIMINGCHECK'") != std::string::npos);
}

TEST_CASE("SDF errors carry line and column", "[parser]") {
  struct bad {
    const char* text;
    std::uint32_t line, col;
    const char* words;
  };
  const bad cases[] = {
      {"(DELAYFILE\n (CELL (CELLTYPE \"x\")\n", 2, 2, "not closed"},
      {"(DELAYFILE (TIMESCALE 1ps)\n (CELL (CELLTYPE \"x\") (INSTANCE u) (DELAY (ABSOLUTE "
       "(IOPATH a y (0.0001))))))",
       2, 66, "whole number of femtoseconds"},
      {"(DELAYFILE (TIMESCALE 1ns) (FOO))", 1, 29, "unknown SDF construct 'FOO'"},
      {"(DELAYFILE (CELL (CELLTYPE \"x\") (INSTANCE u) (DELAY (ABSOLUTE (IOPATH a y (1..2))))))", 1,
       76, "not a number"},
  };
  for (const auto& c : cases) {
    diagnostics diags;
    INFO(c.text);
    CHECK(!read_sdf_text(c.text, "t.sdf", diags));
    REQUIRE(diags.has_errors());
    CHECK(diags.items.back().line == c.line);
    CHECK(diags.items.back().col == c.col);
    CHECK(diags.items.back().message.find(c.words) != std::string::npos);
  }
}
