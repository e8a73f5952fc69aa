// Polar construction: the beta order against a hand computation, ga and
// bhattacharyya against each other and against their own limits, nested
// information sets, rate matching.
#include "blocks/fec/polar_construction.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <vector>

namespace capgap {
namespace {

std::vector<int> Order(PolarConstruction c, int m, double ecn0_db) {
  std::vector<std::uint8_t> state(std::size_t{1} << m, 0);
  return PolarReliabilityOrder(PolarReliabilities(c, m, std::pow(10.0, ecn0_db / 10), state));
}

TEST(PolarConstruction, BetaOrderForN8AndN16MatchesHandComputation) {
  // PW(i) = sum_j i_j 2^(j/4) (He et al., Globecom 2017). By hand, with
  // b = 2^(1/4) = 1.18921, b^2 = 1.41421, b^3 = 1.68179:
  // N = 8: PW = 0, 1, 1.189, 2.189, 1.414, 2.414, 2.603, 3.603 for i = 0..7.
  EXPECT_EQ(Order(PolarConstruction::kBeta, 3, 0), (std::vector<int>{0, 1, 2, 4, 3, 5, 6, 7}));
  // N = 16 adds PW(8 + i) = 1.682 + PW(i): 1.682, 2.682, 2.871, 3.871, 3.096,
  // 4.096, 4.285, 5.285, interleaving with the above as below.
  EXPECT_EQ(Order(PolarConstruction::kBeta, 4, 0),
            (std::vector<int>{0, 1, 2, 4, 8, 3, 5, 6, 9, 10, 12, 7, 11, 13, 14, 15}));
}

TEST(PolarConstruction, LnPhiInverseRoundTrips) {
  // Each piece of phi is invertible on its range; the pieces meet within a
  // few hundredths (Trifonov 2012 approximation, header comment), so the
  // round trip is checked inside the pieces.
  for (double x : {0.01, 0.3, 0.8, 1.0, 3.0, 9.5, 12.0, 100.0, 1e4, 1e6}) {
    EXPECT_NEAR(PolarInvLnPhi(PolarLnPhi(x)), x, 1e-9 * x + 1e-12) << x;
  }
  EXPECT_EQ(PolarLnPhi(0), 0.0);
  EXPECT_EQ(PolarInvLnPhi(0), 0.0);
  // Monotone decreasing over the joins.
  double prev = 0.0;
  for (double x = 0.01; x < 50; x += 0.01) {
    EXPECT_LT(PolarLnPhi(x), prev + 0.03) << x;
    prev = PolarLnPhi(x);
  }
}

TEST(PolarConstruction, GaMeansPolarizeConservingTheSum) {
  // Variable-node means add, so the best channel of N = 2^m has mean N times
  // the channel's (u_{N-1} sees every coded bit); the worst is below the
  // channel's mean. Checked at m = 15 where ln phi reaches -1e5 (no underflow).
  const int m = 15;
  const double ecn0 = std::pow(10.0, 0.2);
  std::vector<std::uint8_t> state(std::size_t{1} << m, 0);
  const auto r = PolarReliabilities(PolarConstruction::kGa, m, ecn0, state);
  EXPECT_NEAR(r.back(), 4 * ecn0 * (1 << m), 1e-6 * r.back());
  // The worst means shrink doubly exponentially (about 0.49 x^2 per check
  // step for small x) and reach 0 in double after ~10 steps: >= 0, not > 0.
  EXPECT_LT(r.front(), 4 * ecn0);
  EXPECT_GE(r.front(), 0.0);
  for (double x : r) EXPECT_TRUE(std::isfinite(x));
}

TEST(PolarConstruction, GaAndBhattacharyyaAgreeOnExtremesAtHighDesignSnr) {
  // Both constructions put the all-zeros-index channel last and the
  // all-ones first (u_0 is a repetition of the check of every bit, u_{N-1}
  // sees every bit: Arikan 2009), and at a high design SNR they agree on the
  // least and most reliable sets (common practice: the orders differ only in
  // the middle).
  for (int m : {6, 10}) {
    const auto ga = Order(PolarConstruction::kGa, m, 6.0);
    const auto bh = Order(PolarConstruction::kBhattacharyya, m, 6.0);
    EXPECT_EQ(ga.front(), 0);
    EXPECT_EQ(bh.front(), 0);
    EXPECT_EQ(ga.back(), (1 << m) - 1);
    EXPECT_EQ(bh.back(), (1 << m) - 1);
    const std::size_t t = 4;
    std::vector<int> ga_lo(ga.begin(), ga.begin() + t), bh_lo(bh.begin(), bh.begin() + t);
    std::vector<int> ga_hi(ga.end() - t, ga.end()), bh_hi(bh.end() - t, bh.end());
    std::sort(ga_lo.begin(), ga_lo.end());
    std::sort(bh_lo.begin(), bh_lo.end());
    std::sort(ga_hi.begin(), ga_hi.end());
    std::sort(bh_hi.begin(), bh_hi.end());
    EXPECT_EQ(ga_lo, bh_lo) << "m = " << m;
    EXPECT_EQ(ga_hi, bh_hi) << "m = " << m;
  }
}

TEST(PolarConstruction, BhattacharyyaOnErasureChannelRecursion) {
  // Z- = 2Z - Z^2, Z+ = Z^2 is the exact erasure-channel recursion (Arikan
  // 2009): for N = 2 and Z = exp(-Ec/N0) the two values follow by hand.
  const double ecn0 = 0.5, z = std::exp(-ecn0);
  std::vector<std::uint8_t> state(8, 0);
  const auto r = PolarReliabilities(PolarConstruction::kBhattacharyya, 3, ecn0, state);
  // u_7 = Z^8; u_0 = three check steps.
  EXPECT_NEAR(r[7], -std::log(std::pow(z, 8)), 1e-12);
  double z0 = z;
  for (int i = 0; i < 3; ++i) z0 = 2 * z0 - z0 * z0;
  EXPECT_NEAR(r[0], -std::log(z0), 1e-12);
}

TEST(PolarConstruction, InformationSetsAreNestedInK) {
  for (PolarConstruction c :
       {PolarConstruction::kGa, PolarConstruction::kBhattacharyya, PolarConstruction::kBeta}) {
    std::vector<int> prev;
    for (int k = 1; k <= 128; ++k) {
      PolarCodeSpec s{128, k, c, 1.0, PolarRateMatching::kAuto};
      auto code = ConstructPolarCode(s);
      ASSERT_TRUE(code.ok());
      const auto& a = code.value().info_positions;
      ASSERT_EQ(a.size(), static_cast<std::size_t>(k));
      EXPECT_TRUE(std::includes(a.begin(), a.end(), prev.begin(), prev.end()))
          << ToString(c) << " k = " << k;
      prev = a;
    }
  }
}

TEST(PolarConstruction, RateMatchingFreezesIncapableChannels) {
  // E = 100 of N = 128: puncturing freezes u_0..u_27, shortening u_100..u_127.
  PolarCodeSpec s{100, 30, PolarConstruction::kGa, 1.0, PolarRateMatching::kAuto};
  auto p = ConstructPolarCode(s);
  ASSERT_TRUE(p.ok());
  // 30 / 100 <= 7/16: auto punctures (3GPP TS 38.212 §5.4.1.1 rule, from memory).
  EXPECT_EQ(p.value().rate_matching, PolarRateMatching::kPuncture);
  EXPECT_EQ(p.value().mother_length, 128);
  EXPECT_GE(p.value().info_positions.front(), 28);
  s.message_bits = 60;  // 60 / 100 > 7/16: shorten
  auto q = ConstructPolarCode(s);
  ASSERT_TRUE(q.ok());
  EXPECT_EQ(q.value().rate_matching, PolarRateMatching::kShorten);
  EXPECT_LT(q.value().info_positions.back(), 100);
  s.rate_matching = PolarRateMatching::kPuncture;
  s.construction = PolarConstruction::kBeta;
  auto r = ConstructPolarCode(s);
  ASSERT_TRUE(r.ok());
  EXPECT_GE(r.value().info_positions.front(), 28);
  // E a power of two: no rate matching.
  s.length = 64;
  EXPECT_EQ(ConstructPolarCode(s).value().rate_matching, PolarRateMatching::kNone);
}

TEST(PolarConstruction, RefusesOutOfRange) {
  EXPECT_FALSE(ConstructPolarCode({4, 2, PolarConstruction::kGa, 0, PolarRateMatching::kAuto}).ok());
  EXPECT_FALSE(
      ConstructPolarCode({40000, 2, PolarConstruction::kGa, 0, PolarRateMatching::kAuto}).ok());
  EXPECT_FALSE(ConstructPolarCode({64, 65, PolarConstruction::kGa, 0, PolarRateMatching::kAuto}).ok());
  EXPECT_FALSE(ParsePolarConstruction("gauss").ok());
  EXPECT_FALSE(ParsePolarRateMatching("none").ok());
}

}  // namespace
}  // namespace capgap
