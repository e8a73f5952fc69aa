// Clopper-Pearson intervals (Boost.Math beta quantiles) and curve crossings.
#include "sim/engine/stats.h"

#include <cmath>
#include <limits>

#include <boost/math/distributions/beta.hpp>

namespace capgap {

Interval ClopperPearson(std::uint64_t k, std::uint64_t n, double confidence) {
  const double alpha = 1.0 - confidence;
  const double kd = static_cast<double>(k);
  const double nd = static_cast<double>(n);
  Interval out{0.0, 1.0};
  if (k > 0) {
    boost::math::beta_distribution<double> lower(kd, nd - kd + 1.0);
    out.low = boost::math::quantile(lower, alpha / 2.0);
  }
  if (k < n) {
    boost::math::beta_distribution<double> upper(kd + 1.0, nd - kd);
    out.high = boost::math::quantile(upper, 1.0 - alpha / 2.0);
  }
  return out;
}

double CrossingDb(std::span<const double> x, std::span<const double> y, double target) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  if (x.size() != y.size() || x.empty() || !(target > 0)) return nan;
  if (!(y[0] > 0) || y[0] < target) return nan;
  for (std::size_t i = 0; i + 1 < x.size(); ++i) {
    if (!(y[i + 1] > 0)) return nan;  // a zero or NaN point: cannot interpolate in log
    if (y[i] >= target && y[i + 1] <= target) {
      const double l0 = std::log10(y[i]), l1 = std::log10(y[i + 1]), lt = std::log10(target);
      if (l0 == l1) return x[i];
      return x[i] + (x[i + 1] - x[i]) * (l0 - lt) / (l0 - l1);
    }
  }
  return nan;
}

}  // namespace capgap
