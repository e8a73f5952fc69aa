// Tests for analysis/capacity: the Shannon limits, constellation-constrained
// and BICM capacities against independent integrations (scipy, offline) and
// an in-test Monte Carlo estimate, their limits at low and high SNR, the
// orderings C_BICM <= C_CM <= log2(1 + SNR), exact identities (QPSK = two
// BPSK channels, rotation invariance), Gauss-Hermite convergence, and the
// Eb/N0 limits for code rates.
#include "analysis/capacity.h"

#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <complex>
#include <limits>
#include <numbers>
#include <random>
#include <vector>

#include "analysis/capacity_quadrature.h"
#include "blocks/core/types.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap::analysis {
namespace {

const Modulation kBpsk{ModulationFamily::kPsk, 2};
const Modulation kQpsk{ModulationFamily::kPsk, 4};
const Modulation k8Psk{ModulationFamily::kPsk, 8};
const Modulation k16Psk{ModulationFamily::kPsk, 16};
const Modulation k16Qam{ModulationFamily::kQam, 16};
const Modulation k64Qam{ModulationFamily::kQam, 64};
const Modulation k256Qam{ModulationFamily::kQam, 256};

std::vector<cf32> Points(const Modulation& modulation) {
  Result<Mapper> mapper = Mapper::Create(modulation);
  EXPECT_TRUE(mapper.ok()) << mapper.status().message();
  const auto points = mapper.value().points();
  return {points.begin(), points.end()};
}

std::vector<cf32> Rotated(std::vector<cf32> points, double radians) {
  const std::complex<double> turn = std::polar(1.0, radians);
  for (cf32& p : points) {
    const std::complex<double> z = std::complex<double>(p) * turn;
    p = cf32(static_cast<float>(z.real()), static_cast<float>(z.imag()));
  }
  return points;
}

double ShannonBits(double esno_db) { return std::log2(1.0 + std::pow(10.0, esno_db / 10.0)); }

int BitsPerSymbol(const std::vector<cf32>& points) { return std::countr_zero(points.size()); }

// ---------------------------------------------------------------- Shannon --

TEST(ShannonHartleyCapacity, OneMegahertzAt20DbIs6Point658Mbits) {
  // C = B log2(1 + S/N) (Shannon, Proc. IRE 1949; from memory): B = 1 MHz at
  // S/N = 100 gives 6.658211 Mbit/s (arithmetic).
  EXPECT_NEAR(ShannonHartleyCapacity(1e6, 20.0), 6.658211483e6, 1.0);
  EXPECT_NEAR(ShannonHartleyCapacity(2e6, 0.0), 2e6, 1e-6);  // log2(2) = 1
}

TEST(ShannonMinEbnoDb, MatchesTheClassicLimits) {
  // eta -> 0: 10 log10(ln 2) = -1.591745 dB (Shannon, Proc. IRE 1949; from
  // memory; value by arithmetic). eta = 1: (2 - 1) / 1 = 1 -> 0 dB;
  // eta = 2: 3 / 2 -> 10 log10(1.5) = 1.760913 dB (Eb/N0 >= (2^eta - 1) / eta,
  // same source; value by arithmetic).
  EXPECT_NEAR(ShannonMinEbnoDb(0.0), -1.591745390, 1e-9);
  EXPECT_NEAR(ShannonMinEbnoDb(1e-12), -1.591745390, 1e-9);
  EXPECT_NEAR(ShannonMinEbnoDb(1e-6),
              -1.591745390 + 10 * std::log10(1 + 1e-6 * std::numbers::ln2 / 2), 1e-9);
  EXPECT_NEAR(ShannonMinEbnoDb(1.0), 0.0, 1e-12);
  EXPECT_NEAR(ShannonMinEbnoDb(2.0), 1.760912591, 1e-9);
}

TEST(ShannonMinEbnoDb, IsFiniteAndIncreasingForLargeEta) {
  // (2^eta - 1) / eta overflows a double beyond eta ~ 1024; the log form
  // must not: eta = 2000 gives 10 (2000 log10 2 - log10 2000) dB.
  EXPECT_NEAR(ShannonMinEbnoDb(2000.0), 10 * (2000 * std::log10(2.0) - std::log10(2000.0)), 1e-9);
  double previous = ShannonMinEbnoDb(0.0);
  for (double eta = 0.01; eta < 40.0; eta *= 1.5) {
    const double v = ShannonMinEbnoDb(eta);
    EXPECT_GT(v, previous) << eta;
    previous = v;
  }
}

// ------------------------------------------------ constrained capacity ----

TEST(ConstrainedCapacity, BpskMatchesIndependentIntegration) {
  // Binary-input AWGN capacity, computed offline with scipy.integrate.quad
  // (adaptive QUADPACK with the kinks as break points, tolerance 1e-13) from
  // C = 1 - E[log2(1 + exp(-4 (1 + n) / N0))], n ~ N(0, N0/2), x = +1 by
  // symmetry (Es = 1): values below.
  struct Point {
    double esno_db;
    double bits;
  };
  for (const Point& p : {Point{-5.0, 0.349513836796}, Point{0.0, 0.721451590790},
                         Point{3.0, 0.912352116906}, Point{6.0, 0.990263800775}}) {
    EXPECT_NEAR(ConstrainedCapacity(Points(kBpsk), p.esno_db), p.bits, 1e-9) << p.esno_db;
  }
}

TEST(ConstrainedCapacity, SixteenQamAndEightPskMatchIndependentIntegration) {
  // scipy, offline, with Mapper's float32 coordinates: 16-QAM as two 4-PAM
  // channels by quad (3.163943237537 at 10 dB); 8-PSK by dblquad in polar
  // coordinates around each point, averaged over all 8 (1.862057539203 at
  // 5 dB). The float rounding of the points alone moves these by ~5e-8.
  EXPECT_NEAR(ConstrainedCapacity(Points(k16Qam), 10.0), 3.163943237537, 1e-9);
  EXPECT_NEAR(ConstrainedCapacity(Points(k8Psk), 5.0), 1.862057539203, 1e-8);
}

TEST(BicmCapacity, SixteenQamAndEightPskMatchIndependentIntegration) {
  // scipy, offline, as above, per bit channel: Gray 16-QAM 1.931573171840 and
  // Gray 8-PSK 1.840766800882 at 5 dB. The 2-D rule for 8-PSK is accurate to
  // ~1e-7 (see GaussHermiteNodeCountsAgree), the 1-D rule to ~1e-9.
  EXPECT_NEAR(BicmCapacity(Points(k16Qam), 5.0), 1.931573171840, 1e-9);
  EXPECT_NEAR(BicmCapacity(Points(k8Psk), 5.0), 1.840766800882, 3e-7);
}

TEST(ConstrainedCapacity, SixteenQamMatchesMonteCarloWithin99PercentBand) {
  // Direct Monte Carlo of C = m - E[log2 sum_x' exp(-(|x + n - x'|^2 -
  // |n|^2) / N0)] on the 2-D constellation (no product split): 1000000 draws
  // of (x, n), fixed seed, n ~ CN(0, N0). Pass if the quadrature value lies
  // within 2.576 standard errors (two-sided 99 %, normal approximation,
  // common practice) of the sample mean.
  const std::vector<cf32> points = Points(k16Qam);
  const double esno_db = 10.0;
  const double n0 = std::pow(10.0, -esno_db / 10.0);
  std::mt19937_64 rng(20240917);
  std::normal_distribution<double> gauss(0.0, std::sqrt(n0 / 2.0));
  std::uniform_int_distribution<std::size_t> pick(0, points.size() - 1);
  constexpr int kDraws = 1000000;
  double sum = 0.0, sum_sq = 0.0;
  for (int i = 0; i < kDraws; ++i) {
    const std::complex<double> x(points[pick(rng)]);
    const std::complex<double> n(gauss(rng), gauss(rng));
    double s = 0.0;
    for (const cf32& q : points) {
      s += std::exp(-(std::norm(x + n - std::complex<double>(q)) - std::norm(n)) / n0);
    }
    const double sample = 4.0 - std::log2(s);
    sum += sample;
    sum_sq += sample * sample;
  }
  const double mean = sum / kDraws;
  const double std_error = std::sqrt((sum_sq / kDraws - mean * mean) / (kDraws - 1));
  const double quadrature = ConstrainedCapacity(points, esno_db);
  EXPECT_LT(std_error, 1.5e-3);  // measured 1.22e-3: the band is +-3.2e-3 bit
  EXPECT_NEAR(quadrature, mean, 2.576 * std_error) << "MC mean " << mean << " +- " << std_error;
}

TEST(ConstrainedCapacity, TendsToBitsPerSymbolAtHighSnr) {
  struct Case {
    Modulation modulation;
    double esno_db;  // where m - C is far below 1e-9
  };
  for (const Case& c : {Case{kBpsk, 20.0}, Case{kQpsk, 22.0}, Case{k8Psk, 28.0}, Case{k16Qam, 30.0},
                        Case{k64Qam, 36.0}, Case{k256Qam, 42.0}}) {
    const std::vector<cf32> points = Points(c.modulation);
    const double m = BitsPerSymbol(points);
    EXPECT_NEAR(ConstrainedCapacity(points, c.esno_db), m, 1e-9) << ToString(c.modulation);
    EXPECT_NEAR(BicmCapacity(points, c.esno_db), m, 1e-9) << ToString(c.modulation);
    // ... and is still measurably below m 10 dB lower.
    EXPECT_LT(ConstrainedCapacity(points, c.esno_db - 10.0), m - 1e-6) << ToString(c.modulation);
  }
}

TEST(ConstrainedCapacity, TendsToShannonCapacityAtLowSnr) {
  // At low SNR every zero-mean constellation achieves log2(1 + SNR) to first
  // order; proper complex ones (QPSK, 8-PSK, QAM) even to second order
  // (V. V. Prelov and S. Verdu, "Second-order asymptotics of mutual
  // information", IEEE Trans. Inf. Theory 50(8), 2004; from memory), while
  // real BPSK loses a relative ~SNR/2 (its gap falls tenfold per 10 dB).
  // Floor: Mapper's float points have E|x|^2 = 1 only to ~1e-7, which shifts
  // C / log2(1 + SNR) by about that much either way.
  const std::vector<cf32> bpsk = Points(kBpsk);
  const double bpsk20 = 1.0 - ConstrainedCapacity(bpsk, -20.0) / ShannonBits(-20.0);
  const double bpsk30 = 1.0 - ConstrainedCapacity(bpsk, -30.0) / ShannonBits(-30.0);
  EXPECT_GT(bpsk20, 0.004);
  EXPECT_LT(bpsk20, 0.006);
  EXPECT_NEAR(bpsk30 / bpsk20, 0.1, 0.005);
  for (const Modulation& modulation : {kQpsk, k8Psk, k16Qam, k256Qam}) {
    const std::vector<cf32> points = Points(modulation);
    const double gap10 = 1.0 - ConstrainedCapacity(points, -10.0) / ShannonBits(-10.0);
    const double gap20 = 1.0 - ConstrainedCapacity(points, -20.0) / ShannonBits(-20.0);
    EXPECT_GT(gap10, 1e-5) << ToString(modulation);  // a real, small loss
    EXPECT_LT(gap10, 2e-4) << ToString(modulation);
    EXPECT_LT(std::abs(gap20), 3e-7) << ToString(modulation);  // ~100x smaller
  }
}

TEST(ConstrainedCapacity, NeverExceedsShannonAndBicmNeverExceedsCm) {
  // Tolerances: float points (relative ~1e-7, see above) for the Shannon
  // bound; 1e-6 bit, the 2-D rule's accuracy, for BICM <= CM on PSK.
  for (const Modulation& modulation : {kBpsk, kQpsk, k8Psk, k16Psk, k16Qam, k64Qam}) {
    const std::vector<cf32> points = Points(modulation);
    for (double esno_db = -10.0; esno_db <= 35.0; esno_db += 1.0) {
      const double cm = ConstrainedCapacity(points, esno_db);
      const double bicm = BicmCapacity(points, esno_db);
      EXPECT_LE(cm, ShannonBits(esno_db) * (1.0 + 2e-7)) << ToString(modulation) << " " << esno_db;
      EXPECT_LE(bicm, cm + 1e-6) << ToString(modulation) << " " << esno_db;
      EXPECT_GE(bicm, 0.0);
    }
  }
}

TEST(BicmCapacity, BelowCmForSixteenQamEqualForQpsk) {
  // Gray QPSK's two bits see independent BPSK channels, so BICM = CM;
  // 16-QAM loses a little to BICM at mid SNR (Caire, Taricco, Biglieri 1998).
  const std::vector<cf32> qpsk = Points(kQpsk);
  const std::vector<cf32> qam = Points(k16Qam);
  for (double esno_db : {-5.0, 0.0, 5.0, 10.0}) {
    EXPECT_NEAR(BicmCapacity(qpsk, esno_db), ConstrainedCapacity(qpsk, esno_db), 1e-12);
    // Also with the full 2-D quadrature, no product split.
    CapacityQuadrature full;
    full.use_structure = false;
    EXPECT_NEAR(BicmCapacity(qpsk, esno_db, full), ConstrainedCapacity(qpsk, esno_db, full), 1e-12);
  }
  EXPECT_GT(ConstrainedCapacity(qam, 5.0) - BicmCapacity(qam, 5.0), 0.02);
  EXPECT_LT(ConstrainedCapacity(qam, 5.0) - BicmCapacity(qam, 5.0), 0.1);
}

TEST(ConstrainedCapacity, QpskIsTwoBpskChannelsAtHalfTheSnr) {
  // QPSK = two independent BPSK channels, each with Es/2 and noise N0/2:
  // C_QPSK(Es/N0) = 2 C_BPSK(Es/(2 N0)) (exact identity). Checked through the
  // product split and through the full 2-D quadrature of rotated QPSK.
  const std::vector<cf32> bpsk = Points(kBpsk);
  const std::vector<cf32> qpsk = Points(kQpsk);
  const std::vector<cf32> qpsk_rotated = Rotated(qpsk, 0.3);
  const double half_db = 10.0 * std::log10(0.5);
  for (double esno_db : {-8.0, -2.0, 0.0, 3.0, 6.0, 9.0, 12.0}) {
    const double two_bpsk = 2.0 * ConstrainedCapacity(bpsk, esno_db + half_db);
    EXPECT_NEAR(ConstrainedCapacity(qpsk, esno_db), two_bpsk, 1e-7) << esno_db;
    EXPECT_NEAR(ConstrainedCapacity(qpsk_rotated, esno_db), two_bpsk, 1e-6) << esno_db;
  }
}

TEST(ConstrainedCapacity, InvariantUnderRotationOfTheConstellation) {
  // Circular noise: rotating every point leaves CM and BICM capacity
  // unchanged. Rotated 16-QAM is no product set, so this compares the exact
  // per-axis split with the generic 2-D quadrature; rotated BPSK compares the
  // real channel with a complex one.
  const std::vector<cf32> qam = Points(k16Qam);
  const std::vector<cf32> qam_rotated = Rotated(qam, 0.3);
  const std::vector<cf32> bpsk = Points(kBpsk);
  const std::vector<cf32> bpsk_rotated = Rotated(bpsk, 1.0);
  for (double esno_db : {0.0, 5.0, 10.0, 15.0}) {
    EXPECT_NEAR(ConstrainedCapacity(qam_rotated, esno_db), ConstrainedCapacity(qam, esno_db), 1e-6)
        << esno_db;
    EXPECT_NEAR(BicmCapacity(qam_rotated, esno_db), BicmCapacity(qam, esno_db), 1e-6) << esno_db;
    EXPECT_NEAR(ConstrainedCapacity(bpsk_rotated, esno_db), ConstrainedCapacity(bpsk, esno_db),
                1e-6)
        << esno_db;
  }
}

TEST(ConstrainedCapacity, StructureShortcutsAgreeWithFullSum) {
  // The product split and the symmetry orbits are exact; the full sum over
  // every transmitted point with the 2-D rule must agree to the 2-D rule's
  // accuracy.
  CapacityQuadrature full;
  full.use_structure = false;
  for (const Modulation& modulation : {k8Psk, k16Psk, k16Qam}) {
    const std::vector<cf32> points = Points(modulation);
    for (double esno_db : {0.0, 6.0, 12.0, 18.0}) {
      EXPECT_NEAR(ConstrainedCapacity(points, esno_db, full), ConstrainedCapacity(points, esno_db),
                  1e-6)
          << ToString(modulation) << " " << esno_db;
      EXPECT_NEAR(BicmCapacity(points, esno_db, full), BicmCapacity(points, esno_db), 1e-6)
          << ToString(modulation) << " " << esno_db;
    }
  }
}

TEST(ConstrainedCapacity, GaussHermiteNodeCountsAgree) {
  // Convergence check: the automatic rules (48/200 nodes in 1-D, 32/96 per
  // dimension in 2-D) against much larger ones (256 in 1-D, 160 per
  // dimension in 2-D) on a 1 dB grid, for the 1-D path (BPSK, 16-QAM, 64-QAM
  // per axis) and the 2-D path (8-PSK, rotated 16-QAM). Must agree to 1e-6 bit.
  CapacityQuadrature big;
  big.nodes_1d = 256;
  big.nodes_2d = 160;
  struct Case {
    const char* name;
    std::vector<cf32> points;
    double max_db;
  };
  const std::vector<Case> cases = {{"bpsk", Points(kBpsk), 16.0},
                                   {"16qam", Points(k16Qam), 26.0},
                                   {"64qam", Points(k64Qam), 32.0},
                                   {"8psk", Points(k8Psk), 24.0},
                                   {"16qam rotated", Rotated(Points(k16Qam), 0.3), 26.0}};
  for (const Case& c : cases) {
    double worst_cm = 0.0, worst_bicm = 0.0;
    for (double esno_db = -10.0; esno_db <= c.max_db; esno_db += 1.0) {
      worst_cm = std::max(worst_cm, std::abs(ConstrainedCapacity(c.points, esno_db) -
                                             ConstrainedCapacity(c.points, esno_db, big)));
      worst_bicm = std::max(worst_bicm, std::abs(BicmCapacity(c.points, esno_db) -
                                                 BicmCapacity(c.points, esno_db, big)));
    }
    EXPECT_LT(worst_cm, 1e-6) << c.name;
    EXPECT_LT(worst_bicm, 1e-6) << c.name;
  }
  // The small 1-D rule alone is NOT adequate at mid SNR (the test can tell):
  // 48 nodes miss the BPSK capacity at 6 dB by more than 1e-6.
  CapacityQuadrature small;
  small.nodes_1d = kSmallNodes1d;
  EXPECT_GT(std::abs(ConstrainedCapacity(Points(kBpsk), 6.0, small) -
                     ConstrainedCapacity(Points(kBpsk), 6.0, big)),
            1e-6);
}

// ------------------------------------------------------- Eb/N0 limits ----

TEST(BinaryInputMinEbnoDb, RateHalfIsAbout0Point19Db) {
  // About 0.19 dB (Richardson & Urbanke, Modern Coding Theory, 2008; from
  // memory); scipy offline (quad capacity + brentq root): 0.1870604 dB.
  EXPECT_NEAR(BinaryInputMinEbnoDb(0.5), 0.187, 0.01);
  EXPECT_NEAR(BinaryInputMinEbnoDb(0.5), 0.1870604, 2e-6);
}

TEST(ConstrainedMinEbnoDb, SixteenQamLimitsMatchIndependentRootFinding) {
  // scipy offline (quad capacity of two 4-PAM channels + brentq): rho = 2
  // 2.1080273 dB, rho = 3 4.5328296 dB.
  EXPECT_NEAR(ConstrainedMinEbnoDb(Points(k16Qam), 2.0), 2.1080273, 2e-6);
  EXPECT_NEAR(ConstrainedMinEbnoDb(Points(k16Qam), 3.0), 4.5328296, 2e-6);
}

TEST(ConstrainedMinEbnoDb, CapacityAtTheLimitEqualsRho) {
  struct Case {
    Modulation modulation;
    double rho;
  };
  for (const Case& c : {Case{kBpsk, 0.5}, Case{kQpsk, 1.0}, Case{k8Psk, 2.0}, Case{k16Qam, 2.0},
                        Case{k16Qam, 3.0}, Case{k64Qam, 4.5}}) {
    const std::vector<cf32> points = Points(c.modulation);
    const double ebno_db = ConstrainedMinEbnoDb(points, c.rho);
    const double esno_db = ebno_db + 10.0 * std::log10(c.rho);
    EXPECT_NEAR(ConstrainedCapacity(points, esno_db), c.rho, 1e-7) << ToString(c.modulation);
    const double bicm_db = BicmMinEbnoDb(points, c.rho);
    EXPECT_NEAR(BicmCapacity(points, bicm_db + 10.0 * std::log10(c.rho)), c.rho, 1e-7)
        << ToString(c.modulation);
    // Ordering: Shannon <= CM <= BICM.
    EXPECT_GT(ebno_db, ShannonMinEbnoDb(c.rho)) << ToString(c.modulation);
    EXPECT_GE(bicm_db, ebno_db - 1e-6) << ToString(c.modulation);
  }
}

TEST(ConstrainedMinEbnoDb, InfiniteAtAndAboveBitsPerSymbol) {
  // The header's contract: rho >= m cannot be reached at finite SNR.
  EXPECT_EQ(ConstrainedMinEbnoDb(Points(kBpsk), 1.0), std::numeric_limits<double>::infinity());
  EXPECT_EQ(ConstrainedMinEbnoDb(Points(kQpsk), 2.0), std::numeric_limits<double>::infinity());
  EXPECT_EQ(ConstrainedMinEbnoDb(Points(k16Qam), 4.5), std::numeric_limits<double>::infinity());
  EXPECT_EQ(BicmMinEbnoDb(Points(k8Psk), 3.0), std::numeric_limits<double>::infinity());
  EXPECT_EQ(BinaryInputMinEbnoDb(1.0), std::numeric_limits<double>::infinity());
  // Just below m the limit is finite and large.
  const double near_full = ConstrainedMinEbnoDb(Points(kQpsk), 1.99);
  EXPECT_TRUE(std::isfinite(near_full));
  EXPECT_GT(near_full, 6.0);
}

TEST(ConstrainedMinEbnoDb, ApproachesShannonLimitAtLowRate) {
  // rho -> 0: every constellation tends to -1.59 dB (Shannon 1949; from
  // memory). At rho = 0.01 QPSK is within 0.01 dB of the Shannon bound for
  // eta = rho (its loss is second order in SNR).
  const double limit = ConstrainedMinEbnoDb(Points(kQpsk), 0.01);
  EXPECT_GT(limit, ShannonMinEbnoDb(0.01));
  EXPECT_LT(limit, ShannonMinEbnoDb(0.01) + 0.01);
  EXPECT_NEAR(BinaryInputMinEbnoDb(0.01), -1.59, 0.05);
}

TEST(ConstrainedMinEbnoDb, TwoFiftySixQamLimitsAreFiniteAndOrdered) {
  // 256-QAM at rho = 6 (a rate-3/4 code): Shannon <= CM < BICM. (Its cost is
  // measured in no unit test: timings belong in benchmarks.)
  const std::vector<cf32> points = Points(k256Qam);
  const double cm = ConstrainedMinEbnoDb(points, 6.0);
  const double bicm = BicmMinEbnoDb(points, 6.0);
  EXPECT_TRUE(std::isfinite(cm));
  EXPECT_GE(cm, ShannonMinEbnoDb(6.0));
  EXPECT_GT(bicm, cm);
}

}  // namespace
}  // namespace capgap::analysis
