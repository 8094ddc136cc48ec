// The malformed-design corpus: each tests/bad file names the line:col and message its first error
// must have.
#include <algorithm>
#include <catch2/catch.hpp>
#include <filesystem>
#include <fstream>
#include <regex>

#include "parser/load.hpp"

using namespace settle;
namespace fs = std::filesystem;

namespace {

struct expected_error {
  std::uint32_t line = 0, col = 0;
  std::string text;
};

/// Reads the "# expect: LINE:COL: message substring" header of a corpus file
/// ("// expect: ..." in a Verilog file).
expected_error header_of(const fs::path& p) {
  std::ifstream in(p);
  std::string first;
  std::getline(in, first);
  static const std::regex rx(R"(^(?:#|//) expect: (\d+):(\d+): (.+)$)");
  std::smatch m;
  INFO(p.string());
  REQUIRE(std::regex_match(first, m, rx));
  return {static_cast<std::uint32_t>(std::stoul(m[1])),
          static_cast<std::uint32_t>(std::stoul(m[2])), m[3]};
}

std::vector<fs::path> files(const fs::path& dir, const std::string& ext) {
  std::vector<fs::path> out;
  for (auto& e : fs::directory_iterator(dir))
    if (e.path().extension() == ext) out.push_back(e.path());
  std::sort(out.begin(), out.end());
  return out;
}

void check_one(const fs::path& p) {
  auto want = header_of(p);
  diagnostics diags;
  auto d = load_design(p.string(), load_options{}, diags);
  std::string all;
  for (auto& x : diags.items) all += format_diagnostic(x);
  INFO(p.filename().string() << " wants " << want.line << ":" << want.col << ": " << want.text
                             << "\n"
                             << all);
  CHECK_FALSE(d);
  bool found = std::any_of(diags.items.begin(), diags.items.end(), [&](const diagnostic& x) {
    return x.severity == diagnostic::level::error && x.file == p.string() && x.line == want.line &&
           x.col == want.col && x.message.find(want.text) != std::string::npos;
  });
  CHECK(found);
  // Every error at a position carries its source line (for the caret).
  for (auto& x : diags.items)
    if (x.severity == diagnostic::level::error && x.line > 0) CHECK_FALSE(x.source_line.empty());
}

}  // namespace

TEST_CASE("every malformed design in tests/bad is rejected at the expected line and column",
          "[parser][corpus]") {
  const fs::path dir = fs::path(SETTLE_SOURCE_DIR) / "tests" / "bad";
  auto designs = files(dir, ".settle");
  CHECK(designs.size() >= 60);
  for (auto& p : designs) check_one(p);
}

TEST_CASE(
    "every malformed Verilog netlist in tests/bad/verilog is rejected at the expected line and "
    "column",
    "[parser][corpus]") {
  const fs::path dir = fs::path(SETTLE_SOURCE_DIR) / "tests" / "bad" / "verilog";
  auto netlists = files(dir, ".v");
  CHECK(netlists.size() >= 15);
  for (auto& p : netlists) check_one(p);
}

TEST_CASE("every malformed stimulus file in tests/bad/stim is rejected against a good design",
          "[parser][corpus]") {
  const fs::path dir = fs::path(SETTLE_SOURCE_DIR) / "tests" / "bad" / "stim";
  const auto host = (dir / "host.design").string();
  {
    diagnostics diags;
    INFO("the host design itself must load");
    REQUIRE(load_design(host, load_options{}, diags));
  }
  auto stims = files(dir, ".stim");
  CHECK(stims.size() >= 5);
  for (auto& p : stims) {
    load_options opt;
    opt.stim_path = p.string();
    auto want = header_of(p);
    diagnostics diags;
    auto d = load_design(host, opt, diags);
    std::string all;
    for (auto& x : diags.items) all += format_diagnostic(x);
    INFO(p.filename().string() << " wants " << want.line << ":" << want.col << ": " << want.text
                               << "\n"
                               << all);
    CHECK_FALSE(d);
    CHECK(std::any_of(diags.items.begin(), diags.items.end(), [&](const diagnostic& x) {
      return x.severity == diagnostic::level::error && x.file == p.string() &&
             x.line == want.line && x.col == want.col &&
             x.message.find(want.text) != std::string::npos;
    }));
  }
}
