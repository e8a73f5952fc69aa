// Clopper-Pearson intervals and curve-crossing interpolation.
#include "sim/engine/stats.h"

#include <cmath>
#include <vector>

#include <gtest/gtest.h>

namespace capgap {
namespace {

// Reference values: beta quantiles evaluated with scipy.stats.beta.ppf
// (independent implementation), Clopper & Pearson, Biometrika 26(4), 1934.
TEST(ClopperPearson, MatchesIndependentBetaQuantiles) {
  struct Case { std::uint64_t k, n; double low, high; };
  const Case cases[] = {
      {5, 10, 0.1870860284, 0.8129139716},
      {1, 100, 0.000253146033, 0.05445938539},
      {100, 1000000, 8.136470874e-05, 0.0001216254786},
  };
  for (const Case& c : cases) {
    const Interval ci = ClopperPearson(c.k, c.n);
    EXPECT_NEAR(ci.low, c.low, 1e-9 * c.low + 1e-15) << c.k << "/" << c.n;
    EXPECT_NEAR(ci.high, c.high, 1e-9 * c.high) << c.k << "/" << c.n;
  }
}

// Closed forms at the ends: k = 0 gives [0, 1 - (alpha/2)^(1/n)] and k = n
// gives [(alpha/2)^(1/n), 1] (follows from the beta quantiles; common practice).
TEST(ClopperPearson, EndsHaveClosedForms) {
  const Interval zero = ClopperPearson(0, 10);
  EXPECT_EQ(zero.low, 0.0);
  EXPECT_NEAR(zero.high, 1.0 - std::pow(0.025, 0.1), 1e-12);
  const Interval all = ClopperPearson(10, 10);
  EXPECT_NEAR(all.low, std::pow(0.025, 0.1), 1e-12);
  EXPECT_EQ(all.high, 1.0);
}

// About 1000 errors give roughly +-6 % relative width at 95 % (common
// practice): 1.96 / sqrt(1000) = 6.2 %.
TEST(ClopperPearson, ThousandErrorsGiveAboutSixPercent) {
  const Interval ci = ClopperPearson(1000, 100000000);
  const double p = 1e-5;
  EXPECT_NEAR((ci.high - p) / p, 0.062, 0.005);
  EXPECT_NEAR((p - ci.low) / p, 0.062, 0.005);
}

TEST(CrossingDb, InterpolatesLogBerLinearlyInDb) {
  const std::vector<double> x = {0, 1, 2};
  const std::vector<double> y = {1e-2, 1e-4, 1e-6};
  // log10 falls 2 decades per dB: 1e-5 lies at 1.5 dB exactly.
  EXPECT_NEAR(CrossingDb(x, y, 1e-5), 1.5, 1e-12);
  EXPECT_NEAR(CrossingDb(x, y, 1e-3), 0.5, 1e-12);
  EXPECT_NEAR(CrossingDb(x, y, 1e-4), 1.0, 1e-12);
}

TEST(CrossingDb, IsNanWhenTheCurveDoesNotReachTheTarget) {
  const std::vector<double> x = {0, 1};
  EXPECT_TRUE(std::isnan(CrossingDb(x, std::vector<double>{1e-2, 1e-3}, 1e-5)));
  // Already below the target at the first point: no crossing observed.
  EXPECT_TRUE(std::isnan(CrossingDb(x, std::vector<double>{1e-6, 1e-7}, 1e-5)));
  // A zero-error point cannot be interpolated in log BER.
  EXPECT_TRUE(std::isnan(CrossingDb(x, std::vector<double>{1e-2, 0.0}, 1e-5)));
}

}  // namespace
}  // namespace capgap
