// Tests of the `16apsk` constellation (sim/families/apsk16_constellation.h):
// the ring geometry in the style of DVB-S2 16APSK (ETSI EN 302 307: 4 + 12
// points, inner phases pi/4 + k pi/2, outer phases pi/12 + k pi/6, ring
// ratio 2.85 for code rate 3/4; from memory), unit energy, the labelling
// promised in its file comment, parsing through the registry, and that the
// quadrature CM/BICM capacity of analysis/capacity.h works for its points
// (checked against an independent Monte Carlo estimate of the same
// expectation: C = m - E log2 sum_x' exp(-(|x + n - x'|^2 -
// |n|^2) / N0), common practice).
#include "sim/families/apsk16_constellation.h"

#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <complex>
#include <numbers>
#include <random>
#include <vector>

#include "analysis/capacity.h"
#include "analysis/constellation_bounds.h"
#include "analysis/fading_theory.h"
#include "analysis/uncoded_theory.h"
#include "blocks/channel/channel_spec.h"
#include "blocks/mapping/mapper.h"
#include "sim/chain/registry.h"

namespace capgap {
namespace {

constexpr double kPi = std::numbers::pi;

// Points by label, as Mapper builds them.
std::vector<cf32> PointsByLabel() {
  const Modulation m = ParseConstellation("16apsk").value();
  const Mapper mapper = Mapper::Create(m).value();
  return {mapper.points().begin(), mapper.points().end()};
}

TEST(Apsk16, ParsesThroughTheRegistryInAnyCase) {
  const Result<Modulation> a = ParseConstellation("16APSK");
  ASSERT_TRUE(a.ok()) << a.status().message();
  EXPECT_EQ(a.value().family, ModulationFamily::kGeneric);
  EXPECT_EQ(a.value().order, 16);
  EXPECT_EQ(ToString(a.value()), "16apsk");
  EXPECT_EQ(a.value(), ParseConstellation("16apsk").value());
  EXPECT_NE(ConstellationChoices().find("16apsk"), std::string::npos);
  EXPECT_FALSE(ParseModulation("16apsk").ok());  // not a PSK/QAM word
}

TEST(Apsk16, TwoRingsWithTheStatedRatioPhasesAndUnitEnergy) {
  const GenericConstellation c = Make16Apsk();
  ASSERT_EQ(c.points.size(), 16u);
  double energy = 0.0;
  std::vector<double> inner, outer;
  for (const cf32& x : c.points) {
    energy += std::norm(std::complex<double>(x));
    (std::abs(x) < 0.8f ? inner : outer).push_back(std::arg(std::complex<double>(x)));
  }
  EXPECT_NEAR(energy / 16.0, 1.0, 1e-6);
  ASSERT_EQ(inner.size(), 4u);
  ASSERT_EQ(outer.size(), 12u);
  EXPECT_NEAR(std::abs(c.points[0]) / std::abs(c.points[12]), 2.85, 1e-6);
  for (double phase : inner) {
    const double k = (phase - kPi / 4.0) / (kPi / 2.0);
    EXPECT_NEAR(k, std::round(k), 1e-6) << phase;
  }
  for (double phase : outer) {
    const double k = (phase - kPi / 12.0) / (kPi / 6.0);
    EXPECT_NEAR(k, std::round(k), 1e-6) << phase;
  }
  // At ratio 2.85 the closest pairs are the inner ring's neighbours:
  // d_min = sqrt(2) R1 with R1 = sqrt(16 / (4 + 12 * 2.85^2)) (arithmetic).
  const double r1 = std::sqrt(16.0 / (4.0 + 12.0 * 2.85 * 2.85));
  EXPECT_NEAR(analysis::NormalisedMinimumDistance(c.points), std::sqrt(2.0) * r1, 1e-6);
}

TEST(Apsk16, RingNeighboursDifferInOneBitAndInnerPointsAsStated) {
  const GenericConstellation c = Make16Apsk();
  auto bits = [&](int i, int j) {
    return std::popcount(c.labels[static_cast<std::size_t>(i)] ^ c.labels[static_cast<std::size_t>(j)]);
  };
  for (int k = 0; k < 12; ++k) EXPECT_EQ(bits(k, (k + 1) % 12), 1) << "outer " << k;
  for (int q = 0; q < 4; ++q) {
    const int inner = 12 + q;
    EXPECT_EQ(bits(inner, 12 + (q + 1) % 4), 1) << "inner " << q;
    // Its outer neighbours at -30, 0, +30 degrees: outer points 3q, 3q+1, 3q+2.
    EXPECT_EQ(bits(inner, 3 * q), 1) << q;
    EXPECT_EQ(bits(inner, 3 * q + 1), 2) << q;
    EXPECT_EQ(bits(inner, 3 * q + 2), 1) << q;
  }
}

// Monte Carlo estimate of the CM capacity and its standard error.
struct Estimate {
  double mean, se;
};
Estimate MonteCarloCmCapacity(const std::vector<cf32>& points, double esno_db, int samples) {
  const double n0 = std::pow(10.0, -esno_db / 10.0);
  std::mt19937_64 rng(1205);
  std::normal_distribution<double> noise(0.0, std::sqrt(n0 / 2.0));
  double sum = 0.0, sum2 = 0.0;
  for (int t = 0; t < samples; ++t) {
    const std::complex<double> x(points[static_cast<std::size_t>(t) % points.size()]);
    const std::complex<double> n(noise(rng), noise(rng));
    double s = 0.0;
    for (const cf32& p : points) {
      const std::complex<double> d = x + n - std::complex<double>(p);
      s += std::exp(-(std::norm(d) - std::norm(n)) / n0);
    }
    const double v = 4.0 - std::log2(s);
    sum += v;
    sum2 += v * v;
  }
  const double mean = sum / samples;
  return {mean, std::sqrt((sum2 / samples - mean * mean) / samples)};
}

TEST(Apsk16, QuadratureCapacityWorksForItsPoints) {
  const std::vector<cf32> points = PointsByLabel();
  // 40000 samples: standard error about 0.005 bit; +-4 standard errors
  // (common practice) plus the quadrature's own error (far smaller).
  for (double esno_db : {4.0, 10.0, 16.0}) {
    const double cm = analysis::ConstrainedCapacity(points, esno_db);
    const double bicm = analysis::BicmCapacity(points, esno_db);
    const Estimate mc = MonteCarloCmCapacity(points, esno_db, 40000);
    EXPECT_NEAR(cm, mc.mean, 4.0 * mc.se + 1e-3) << esno_db << " dB, se " << mc.se;
    EXPECT_LE(bicm, cm + 1e-9) << esno_db;  // BICM never above CM (Caire et al. 1998)
    EXPECT_GT(bicm, cm - 0.2) << esno_db;   // Gray-like labelling: close to CM
    EXPECT_LT(cm, std::log2(1.0 + std::pow(10.0, esno_db / 10.0))) << esno_db;  // Shannon
  }
  EXPECT_NEAR(analysis::ConstrainedCapacity(points, 30.0), 4.0, 1e-6);
  // A finite CM limit once a code lowers rho below m = 4.
  EXPECT_TRUE(std::isfinite(analysis::ConstrainedMinEbnoDb(points, 3.0)));
}

TEST(Apsk16, UncodedTheoryIsTheUnionBoundAndFadingTheoryIsNaN) {
  const Modulation m = ParseConstellation("16apsk").value();
  EXPECT_FALSE(analysis::UncodedTheoryIsExact(m));
  const double esno = std::pow(10.0, (12.0 + 10.0 * std::log10(4.0)) / 10.0);
  EXPECT_DOUBLE_EQ(analysis::UncodedBer(m, 12.0), analysis::UnionBoundBer(PointsByLabel(), esno));
  EXPECT_DOUBLE_EQ(analysis::UncodedSer(m, 12.0), analysis::UnionBoundSer(PointsByLabel(), esno));
  // No MGF form for generic points (analysis/fading_theory.h): NaN on fading
  // channels, the union bound itself on plain AWGN.
  ChannelSpec rayleigh;
  rayleigh.law = FadingLaw::kRayleigh;
  EXPECT_TRUE(std::isnan(analysis::FadingBer(m, rayleigh, 12.0)));
  EXPECT_TRUE(std::isnan(analysis::FadingSer(m, rayleigh, 12.0)));
  EXPECT_DOUBLE_EQ(analysis::FadingBer(m, ChannelSpec{}, 12.0), analysis::UncodedBer(m, 12.0));
}

}  // namespace
}  // namespace capgap
