// Tests of the distance-spectrum enumeration and the union bound
// (blocks/fec/distance_spectrum.h).
#include "blocks/fec/distance_spectrum.h"

#include <cmath>
#include <cstdint>
#include <vector>

#include "gtest/gtest.h"

namespace capgap {
namespace {

DistanceSpectrum Spectrum(const char* gens, const char* pattern = "", int terms = 10) {
  ConvCodeSpec spec;
  spec.generators = ParseGenerators(gens).value();
  if (pattern[0] != '\0') spec.puncture = ParsePuncturePattern(pattern).value();
  Result<ConvCode> code = ConvCode::Create(spec);
  EXPECT_TRUE(code.ok()) << code.status().message();
  Result<DistanceSpectrum> s = ComputeDistanceSpectrum(code.value(), terms);
  EXPECT_TRUE(s.ok()) << s.status().message();
  return s.value();
}

// Free distances: Proakis & Salehi, Digital Communications, 5th ed., ch. 8
// tables of rate-1/2 codes (from memory): 5, 10, 12.
TEST(DistanceSpectrum, FreeDistancesOfStandardRateHalfCodes) {
  EXPECT_EQ(Spectrum("5,7").free_distance, 5);
  EXPECT_EQ(Spectrum("133,171").free_distance, 10);
  EXPECT_EQ(Spectrum("561,753").free_distance, 12);
}

// K = 3 (5,7): transfer function T(D, N) = D^5 N / (1 - 2 D N) (Viterbi,
// IEEE Trans. Commun. Technol. 19(5), 1971; Proakis & Salehi 5th ed. ch. 8;
// from memory), so a_d = 2^(d-5) and beta_d = dT/dN at N = 1 gives
// D^5 / (1 - 2D)^2: beta_{5+j} = (j + 1) 2^j. Checked for all ten terms.
TEST(DistanceSpectrum, K3MatchesClosedFormTransferFunction) {
  const DistanceSpectrum s = Spectrum("5,7");
  ASSERT_EQ(s.distances.size(), 10u);
  for (int j = 0; j < 10; ++j) {
    EXPECT_EQ(s.distances[static_cast<std::size_t>(j)], 5 + j);
    EXPECT_EQ(s.num_events[static_cast<std::size_t>(j)], std::uint64_t{1} << j) << "d=" << 5 + j;
    EXPECT_EQ(s.info_weight[static_cast<std::size_t>(j)],
              static_cast<std::uint64_t>(j + 1) << j)
        << "d=" << 5 + j;
  }
}

// K = 7 (133,171) information-weight spectrum beta_10..beta_18 =
// 36, 211, 1404, 11633, 77433 (P. Frenger, P. Orten, T. Ottosson,
// "Convolutional codes with optimum distance spectrum", IEEE Commun. Lett.
// 3(11), 1999, and Proakis & Salehi 5th ed. ch. 8; values from memory). Both
// generators have odd weight (5 each), so every codeword has even weight and
// the odd terms must be zero.
TEST(DistanceSpectrum, K7MatchesPublishedInformationWeights) {
  const DistanceSpectrum s = Spectrum("133,171");
  const std::vector<std::uint64_t> expected = {36, 0, 211, 0, 1404, 0, 11633, 0, 77433, 0};
  EXPECT_EQ(s.info_weight, expected);
  EXPECT_EQ(s.num_events[0], 11u);  // a_10 = 11 (same sources, from memory)
  EXPECT_EQ(s.info_bits_per_period, 1);
}

// IEEE Std 802.11a-1999 s17.3.5.6 puncturing of the K = 7 code (patterns
// from memory): rate 3/4 "110,101" has d_free = 5 and rate 2/3 "11,10"
// d_free = 6 (D. Haccoun, G. Begin, "High-rate punctured convolutional codes
// for Viterbi and sequential decoding", IEEE Trans. Commun. 37(11), 1989;
// from memory).
TEST(DistanceSpectrum, PuncturedIeee80211aFreeDistances) {
  const DistanceSpectrum r34 = Spectrum("133,171", "110,101");
  EXPECT_EQ(r34.free_distance, 5);
  EXPECT_EQ(r34.info_bits_per_period, 3);
  const DistanceSpectrum r23 = Spectrum("133,171", "11,10");
  EXPECT_EQ(r23.free_distance, 6);
  EXPECT_EQ(r23.info_bits_per_period, 2);
}

// A puncturing pattern of period 1 with all ones is the mother code: the
// period-P enumeration must reduce to the unpunctured one, and an all-ones
// pattern of period 3 must give 3x the terms (three identical phases).
TEST(DistanceSpectrum, AllOnesPatternReproducesMotherSpectrum) {
  const DistanceSpectrum mother = Spectrum("133,171");
  const DistanceSpectrum p3 = Spectrum("133,171", "111,111");
  EXPECT_EQ(p3.free_distance, mother.free_distance);
  for (std::size_t j = 0; j < mother.info_weight.size(); ++j) {
    EXPECT_EQ(p3.info_weight[j], 3 * mother.info_weight[j]);
  }
}

TEST(DistanceSpectrum, RejectsBadTermCount) {
  ConvCodeSpec spec;
  spec.generators = {05, 07};
  const ConvCode code = ConvCode::Create(spec).value();
  EXPECT_EQ(ComputeDistanceSpectrum(code, 0).status().message(),
            "distance spectrum: num_terms = 0: must be in [1, 30]");
}

// Union bound of the K = 7 code at 4 dB, R = 1/2, against the same sum
// evaluated here term by term with Q(x) = 0.5 erfc(x / sqrt 2) (Proakis &
// Salehi 5th ed. ch. 8 bound; arithmetic written out independently), and the
// leading term alone as a lower bound of the sum.
TEST(UnionBound, EqualsTermwiseSumAndDecreasesWithEbno) {
  const DistanceSpectrum s = Spectrum("133,171");
  const double ebno = std::pow(10.0, 0.4);
  const double beta[] = {36, 211, 1404, 11633, 77433};
  double sum = 0.0;
  for (int j = 0; j < 5; ++j) {
    const double d = 10 + 2 * j;
    sum += beta[j] * 0.5 * std::erfc(std::sqrt(2.0 * d * 0.5 * ebno) / std::sqrt(2.0));
  }
  EXPECT_NEAR(UnionBoundBer(s, 4.0, 0.5), sum, 1e-12 * sum);
  EXPECT_GT(UnionBoundBer(s, 4.0, 0.5), 36 * 0.5 * std::erfc(std::sqrt(10 * 0.5 * ebno)));
  EXPECT_LT(UnionBoundBer(s, 5.0, 0.5), UnionBoundBer(s, 4.0, 0.5));
}

}  // namespace
}  // namespace capgap
