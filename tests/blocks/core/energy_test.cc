// Energy bookkeeping tests: ComputeNoiseLevel on cases worked by hand from
// the conventions of DEVELOPERS.md, Conventions (Es = 1, Es/N0 = R m Eb/N0, N0 = 1 /
// (Es/N0), sigma = sqrt(N0 / 2), per-sample SNR = Es/N0 - 10 log10 S).
#include "blocks/core/energy.h"

#include <gtest/gtest.h>

#include <cmath>

namespace capgap {
namespace {

// Uncoded BPSK at Eb/N0 = 0 dB: rho = 1 * 1 = 1, Es/N0 = 0 dB = 1, so
// N0 = 1 and sigma = sqrt(1/2) = 0.70711 (arithmetic).
TEST(ComputeNoiseLevel, BpskAtZeroDbHasUnitN0) {
  const NoiseLevel level = ComputeNoiseLevel(
      {.ebno_db = 0.0, .code_rate = 1.0, .bits_per_symbol = 1, .samples_per_symbol = 1});
  EXPECT_DOUBLE_EQ(level.info_bits_per_symbol, 1.0);
  EXPECT_NEAR(level.esno_db, 0.0, 1e-12);
  EXPECT_NEAR(level.n0, 1.0, 1e-12);
  EXPECT_NEAR(level.sigma_per_dim, 0.70710678, 1e-8);
  EXPECT_NEAR(level.per_sample_snr_db, 0.0, 1e-12);
}

// 16-QAM, rate 1/2, Eb/N0 = 3 dB: rho = 0.5 * 4 = 2 information bits per
// symbol; Es/N0 = 3 + 10 log10 2 = 3 + 3.0103 = 6.0103 dB; linear
// 10^0.60103 = 2 * 10^0.3 = 2 * 1.99526 = 3.99052, so N0 = 1 / 3.99052 =
// 0.250594 and sigma = sqrt(0.250594 / 2) = 0.353973 (by hand; the digits
// were confirmed by evaluating the same expressions with Python's math module).
TEST(ComputeNoiseLevel, SixteenQamRateHalfAtThreeDb) {
  const NoiseLevel level = ComputeNoiseLevel(
      {.ebno_db = 3.0, .code_rate = 0.5, .bits_per_symbol = 4, .samples_per_symbol = 1});
  EXPECT_DOUBLE_EQ(level.info_bits_per_symbol, 2.0);
  EXPECT_NEAR(level.esno_db, 6.0103, 1e-4);
  EXPECT_NEAR(level.n0, 0.250594, 1e-6);
  EXPECT_NEAR(level.sigma_per_dim, 0.353973, 1e-6);
  EXPECT_NEAR(level.per_sample_snr_db, 6.0103, 1e-4);
}

// Same point at S = 4 samples per symbol: N0 (per sample, unit-energy pulse)
// is unchanged and the per-sample SNR is 10 log10 4 = 6.0206 dB lower, i.e.
// 6.0103 - 6.0206 = -0.0103 dB.
TEST(ComputeNoiseLevel, OversamplingLowersOnlyThePerSampleSnr) {
  const NoiseLevel level = ComputeNoiseLevel(
      {.ebno_db = 3.0, .code_rate = 0.5, .bits_per_symbol = 4, .samples_per_symbol = 4});
  EXPECT_NEAR(level.esno_db, 6.0103, 1e-4);
  EXPECT_NEAR(level.n0, 0.250594, 1e-6);
  EXPECT_NEAR(level.per_sample_snr_db, -0.0103, 1e-4);
  const NoiseLevel one = ComputeNoiseLevel(
      {.ebno_db = 3.0, .code_rate = 0.5, .bits_per_symbol = 4, .samples_per_symbol = 1});
  EXPECT_NEAR(one.per_sample_snr_db - level.per_sample_snr_db, 6.0206, 1e-4);
}

// 64-QAM, rate 3/4, Eb/N0 = 10 dB: rho = 4.5, Es/N0 = 10 * 4.5 = 45 linear
// (16.532 dB), N0 = 1/45 = 0.022222 (arithmetic).
TEST(ComputeNoiseLevel, SixtyFourQamRateThreeQuarters) {
  const NoiseLevel level = ComputeNoiseLevel(
      {.ebno_db = 10.0, .code_rate = 0.75, .bits_per_symbol = 6, .samples_per_symbol = 1});
  EXPECT_DOUBLE_EQ(level.info_bits_per_symbol, 4.5);
  EXPECT_NEAR(level.esno_db, 16.5321, 1e-4);
  EXPECT_NEAR(level.n0, 1.0 / 45.0, 1e-12);
}

TEST(Energy, DecibelConversionsAreInverse) {
  EXPECT_NEAR(DbToLinear(3.0), 1.99526, 1e-5);  // 10^0.3
  EXPECT_NEAR(DbToLinear(-10.0), 0.1, 1e-15);
  EXPECT_NEAR(LinearToDb(2.0), 3.0103, 1e-4);
  for (double db : {-20.0, -1.59, 0.0, 4.5, 30.0}) {
    EXPECT_NEAR(LinearToDb(DbToLinear(db)), db, 1e-12);
    EXPECT_NEAR(EbnoDbFromEsnoDb(EsnoDbFromEbnoDb(db, 3.0), 3.0), db, 1e-12);
  }
  // rho = 2: Es/N0 is 3.0103 dB above Eb/N0.
  EXPECT_NEAR(EsnoDbFromEbnoDb(0.0, 2.0), 3.0103, 1e-4);
}

}  // namespace
}  // namespace capgap
