// Union bounds from pairwise distances (see constellation_bounds.h). Sums run
// in double precision over all ordered pairs, O(M^2); Q from erfc.
#include "analysis/constellation_bounds.h"

#include <algorithm>
#include <bit>
#include <cmath>
#include <complex>
#include <cstddef>
#include <limits>
#include <numbers>

#include "analysis/uncoded_theory.h"

namespace capgap::analysis {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr std::size_t kMaxPoints = 1024;

double AverageEnergy(std::span<const cf32> points) {
  double e = 0.0;
  for (const cf32& x : points) e += std::norm(std::complex<double>(x));
  return e / static_cast<double>(points.size());
}

// (1/M) sum_i sum_{j != i} w(i, j) Q(|x_i - x_j| / sqrt(2 N0)) with N0 = Es / esno.
template <typename Weight>
double PairwiseSum(std::span<const cf32> points, double esno, Weight weight) {
  if (points.size() < 2 || points.size() > kMaxPoints || !(esno > 0.0) || std::isinf(esno)) {
    return kNaN;
  }
  const double es = AverageEnergy(points);
  if (!(es > 0.0) || !std::isfinite(es)) return kNaN;
  const double inv_sqrt_2n0 = 1.0 / std::sqrt(2.0 * es / esno);
  double sum = 0.0;
  for (std::size_t i = 0; i < points.size(); ++i) {
    const std::complex<double> xi(points[i]);
    for (std::size_t j = 0; j < points.size(); ++j) {
      if (j == i) continue;
      const double w = weight(i, j);
      if (w == 0.0) continue;
      const double d = std::abs(xi - std::complex<double>(points[j]));
      sum += w * QFunction(d * inv_sqrt_2n0);
    }
  }
  return sum / static_cast<double>(points.size());
}

}  // namespace

double UnionBoundSer(std::span<const cf32> points, double esno) {
  return PairwiseSum(points, esno, [](std::size_t, std::size_t) { return 1.0; });
}

double UnionBoundBer(std::span<const cf32> points, double esno) {
  if (!std::has_single_bit(points.size())) return kNaN;
  const int m = std::countr_zero(points.size());
  const double sum = PairwiseSum(points, esno, [](std::size_t i, std::size_t j) {
    return static_cast<double>(std::popcount(i ^ j));
  });
  return sum / m;
}

double NormalisedMinimumDistance(std::span<const cf32> points) {
  if (points.size() < 2) return kNaN;
  double best = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < points.size(); ++i) {
    for (std::size_t j = i + 1; j < points.size(); ++j) {
      best = std::min(best, std::abs(std::complex<double>(points[i]) -
                                     std::complex<double>(points[j])));
    }
  }
  return best / std::sqrt(AverageEnergy(points));
}

}  // namespace capgap::analysis
