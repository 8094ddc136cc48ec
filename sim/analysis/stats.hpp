// Small statistics for corner sweeps: Wilson score intervals and zero-count bounds.
#pragma once

#include <cstdint>

namespace settle {

/// A two-sided confidence interval on a proportion.
struct proportion_interval {
  double lo = 0, hi = 0;
};

/// The upper standard normal quantile z(1 - alpha/2) for the confidence levels
/// settle uses: 0.95 -> 1.959963984540054, 0.99 -> 2.5758293035489004 (values
/// of the normal distribution's inverse, to double precision). Other levels
/// are computed by bisection on erfc.
double normal_quantile_two_sided(double confidence);

/// Wilson's score interval (Wilson 1927, JASA 22:209-212) for k successes in
/// n trials at `confidence` (default 95%):
///   centre = (p + z^2/2n) / (1 + z^2/n),
///   half   = z / (1 + z^2/n) * sqrt(p(1-p)/n + z^2/4n^2),  p = k/n,
/// clipped to [0, 1]. n = 0 gives [0, 1].
proportion_interval wilson_interval(std::uint64_t k, std::uint64_t n, double confidence = 0.95);

/// The "rule of three": 3/n, the approximate one-sided 95% upper bound on the
/// chance of an event not seen in n independent trials (Hanley and
/// Lippman-Hand 1983). n = 0 gives 1.
double rule_of_three(std::uint64_t n);

/// The exact one-sided upper bound behind it: 1 - (1 - confidence)^(1/n).
double zero_count_upper_bound(std::uint64_t n, double confidence = 0.95);

}  // namespace settle
