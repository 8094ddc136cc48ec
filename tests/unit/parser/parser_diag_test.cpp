// Parser diagnostics as a contract: whole messages with source line and caret, recovery, warnings,
// --stim.
#include <catch2/catch.hpp>
#include <cstdio>
#include <filesystem>
#include <fstream>

#include "parser/load.hpp"

using namespace settle;

namespace {

/// Every diagnostic of loading `text`, formatted and concatenated.
std::string messages(const std::string& text, bool* loaded = nullptr) {
  diagnostics diags;
  auto d = load_design_text(text, "fifo.settle", load_options{}, diags);
  if (loaded) *loaded = d.has_value();
  std::string all;
  for (auto& x : diags.items) all += format_diagnostic(x);
  return all;
}

std::string write_temp(const std::string& name, const std::string& text) {
  auto p = std::filesystem::temp_directory_path() / ("settle_parser_test_" + name);
  std::ofstream(p) << text;
  return p.string();
}

}  // namespace

TEST_CASE("an unknown net is reported with its line and a caret", "[parser][diag]") {
  bool loaded = true;
  CHECK(messages("input req\noutput ack\nack = and(req, rdy) delay 1ps\n", &loaded) ==
        "fifo.settle:3:16: error: unknown net 'rdy'\n"
        "ack = and(req, rdy) delay 1ps\n"
        "               ^\n");
  CHECK_FALSE(loaded);
}

TEST_CASE("syntax errors on several lines are all reported in one run", "[parser][diag]") {
  CHECK(
      messages("input req, ack\n"
               "output done\n"
               "done = c(req ack) delay 1ps\n"
               "wire\n"
               "settle\n"
               "done = buf(req) delay 10\n") ==
      "fifo.settle:3:14: error: expected ')', found 'ack'\n"
      "done = c(req ack) delay 1ps\n"
      "             ^\n"
      "fifo.settle:4:5: error: expected a net name at the end of the statement\n"
      "wire\n"
      "    ^\n"
      "fifo.settle:5:1: error: 'settle' is only allowed inside stimulus { }\n"
      "settle\n"
      "^\n"
      "fifo.settle:6:25: error: expected a time unit (fs ps ns us ms) at the end of the statement\n"
      "done = buf(req) delay 10\n"
      "                        ^\n");
}

TEST_CASE("elaboration errors are reported together, in source order", "[parser][diag]") {
  CHECK(messages("default delay 1ps\n"
                 "input req\n"
                 "output ack, full\n"
                 "ack = buf(req)\n"
                 "ack = not(req)\n"
                 "req = buf(ack)\n") ==
        "fifo.settle:3:13: error: output 'full' is never driven\n"
        "output ack, full\n"
        "            ^\n"
        "fifo.settle:5:1: error: net 'ack' has two drivers (the other at 4:1)\n"
        "ack = not(req)\n"
        "^\n"
        "fifo.settle:6:1: error: net 'req' is an input; a gate cannot drive it\n"
        "req = buf(ack)\n"
        "^\n");
}

TEST_CASE("a driven net nobody reads is a warning, not an error", "[parser][diag]") {
  bool loaded = false;
  CHECK(messages("default delay 1ps\ninput req\noutput ack\nwire spare\nack = buf(req)\nspare = "
                 "not(req)\n",
                 &loaded) ==
        "fifo.settle:4:6: warning: net 'spare' is driven but never read\n"
        "wire spare\n"
        "     ^\n");
  CHECK(loaded);
}

TEST_CASE("the caret keeps tabs so it lines up", "[parser][diag]") {
  CHECK(messages("input a\noutput q\n\tq = and(a, b) delay 1ps\n") ==
        "fifo.settle:3:13: error: unknown net 'b'\n"
        "\tq = and(a, b) delay 1ps\n"
        "\t           ^\n");
}

