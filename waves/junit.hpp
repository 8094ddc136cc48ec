// JUnit-style XML test reports of run, sweep and margin results, for CI servers.
#pragma once

#include <functional>
#include <string>
#include <string_view>
#include <vector>

#include "sim/analysis/margin.hpp"
#include "sim/analysis/sweep.hpp"
#include "sim/kernel/run.hpp"
#include "sim/model/design.hpp"

namespace settle {

struct junit_failure {
  std::string message;  ///< one line
  std::string type;     ///< "expectation", "verdict", "margin", ...
  std::string text;     ///< the body: witness, detail, replay command
};

struct junit_case {
  std::string name, classname;
  double time_s = 0;
  std::vector<junit_failure> failures;
};

struct junit_suite {
  std::string name;
  double time_s = 0;
  std::vector<std::pair<std::string, std::string>> properties;
  std::vector<junit_case> cases;
};

/// Escapes text for XML 1.0 character data (`attribute`: also quotes and
/// line breaks). Characters XML 1.0 forbids (controls other than tab, LF, CR)
/// and bytes that are not valid UTF-8 become U+FFFD.
std::string xml_escape(std::string_view text, bool attribute);

/// `<testsuites>` with one `<testsuite>` per suite, counts filled in.
std::string junit_xml(const std::vector<junit_suite>& suites);

/// Builds the replay command line for a corner name.
using replay_fn = std::function<std::string(const std::string& corner)>;

/// One suite for a `settle run`: a testcase per step (status) and per expectation.
junit_suite junit_of_run(const design& d, const run_result& r, const std::string& corner,
                         const replay_fn& replay, double wall_s);
/// One suite for a `settle sweep`: a testcase per step (verdict) and per
/// expectation (failing in any corner).
junit_suite junit_of_sweep(const design& d, const sweep_result& r, const replay_fn& replay);
/// One suite for a `settle margin`: a testcase per step (passes at the written
/// spread) and per expectation (holds at the written spread), plus the
/// settle-time budgets and, when given, the baseline comparison.
junit_suite junit_of_margin(
    const design& d, const margin_result& r, const replay_fn& replay,
    const std::vector<std::pair<std::string, std::string>>& baseline_failures = {});

}  // namespace settle
