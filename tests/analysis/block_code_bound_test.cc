// Union bounds of block codes (analysis/block_code_bound.h): a value for the
// extended Hamming (8, 4) code computed here from std::erfc, the approach to
// the d_min term at high Eb/N0, monotonicity, and the FER/BER ordering.
#include "analysis/block_code_bound.h"

#include <gtest/gtest.h>

#include <cmath>
#include <vector>

namespace capgap {
namespace {

BlockCode MustBuiltIn(const char* name) {
  Result<BlockCode> r = BlockCode::BuiltIn(name);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

double Q(double x) { return 0.5 * std::erfc(x / std::sqrt(2.0)); }

TEST(BlockCodeBound, ExtendedHammingAt5dBMatchesHandComputedSum) {
  // (8, 4), R = 1/2: A_4 = 14, A_8 = 1 (MacWilliams & Sloane, The Theory of
  // Error-Correcting Codes, 1977, ch. 1; from memory); B_4 = 28, B_8 = 4
  // (B_w = (k/n) w A_w by the code's transitive symmetry, see
  // tests/blocks/fec/block_code_test.cc). Eb/N0 = 5 dB, g = 10^0.5:
  //   FER <= 14 Q(sqrt(4 g)) + Q(sqrt(8 g))            ~ 2.6305e-3
  //   BER <= (28/4) Q(sqrt(4 g)) + (4/4) Q(sqrt(8 g))  ~ 1.3154e-3
  // (Proakis & Salehi, Digital Communications, 5th ed., ch. 7; evaluated
  // here with std::erfc and, for the approximate values, with Python's
  // math.erfc).
  const BlockCode c = MustBuiltIn("hamming8");
  const double g = std::pow(10.0, 0.5);
  const double fer = 14.0 * Q(std::sqrt(4.0 * g)) + Q(std::sqrt(8.0 * g));
  const double ber = 7.0 * Q(std::sqrt(4.0 * g)) + Q(std::sqrt(8.0 * g));
  const std::vector<double> db = {5.0};
  const double f = analysis::BlockCodeFerUnionBound(c.weight_enumerator(), db)[0];
  const double b = analysis::BlockCodeBerUnionBound(c.weight_enumerator(), db)[0];
  EXPECT_NEAR(f, fer, 1e-12 * fer);
  EXPECT_NEAR(b, ber, 1e-12 * ber);
  EXPECT_NEAR(f, 2.6305e-3, 1e-7);
  EXPECT_NEAR(b, 1.3154e-3, 1e-7);
}

TEST(BlockCodeBound, ApproachesTheMinimumDistanceTermAtHighSnr) {
  for (const char* name : {"hamming8", "golay24"}) {
    const BlockCode c = MustBuiltIn(name);
    const BlockWeightEnumerator& e = c.weight_enumerator();
    const auto d = static_cast<std::size_t>(c.min_distance());
    const std::vector<double> db = {4.0, 8.0, 12.0, 16.0};
    const std::vector<double> fer = analysis::BlockCodeFerUnionBound(e, db);
    const std::vector<double> ber = analysis::BlockCodeBerUnionBound(e, db);
    double previous = INFINITY;
    for (std::size_t p = 0; p < db.size(); ++p) {
      const double q =
          Q(std::sqrt(2.0 * static_cast<double>(d) * c.rate() * std::pow(10.0, db[p] / 10.0)));
      const double fer_ratio = fer[p] / (static_cast<double>(e.codewords[d]) * q);
      const double ber_ratio =
          ber[p] / (static_cast<double>(e.info_weight[d]) / static_cast<double>(c.k()) * q);
      EXPECT_GE(fer_ratio, 1.0) << name;
      EXPECT_GE(ber_ratio, 1.0) << name;
      EXPECT_LT(fer_ratio - 1.0, previous) << name << " at " << db[p] << " dB";
      previous = fer_ratio - 1.0;
    }
    EXPECT_LT(previous, 1e-3) << name << ": ratio at 16 dB";
  }
}

TEST(BlockCodeBound, DecreasesWithEbnoAndBerLiesBetweenFerOverKAndFer) {
  for (const char* name : {"hamming8", "golay24"}) {
    const BlockCode c = MustBuiltIn(name);
    std::vector<double> db;
    for (double x = -2.0; x <= 12.0; x += 0.5) db.push_back(x);
    const std::vector<double> fer = analysis::BlockCodeFerUnionBound(c.weight_enumerator(), db);
    const std::vector<double> ber = analysis::BlockCodeBerUnionBound(c.weight_enumerator(), db);
    ASSERT_EQ(fer.size(), db.size());
    for (std::size_t p = 0; p < db.size(); ++p) {
      if (p > 0) {
        EXPECT_LT(fer[p], fer[p - 1]) << name << " at " << db[p];
        EXPECT_LT(ber[p], ber[p - 1]) << name << " at " << db[p];
      }
      // Every nonzero codeword has information weight in [1, k]: A_w <= B_w
      // <= k A_w, so FER / k <= BER <= FER.
      EXPECT_LE(ber[p], fer[p] * (1.0 + 1e-12));
      EXPECT_GE(ber[p], fer[p] / static_cast<double>(c.k()) * (1.0 - 1e-12));
    }
  }
}

}  // namespace
}  // namespace capgap