TEST_CASE("a hierarchy 10,000 blocks deep elaborates without deep recursion", "[parser]") {
  std::string text = "default delay 1ps\n";
  const int depth = 10000;
  for (int i = 0; i < depth; ++i)
    text += "block b" + std::to_string(i) + "(in a; out q) {\n  inst u b" + std::to_string(i + 1) +
            "(a: a, q: q)\n}\n";
  text += "block b" + std::to_string(depth) + "(in a; out q) {\n  q = not(a)\n}\n";
  text += "input a\noutput q\ninst u b0(a: a, q: q)\n";
  diagnostics diags;
  auto d = load_design_text(text, "deep.settle", load_options{}, diags);
  REQUIRE(d);
  CHECK(d->nets.instances == depth + 1);
  CHECK(d->nets.gate_count() == 1);
}

TEST_CASE("expression nesting is capped with a diagnostic", "[parser][diag]") {
  std::string ok = "input a\noutput q\nq = " + std::string(256, '(') + "a" + std::string(256, ')') +
                   " delay 1ps\n";
  diagnostics d1;
  CHECK(load_design_text(ok, "t.settle", {}, d1));
  std::string deep = "input a\noutput q\nq = " + std::string(5000, '(') + "a" +
                     std::string(5000, ')') + " delay 1ps\n";
  diagnostics d2;
  CHECK_FALSE(load_design_text(deep, "t.settle", {}, d2));
  REQUIRE(d2.items.size() == 1);
  CHECK(d2.items[0].col == 261);
  CHECK(d2.items[0].message == "expression nested deeper than 256 levels");
}

TEST_CASE(
    "a stimulus file (--stim) replaces the embedded stimulus, parsed against the design's nets",
    "[parser][stim]") {
  auto design_path = write_temp(
      "host.settle",
      "default delay 40ps..60ps\ninput contact_a, contact_b\noutput clean\nwire clean_n\n"
      "clean = nand(contact_a, clean_n)\nclean_n = nand(contact_b, clean)\n"
      "stimulus {\n  at 0ns contact_a = 1, contact_b = 0\n  settle\n}\n");
  auto stim_path = write_temp(
      "bounce.stim",
      "# contact bounce on the set side\nstimulus {\n  at 0ns contact_a = 0, contact_b = 1\n"
      "  settle\n  after 1ns contact_a = 1\n  after 30ps contact_a = 0\n  settle\n"
      "  expect clean = 1\n}\n");
  load_options opt;
  opt.stim_path = stim_path;
  diagnostics diags;
  auto d = load_design(design_path, opt, diags);
  REQUIRE(d);
  CHECK(d->path == design_path);
  REQUIRE(d->stim.steps.size() == 2);
  CHECK(d->stim.steps[1].label == "after 1ns contact_a = 1; after 30ps contact_a = 0");
  CHECK(d->stim.steps[1].expects[0].net == d->nets.find("clean"));

  auto bad_path = write_temp("bad.stim", "stimulus {\n  at 0ns clean = 1\n}\n");
  opt.stim_path = bad_path;
  diagnostics bad;
  CHECK_FALSE(load_design(design_path, opt, bad));
  REQUIRE(bad.items.size() == 1);
  CHECK(format_diagnostic(bad.items[0]) ==
        bad_path +
            ":2:10: error: 'clean' is not an input; the stimulus drives "
            "inputs only\n  at 0ns clean = 1\n         ^\n");
  std::remove(design_path.c_str());
  std::remove(stim_path.c_str());
  std::remove(bad_path.c_str());
}

TEST_CASE("a missing file is a diagnostic without a position", "[parser][diag]") {
  diagnostics diags;
  CHECK_FALSE(load_design("/nonexistent/panel.settle", load_options{}, diags));
  REQUIRE(diags.items.size() == 1);
  CHECK(diags.items[0].line == 0);
  CHECK(format_diagnostic(diags.items[0]) ==
        "/nonexistent/panel.settle: error: cannot open file: No such file or "
        "directory\n");
}
