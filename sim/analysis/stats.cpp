// Wilson score intervals and zero-count upper bounds for sweep outcome shares.
#include "sim/analysis/stats.hpp"

#include <algorithm>
#include <cmath>

namespace settle {

double normal_quantile_two_sided(double confidence) {
  if (confidence == 0.95) return 1.959963984540054;
  if (confidence == 0.99) return 2.5758293035489004;
  // P(|Z| > z) = erfc(z / sqrt 2) decreases in z: bisect for 1 - confidence.
  const double tail = 1.0 - confidence;
  double lo = 0.0, hi = 40.0;
  for (int i = 0; i < 200; ++i) {
    const double mid = 0.5 * (lo + hi);
    if (std::erfc(mid / std::sqrt(2.0)) > tail)
      lo = mid;
    else
      hi = mid;
  }
  return 0.5 * (lo + hi);
}

proportion_interval wilson_interval(std::uint64_t k, std::uint64_t n, double confidence) {
  if (n == 0) return {0.0, 1.0};
  const double z = normal_quantile_two_sided(confidence);
  const double nn = static_cast<double>(n);
  const double p = static_cast<double>(std::min(k, n)) / nn;
  const double z2 = z * z;
  const double denom = 1.0 + z2 / nn;
  const double centre = (p + z2 / (2.0 * nn)) / denom;
  const double half = z / denom * std::sqrt(p * (1.0 - p) / nn + z2 / (4.0 * nn * nn));
  // The bounds are exactly 0 at k = 0 and exactly 1 at k = n (centre = half there);
  // say so rather than leave rounding residue.
  const double lo = k == 0 ? 0.0 : std::max(0.0, centre - half);
  const double hi = k >= n ? 1.0 : std::min(1.0, centre + half);
  return {lo, hi};
}

double rule_of_three(std::uint64_t n) {
  return n == 0 ? 1.0 : std::min(1.0, 3.0 / static_cast<double>(n));
}

double zero_count_upper_bound(std::uint64_t n, double confidence) {
  if (n == 0) return 1.0;
  return 1.0 - std::pow(1.0 - confidence, 1.0 / static_cast<double>(n));
}

}  // namespace settle
