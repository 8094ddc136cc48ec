// Loading designs in unit tests: a design that does not load fails the test
// and shows its diagnostics.
#pragma once

#include <catch2/catch.hpp>
#include <string>

#include "parser/load.hpp"

namespace settle::testing {

/// The design written in `text`, as if read from a file called `name`.
inline design load_text(const std::string& text, const std::string& name) {
  diagnostics diags;
  auto d = load_design_text(text, name, load_options{}, diags);
  for (const auto& x : diags.items) UNSCOPED_INFO(format_diagnostic(x));
  REQUIRE(d);
  return std::move(*d);
}

/// The design in the file at `path`.
inline design load_file(const std::string& path, const load_options& o = {}) {
  diagnostics diags;
  auto d = load_design(path, o, diags);
  INFO(path);
  for (const auto& x : diags.items) UNSCOPED_INFO(format_diagnostic(x));
  REQUIRE(d);
  return std::move(*d);
}

}  // namespace settle::testing
