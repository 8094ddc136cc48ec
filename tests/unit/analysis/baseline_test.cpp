// Baselines: field errors, lower bounds at the search ceiling, merging, locked updates.
#include "sim/analysis/baseline.hpp"

#include <fcntl.h>
#include <sys/file.h>
#include <sys/stat.h>
#include <unistd.h>

#include <atomic>
#include <catch2/catch.hpp>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>

#include "sim/analysis/baseline_store.hpp"

namespace {

settle::baseline_entry entry(const std::string& design, double margin, bool at_least,
                             double ceiling) {
  settle::baseline_entry e;
  e.design = design;
  e.spec = "exhaustive";
  e.ceiling_pct = ceiling;
  e.margin_pct = margin;
  e.at_least = at_least;
  e.steps = {{2, "after 2ns  start = 1", margin, at_least}};
  return e;
}

std::string slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

std::string scratch_folder() {
  std::string t = "/tmp/settle-baseline-test-XXXXXX";
  REQUIRE(::mkdtemp(t.data()) != nullptr);
  return t;
}

}  // namespace

TEST_CASE("baseline: errors name the entry and the field", "[baseline]") {
  std::string err;
  // RFC 8259 value types: a string where a number is expected.
  CHECK_FALSE(settle::parse_baseline(
      R"({"format_version": 1, "designs": [{"design": "arbiter.settle", "margin_pct": "9"}]})",
      &err));
  CHECK(err == "entry \"arbiter.settle\", field \"margin_pct\": expected a number");
  CHECK_FALSE(settle::parse_baseline(
      R"({"format_version": 1,
          "designs": [{"design": "a", "margin_pct": 1, "steps": [{"margin_pct": 1}]}]})",
      &err));
  CHECK(err == "entry \"a\", steps[0], field \"index\": missing");
  CHECK_FALSE(
      settle::parse_baseline(R"({"format_version": 1, "designs": [{"margin_pct": 1}]})", &err));
  CHECK(err == "entry #1, field \"design\": missing");
  CHECK_FALSE(
      settle::parse_baseline(R"({"format_version": 1, "designs": [{"design": "a", "margin_pct": 1,
      "settle_within": [{"step": 1, "budget_fs": 10, "margin_fs": 18446744073709551615}]}]})",
                             &err));
  CHECK(err.find("settle_within[0], field \"margin_fs\"") != std::string::npos);
  // A version beyond int's range is not truncated into a valid one.
  CHECK_FALSE(settle::parse_baseline(R"({"format_version": 4294967297, "designs": []})", &err));
  CHECK(err.find("newer") != std::string::npos);
}

TEST_CASE("baseline: a margin at the search ceiling is a lower bound", "[baseline]") {
  // Found with --up-to 400 (exact 259%), compared with a run whose ceiling is 100%: the new
  // figure is >= 100%, which says nothing about the old 259%, so nothing shrank.
  const auto before = entry("w.settle", 259, false, 400);
  const auto now = entry("w.settle", 100, true, 100);
  const auto c = settle::compare_baseline(before, now, 2);
  CHECK_FALSE(c.regressed());
  bool ceilings = false;
  for (const auto& n : c.notes) ceilings = ceilings || n.find("up to 400%") != std::string::npos;
  CHECK(ceilings);
  // An old lower bound (>= 100%) against a new exact 90%: shrank by more than 2 points.
  const auto c2 = settle::compare_baseline(entry("w.settle", 100, true, 100),
                                           entry("w.settle", 90, false, 400), 2);
  CHECK(c2.regressed());
  // Within the tolerance of the lower bound: no shrink.
  CHECK_FALSE(settle::compare_baseline(entry("w.settle", 100, true, 100),
                                       entry("w.settle", 98.5, false, 400), 2)
                  .regressed());
  // Both exact: the plain rule.
  CHECK(settle::compare_baseline(entry("w.settle", 30, false, 100),
                                 entry("w.settle", 20, false, 100), 2)
            .regressed());
}

TEST_CASE("baseline: merging replaces the design's entry and drops its duplicates", "[baseline]") {
  settle::baseline_file f;
  f.designs = {entry("a", 1, false, 100), entry("b", 2, false, 100), entry("a", 3, false, 100)};
  settle::merge_entry(f, entry("a", 4, false, 100));
  REQUIRE(f.designs.size() == 2);
  CHECK(f.designs[0].design == "a");
  CHECK(f.designs[0].margin_pct == 4);
  CHECK(f.designs[1].design == "b");
}

TEST_CASE("baseline: an update re-reads the file under the lock and keeps its mode", "[baseline]") {
  const std::string dir = scratch_folder();
  const std::string path = dir + "/b.json";
  // Created when absent; the creators' lock file is gone afterwards.
  auto r = settle::update_baseline_file(path, entry("a", 1, false, 100), "settle test", nullptr);
  REQUIRE(r.status == settle::baseline_update_status::written);
  CHECK(::access((dir + "/.b.json.lock").c_str(), F_OK) != 0);
  // Someone else's entry written after this process began is kept: the file is read at update time.
  settle::baseline_file other;
  other.designs = {entry("a", 1, false, 100), entry("b", 2, false, 100)};
  {
    std::ofstream out(path, std::ios::binary);
    out << settle::baseline_text(other);
  }
  ::chmod(path.c_str(), 0640);
  r = settle::update_baseline_file(path, entry("c", 3, false, 100), "settle test", nullptr);
  REQUIRE(r.status == settle::baseline_update_status::written);
  std::string err;
  const auto back = settle::parse_baseline(slurp(path), &err);
  REQUIRE(back);
  REQUIRE(back->designs.size() == 3);
  CHECK(back->designs[1].design == "b");
  struct stat st {};
  REQUIRE(::stat(path.c_str(), &st) == 0);
  CHECK((st.st_mode & 07777) == 0640);
  // A stop flag already set (an interruption) leaves the bytes as they were.
  const std::string bytes = slurp(path);
  std::atomic<bool> stop{true};
  r = settle::update_baseline_file(path, entry("d", 4, false, 100), "settle test", &stop);
  CHECK(r.status == settle::baseline_update_status::stopped);
  CHECK(slurp(path) == bytes);
  // flock(2): a lock held elsewhere makes the update wait; with the stop flag set it gives up.
  const int fd = ::open(path.c_str(), O_RDONLY);
  REQUIRE(fd >= 0);
  REQUIRE(::flock(fd, LOCK_EX) == 0);
  bool waited = false;
  stop = false;
  r = settle::update_baseline_file(path, entry("d", 4, false, 100), "settle test", &stop, [&] {
    waited = true;
    stop = true;  // as a signal handler would
  });
  CHECK(waited);
  CHECK(r.status == settle::baseline_update_status::stopped);
  ::close(fd);
  CHECK(slurp(path) == bytes);
  // Read-only even for root (the mode bits count as well as access(2)).
  ::chmod(path.c_str(), 0444);
  CHECK(settle::baseline_unwritable(path).find("read-only") != std::string::npos);
  // Made read-only after the check before the search: the update under the lock refuses it too.
  r = settle::update_baseline_file(path, entry("d", 4, false, 100), "settle test", nullptr);
  CHECK(r.status == settle::baseline_update_status::failed);
  CHECK(r.error.find("read-only") != std::string::npos);
  CHECK(slurp(path) == bytes);
  ::chmod(path.c_str(), 0644);
  CHECK(settle::baseline_unwritable(path).empty());
  (void)std::system(("rm -rf '" + dir + "'").c_str());
}
