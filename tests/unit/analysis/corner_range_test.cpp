// Corner names a design does not have, and corner specs that repeat a part, are refused with the
// valid range.
#include <catch2/catch.hpp>
#include <string>

#include "sim/analysis/sweep.hpp"
#include "sim/model/corner.hpp"

using namespace settle;

namespace {

corner named(const std::string& name) {
  std::string err;
  auto c = parse_corner(name, &err);
  REQUIRE(c);
  return *c;
}

}  // namespace

TEST_CASE("every corner a sweep plan names exists, and the one after the last does not",
          "[sweep][plan]") {
  for (std::size_t g : {0u, 1u, 4u, 12u}) {
    INFO(g);
    for (const char* spec : {"extremes", "exhaustive"}) {
      std::string err;
      auto plan = plan_sweep(spec, 1, g, &err);
      REQUIRE(plan);
      for (std::uint64_t i = 0; i < plan->corners; ++i)
        CHECK(corner_range_error(plan->corner_at(i), g).empty());
      // Counting: 3 + 2g extremes (README), and 2^g ways to put g gates at min or max (common
      // practice).
      const std::uint64_t count =
          std::string(spec) == "extremes" ? 3 + 2 * g : std::uint64_t{1} << g;
      CHECK(plan->corners == count);
      const auto past = named(std::string(spec) + "#" + std::to_string(count));
      const auto why = corner_range_error(past, g);
      CHECK(why.find("numbered 0.." + std::to_string(count - 1)) != std::string::npos);
    }
  }
}

TEST_CASE("extremes#999 on 4 gates names the range 0..10; exhaustive does not wrap",
          "[sweep][plan]") {
  CHECK(corner_range_error(named("extremes#999"), 4) ==
        "this design has 11 extremes corners, numbered 0..10");
  CHECK(corner_range_error(named("extremes#10"), 4).empty());
  CHECK(corner_range_error(named("exhaustive#16"), 4).find("numbered 0..15") != std::string::npos);
  CHECK(corner_range_error(named("exhaustive#18446744073709551615"), 63).find("numbered") !=
        std::string::npos);
  CHECK(corner_range_error(named("exhaustive#18446744073709551615"), 64).empty());
  for (const char* always : {"min", "typ", "max", "random:7#123456789", "gauss:1#99", "max@2.5"})
    CHECK(corner_range_error(named(always), 0).empty());
}

TEST_CASE("a corner spec may name extremes, exhaustive and interval once each", "[sweep][plan]") {
  for (const char* twice : {"extremes+extremes", "exhaustive+exhaustive", "interval+interval",
                            "extremes+random:5+ extremes", "interval+extremes+interval"}) {
    INFO(twice);
    std::string err;
    CHECK_FALSE(plan_sweep(twice, 1, 3, &err));
    CHECK(err.find("appears twice") != std::string::npos);
  }
  // Two random parts draw different corners (the numbering continues), so they may repeat.
  std::string err;
  auto plan = plan_sweep("random:5+extremes+random:5+interval", 1, 3, &err);
  REQUIRE(plan);
  CHECK(plan->corners == 5 + 9 + 5);
}
