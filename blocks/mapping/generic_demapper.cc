// Brute-force demapper (generic_demapper.h): one pass over the points for the
// metrics, one per bit for the minima and the shifted sums.
#include "blocks/mapping/generic_demapper.h"

#include <array>
#include <cmath>
#include <complex>
#include <cstddef>
#include <limits>

#include "blocks/core/status.h"
#include "blocks/mapping/demapper.h"

namespace capgap {

void GenericDemapSymbol(std::span<const cf32> points, DemapMethod method, cf32 y, cf32 h, float n0,
                        std::span<float> llrs) {
  constexpr std::size_t kMaxPoints = 1024;
  const std::size_t m = llrs.size();
  CAPGAP_DCHECK(m >= 1 && points.size() == (std::size_t{1} << m) && points.size() <= kMaxPoints);
  std::array<double, kMaxPoints> d;
  const std::complex<double> yd(y), hd(h);
  std::size_t nearest = 0;
  for (std::size_t l = 0; l < points.size(); ++l) {
    d[l] = std::norm(yd - hd * std::complex<double>(points[l])) / static_cast<double>(n0);
    if (d[l] < d[nearest]) nearest = l;
  }
  constexpr double kInf = std::numeric_limits<double>::infinity();
  for (std::size_t k = 0; k < m; ++k) {
    const std::size_t shift = m - 1 - k;
    if (method == DemapMethod::kHard) {
      llrs[k] = ((nearest >> shift) & 1u) != 0 ? -1.0f : 1.0f;
      continue;
    }
    double min0 = kInf, min1 = kInf;
    for (std::size_t l = 0; l < points.size(); ++l) {
      double& best = ((l >> shift) & 1u) != 0 ? min1 : min0;
      if (d[l] < best) best = d[l];
    }
    double llr = min1 - min0;
    if (method == DemapMethod::kLogMap) {
      double sum0 = 0.0, sum1 = 0.0;
      for (std::size_t l = 0; l < points.size(); ++l) {
        if (((l >> shift) & 1u) != 0) {
          sum1 += std::exp(min1 - d[l]);
        } else {
          sum0 += std::exp(min0 - d[l]);
        }
      }
      llr += std::log(sum0 / sum1);
    }
    llrs[k] = static_cast<float>(llr);
  }
}

}  // namespace capgap
