// Statistics of a Monte Carlo point: exact (Clopper-Pearson) binomial
// confidence intervals and the Eb/N0 at which a measured curve crosses a
// target error rate.
//
// Clopper & Pearson, "The use of confidence or fiducial limits illustrated in
// the case of the binomial", Biometrika 26(4), 1934: for k errors in n trials
// the two-sided (1 - alpha) interval is [B(alpha/2; k, n-k+1),
// B(1-alpha/2; k+1, n-k)] with B the beta quantile (0 and 1 at the ends).
#ifndef CAPGAP_SIM_STATS_H_
#define CAPGAP_SIM_STATS_H_

#include <cstdint>
#include <span>

namespace capgap {

struct Interval {
  double low;
  double high;
};

// REQUIRES: k <= n, n > 0, 0 < confidence < 1.
Interval ClopperPearson(std::uint64_t k, std::uint64_t n, double confidence = 0.95);

// Eb/N0 (dB) where the curve (x[i], y[i]) first falls through `target`, by
// linear interpolation of log10(y) against x between the bracketing points
// (y[i] >= target > y[i+1] or equal). Points with y <= 0 or NaN end the
// search (no logarithm). NaN when the curve does not cross the target
// (including when its first point is already below it).
double CrossingDb(std::span<const double> x, std::span<const double> y, double target);

}  // namespace capgap

#endif  // CAPGAP_SIM_STATS_H_
