// Wilson score intervals and zero-count bounds against values worked by hand from their formulas.
#include "sim/analysis/stats.hpp"

#include <catch2/catch.hpp>

using namespace settle;

// Wilson 1927: centre = (p + z^2/2n) / (1 + z^2/n), half = z/(1 + z^2/n) *
// sqrt(p(1-p)/n + z^2/4n^2), z = 1.959963984540054 (the 97.5% normal
// quantile; common practice), so z^2 = 3.841458820694124.
TEST_CASE("Wilson interval of 5 in 10, worked by hand", "[stats]") {
  // p = 0.5, z^2/n = 0.3841458820694124, denominator 1.3841458820694124.
  // centre = (0.5 + 0.1920729410347062) / 1.3841458820694124 = 0.5 exactly;
  // half = (1.959963984540054 / 1.3841458820694124) * sqrt(0.025 + 0.0096036470517353)
  //      = 1.4160107 * 0.1860206 = 0.2634069.
  const auto ci = wilson_interval(5, 10);
  CHECK(ci.lo == Approx(0.5 - 0.263406909487436).margin(1e-12));
  CHECK(ci.hi == Approx(0.5 + 0.263406909487436).margin(1e-12));
}

TEST_CASE("Wilson interval of 0 in n starts at 0 and ends at (z^2/n)/(1 + z^2/n)", "[stats]") {
  // k = 0: centre and half are both (z^2/2n)/(1 + z^2/n), so lo = 0 and
  // hi = (z^2/n)/(1 + z^2/n); n = 10: 0.3841458820694124 / 1.3841458820694124 = 0.2775328.
  const auto ci = wilson_interval(0, 10);
  CHECK(ci.lo == Approx(0.0).margin(1e-15));
  CHECK(ci.hi == Approx(0.3841458820694124 / 1.3841458820694124).epsilon(1e-12));
  // Symmetry k <-> n - k (from the formula): [lo, hi] of 10 in 10 is [1 - hi, 1 - lo] of 0 in 10.
  const auto all = wilson_interval(10, 10);
  CHECK(all.lo == Approx(1 - ci.hi).epsilon(1e-12));
  CHECK(all.hi == 1.0);
  CHECK(ci.lo == 0.0);
}

TEST_CASE("Wilson interval of 812 in 1000 is about [0.787, 0.835]", "[stats]") {
  // p = 0.812, z^2/n = 0.003841458820694124: centre = 0.8139207294 / 1.0038414588
  // = 0.8108061, half = 1.9524646 * sqrt(0.000152656 + 0.00000096036) = 0.0241992.
  const auto ci = wilson_interval(812, 1000);
  CHECK(ci.lo == Approx(0.8108060513525068 - 0.024199238763724647).epsilon(1e-10));
  CHECK(ci.hi == Approx(0.8108060513525068 + 0.024199238763724647).epsilon(1e-10));
  CHECK(ci.lo < 0.812);
  CHECK(ci.hi > 0.812);
}

TEST_CASE("Wilson interval with no trials is the whole range", "[stats]") {
  const auto ci = wilson_interval(0, 0);
  CHECK(ci.lo == 0.0);
  CHECK(ci.hi == 1.0);
}

TEST_CASE("normal quantiles for two-sided levels", "[stats]") {
  // Standard normal table values (common practice): 90% -> 1.6449, 95% -> 1.9600, 99% -> 2.5758.
  CHECK(normal_quantile_two_sided(0.90) == Approx(1.6448536269514722).epsilon(1e-10));
  CHECK(normal_quantile_two_sided(0.95) == Approx(1.96).epsilon(1e-4));
  CHECK(normal_quantile_two_sided(0.99) == Approx(2.5758).epsilon(1e-4));
  // The bisection agrees with the tabulated constant it short-cuts.
  CHECK(normal_quantile_two_sided(0.9500000001) == Approx(1.959963984540054).epsilon(1e-7));
}

TEST_CASE("rule of three and the exact zero-count bound", "[stats]") {
  // Hanley and Lippman-Hand 1983: 3/N; exact 1 - 0.05^(1/N), for N = 1000
  // 0.0029912 (worked: ln 0.05 / 1000 = -0.0029957, 1 - e^-0.0029957 = 0.0029912).
  CHECK(rule_of_three(1000) == Approx(0.003));
  CHECK(zero_count_upper_bound(1000) == Approx(0.00299124954509533).epsilon(1e-12));
  CHECK(zero_count_upper_bound(1000) < rule_of_three(1000));
  // One trial: the exact bound is 0.95 and 3/1 is capped at 1.
  CHECK(zero_count_upper_bound(1) == Approx(0.95));
  CHECK(rule_of_three(1) == 1.0);
  CHECK(rule_of_three(0) == 1.0);
}
