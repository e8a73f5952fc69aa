// Tests for analysis/constellation_bounds: the union bound from pairwise
// distances against cases with a published exact answer. BPSK has one pair,
// so the bound is exact; for square 16-QAM the bound lies above the exact SER
// (and the exact Gray BER) and the two converge at high SNR, where the
// nearest neighbours dominate. Sources are named beside each check.
#include "analysis/constellation_bounds.h"

#include <gtest/gtest.h>

#include <cmath>
#include <numbers>
#include <vector>

#include "analysis/uncoded_theory.h"
#include "blocks/core/energy.h"
#include "blocks/core/types.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap::analysis {
namespace {

std::vector<cf32> Points(const Modulation& modulation) {
  Result<Mapper> mapper = Mapper::Create(modulation);
  EXPECT_TRUE(mapper.ok()) << mapper.status().message();
  return {mapper.value().points().begin(), mapper.value().points().end()};
}

// Square 16-QAM SER, Ps = 1 - (1 - P)^2 with P = 2 (1 - 1/4) Q(sqrt(3 Es /
// (15 N0))) (Proakis & Salehi, Digital Communications, 5th ed., eq. 4.3-30;
// equation number from memory), written out here independently of
// uncoded_theory.cc.
double Exact16QamSer(double esno) {
  const double p = 1.5 * QFunction(std::sqrt(esno / 5.0));
  return 1.0 - (1.0 - p) * (1.0 - p);
}

TEST(UnionBound, EqualsTheExactBpskErrorRate) {
  // One pair at distance 2 sqrt(Es): SER = BER = Q(sqrt(2 Es/N0)) (Proakis &
  // Salehi, 5th ed., ch. 4), with no union overlap at all.
  const std::vector<cf32> bpsk = {cf32(1.0f, 0.0f), cf32(-1.0f, 0.0f)};
  for (double esno_db : {-5.0, 0.0, 4.0, 9.59, 15.0}) {
    const double esno = DbToLinear(esno_db);
    const double exact = QFunction(std::sqrt(2.0 * esno));
    // Rounding only: Q's relative sensitivity grows like its argument squared.
    EXPECT_NEAR(UnionBoundSer(bpsk, esno), exact, 1e-12 * exact) << esno_db;
    EXPECT_NEAR(UnionBoundBer(bpsk, esno), exact, 1e-12 * exact) << esno_db;
  }
  // Pb = 1.2501e-2 at 4 dB (Proakis & Salehi, 5th ed., ch. 4; evaluated with
  // scipy.special.erfc).
  EXPECT_NEAR(UnionBoundBer(bpsk, DbToLinear(4.0)), 1.2501e-2, 1e-6);
}

TEST(UnionBound, SixteenQamSerIsAboveTheExactSerAndConvergesAtHighSnr) {
  const std::vector<cf32> qam = Points(Modulation{ModulationFamily::kQam, 16});
  // Up to 18 dB: beyond it the excess of the bound (the diagonal neighbours'
  // terms and the P^2 overlap) falls below the effect of the points' float
  // rounding on Q, and only the ratio is meaningful.
  double previous_ratio = 1e300;
  for (double esno_db = 0.0; esno_db <= 18.0; esno_db += 2.0) {
    const double esno = DbToLinear(esno_db);
    const double bound = UnionBoundSer(qam, esno);
    const double exact = Exact16QamSer(esno);
    ASSERT_GT(bound, exact) << esno_db;  // a union bound, never below
    const double ratio = bound / exact;
    EXPECT_LT(ratio, previous_ratio) << esno_db;  // tightens with SNR
    previous_ratio = ratio;
  }
  // At high SNR both approach 3 Q(d_min / sqrt(2 N0)) (three nearest
  // neighbours on average: (4 * 2 + 8 * 3 + 4 * 4) / 16, common practice).
  EXPECT_LT(UnionBoundSer(qam, DbToLinear(20.0)) / Exact16QamSer(DbToLinear(20.0)), 1.01);
  EXPECT_LT(UnionBoundSer(qam, DbToLinear(24.0)) / Exact16QamSer(DbToLinear(24.0)), 1.001);
  // At low SNR the bound is loose (it even exceeds 1 at 0 dB).
  EXPECT_GT(UnionBoundSer(qam, 1.0) / Exact16QamSer(1.0), 1.5);
}

TEST(UnionBound, SixteenQamBerIsAboveTheExactGrayBerAndConvergesAtHighSnr) {
  // Exact Gray BER of square 16-QAM: K. Cho and D. Yoon, IEEE Trans. Commun.
  // 50(7), 2002, as UncodedBer evaluates it (tested in uncoded_theory_test).
  const Modulation qam{ModulationFamily::kQam, 16};
  const std::vector<cf32> points = Points(qam);
  for (double ebno_db : {4.0, 8.0, 12.0, 16.0}) {
    const double esno = DbToLinear(EsnoDbFromEbnoDb(ebno_db, 4));
    const double bound = UnionBoundBer(points, esno);
    const double exact = UncodedBer(qam, ebno_db);
    EXPECT_GT(bound, exact) << ebno_db;
    if (ebno_db >= 12.0) {
      EXPECT_LT(bound / exact, 1.01) << ebno_db;
    }
  }
}

TEST(UnionBound, DoesNotDependOnTheScaleOfThePoints) {
  // Es/N0 is relative to the points' own average energy.
  std::vector<cf32> points = Points(Modulation{ModulationFamily::kPsk, 8});
  const double ser = UnionBoundSer(points, 10.0);
  const double ber = UnionBoundBer(points, 10.0);
  for (cf32& x : points) x *= 3.0f;
  EXPECT_NEAR(UnionBoundSer(points, 10.0), ser, 1e-6 * ser);
  EXPECT_NEAR(UnionBoundBer(points, 10.0), ber, 1e-6 * ber);
}

TEST(UnionBound, InvalidInputGivesNaN) {
  const std::vector<cf32> one = {cf32(1.0f, 0.0f)};
  const std::vector<cf32> three = {cf32(1.0f, 0.0f), cf32(0.0f, 1.0f), cf32(-1.0f, 0.0f)};
  const std::vector<cf32> bpsk = {cf32(1.0f, 0.0f), cf32(-1.0f, 0.0f)};
  EXPECT_TRUE(std::isnan(UnionBoundSer(one, 1.0)));
  EXPECT_TRUE(std::isnan(UnionBoundBer(three, 1.0)));  // labels need M = 2^m
  EXPECT_FALSE(std::isnan(UnionBoundSer(three, 1.0)));
  EXPECT_TRUE(std::isnan(UnionBoundSer(bpsk, 0.0)));
  EXPECT_TRUE(std::isnan(UnionBoundSer(bpsk, -1.0)));
}

TEST(NormalisedMinimumDistance, SquareQamAndPsk) {
  // 16-QAM: d_min = 2 / sqrt(10) at unit energy; M-PSK: 2 sin(pi / M)
  // (common practice).
  EXPECT_NEAR(NormalisedMinimumDistance(Points(Modulation{ModulationFamily::kQam, 16})),
              2.0 / std::sqrt(10.0), 1e-6);
  EXPECT_NEAR(NormalisedMinimumDistance(Points(Modulation{ModulationFamily::kPsk, 8})),
              2.0 * std::sin(std::numbers::pi / 8.0), 1e-6);
}

}  // namespace
}  // namespace capgap::analysis
