// Tests for analysis/uncoded_theory: published BPSK values, identities
// between modulations, and the exact PSK/QAM Gray error rates against an
// independent brute-force integration of the 2-D Gaussian over the decision
// regions of the constellation that Mapper actually builds.
#include "analysis/uncoded_theory.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <bit>
#include <boost/math/quadrature/gauss_kronrod.hpp>
#include <boost/math/special_functions/owens_t.hpp>
#include <cmath>
#include <complex>
#include <limits>
#include <numbers>
#include <vector>

#include "blocks/core/types.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap::analysis {
namespace {

using boost::math::quadrature::gauss_kronrod;
constexpr double kPi = std::numbers::pi;

const Modulation kBpsk{ModulationFamily::kPsk, 2};
const Modulation kQpsk{ModulationFamily::kPsk, 4};
const Modulation k8Psk{ModulationFamily::kPsk, 8};
const Modulation k16Psk{ModulationFamily::kPsk, 16};
const Modulation k4Qam{ModulationFamily::kQam, 4};
const Modulation k16Qam{ModulationFamily::kQam, 16};
const Modulation k64Qam{ModulationFamily::kQam, 64};
const Modulation k256Qam{ModulationFamily::kQam, 256};

std::vector<cf32> Points(const Modulation& modulation) {
  Result<Mapper> mapper = Mapper::Create(modulation);
  EXPECT_TRUE(mapper.ok()) << mapper.status().message();
  const auto points = mapper.value().points();
  return {points.begin(), points.end()};
}

double EsN0(const Modulation& modulation, double ebno_db) {
  return std::countr_zero(static_cast<unsigned>(modulation.order)) * std::pow(10.0, ebno_db / 10.0);
}

// ---- Independent reference 1: M-PSK by 2-D integration in polar form. ----
// P(r in sector of phases [a, b]) for r = 1 + n, n ~ CN(0, N0): the 2-D
// Gaussian density integrated over rho in [0, inf) (inner) and theta in
// [a, b] (outer), both adaptive Gauss-Kronrod. Written from the density
// alone: no Craig form, no erfc.
double PolarSectorProbability(double a, double b, double n0) {
  auto over_rho = [n0](double theta) {
    const double c = std::cos(theta);
    const double s = std::sin(theta);
    // |rho e^{j theta} - 1|^2 = (rho - c)^2 + s^2; the s^2 part factors out.
    auto density = [n0, c](double rho) {
      const double d = rho - c;
      return rho * std::exp(-d * d / n0);
    };
    const double peak = std::max(c, 0.0);
    const double span = 40.0 * std::sqrt(n0);
    double inner = gauss_kronrod<double, 31>::integrate(density, 0.0, peak, 20, 1e-11);
    inner += gauss_kronrod<double, 31>::integrate(density, peak, peak + span, 20, 1e-11);
    return std::exp(-s * s / n0) * inner / (kPi * n0);
  };
  return gauss_kronrod<double, 31>::integrate(over_rho, a, b, 20, 1e-10);
}

struct Rates {
  double ser;
  double ber;
};

// Mapper stores float points; the theory assumes the ideal geometry. Float
// rounding (relative ~3e-8) moves high-SNR error rates by ~2 a^2 times that
// (a = distance / sqrt N0), which would blur a 1e-7 comparison, so the
// references snap Mapper's points back to the ideal grid in double: PSK
// phases to odd multiples of pi/M, QAM coordinates to odd multiples of
// 1/sqrt(2 (M - 1) / 3). Labels (which point carries which bits) stay
// Mapper's.
std::vector<double> PskPhases(const Modulation& modulation) {
  const std::vector<cf32> points = Points(modulation);
  const int order = modulation.order;
  std::vector<double> phases;
  for (const cf32& p : points) {
    const double k = std::round(std::arg(std::complex<double>(p)) * order / (2 * kPi) - 0.5);
    phases.push_back(2 * kPi * (k + 0.5) / order);
  }
  return phases;
}

// Averages over every transmitted label, decision = nearest point's sector.
// Rotational symmetry of the snapped geometry makes the sector probability a
// function of the phase offset only, so it is integrated once per offset.
Rates PskRatesBruteForce(const Modulation& modulation, double ebno_db) {
  const std::vector<double> phases = PskPhases(modulation);
  const int order = modulation.order;
  const int m = std::countr_zero(static_cast<unsigned>(order));
  const double n0 = 1.0 / EsN0(modulation, ebno_db);
  // Offset 0 (a correct decision) is not needed: Ps sums the other sectors,
  // which avoids 1 - (1 - Ps) cancellation.
  std::vector<double> by_offset(static_cast<std::size_t>(order), 0.0);
  for (int d = 1; d <= order / 2; ++d) {  // offsets d and M - d mirror
    const double centre = 2 * kPi * d / order;
    by_offset[static_cast<std::size_t>(d)] =
        PolarSectorProbability(centre - kPi / order, centre + kPi / order, n0);
    by_offset[static_cast<std::size_t>((order - d) % order)] =
        by_offset[static_cast<std::size_t>(d)];
  }
  double wrong = 0.0, bit_errors = 0.0;
  for (int k = 0; k < order; ++k) {
    for (int j = 0; j < order; ++j) {
      if (j == k) continue;
      const double offset =
          phases[static_cast<std::size_t>(j)] - phases[static_cast<std::size_t>(k)];
      const int d = static_cast<int>(std::lround(offset * order / (2 * kPi)) + order) % order;
      const double p = by_offset[static_cast<std::size_t>(d)];
      wrong += p;
      bit_errors += p * std::popcount(static_cast<unsigned>(j ^ k));
    }
  }
  return {wrong / order, bit_errors / (order * m)};
}

// ---- Independent reference 2: square QAM over rectangular regions. ----
// The decision region of a point is a rectangle (unbounded at the edge);
// the 2-D Gaussian density over it factorises into two 1-D integrals of
// exp(-(y - level)^2 / N0) / sqrt(pi N0), done by adaptive Gauss-Kronrod.
Rates QamRatesBruteForce(const Modulation& modulation, double ebno_db) {
  const std::vector<cf32> points = Points(modulation);
  const int order = modulation.order;
  const int m = std::countr_zero(static_cast<unsigned>(order));
  const double n0 = 1.0 / EsN0(modulation, ebno_db);
  const double unit = 1.0 / std::sqrt(2.0 * (order - 1) / 3.0);
  const auto count = static_cast<std::size_t>(std::lround(std::sqrt(order)));
  // levels[i] = (2 i - L + 1) * unit, ascending; a float coordinate maps back
  // to its index by rounding.
  std::vector<double> levels(count);
  for (std::size_t i = 0; i < count; ++i) {
    levels[i] = (2.0 * static_cast<double>(i) - static_cast<double>(count) + 1.0) * unit;
  }
  auto level_index = [count, unit](float v) {
    return static_cast<std::size_t>(
        std::lround((v / unit + static_cast<double>(count) - 1.0) / 2.0));
  };
  constexpr double kInf = std::numeric_limits<double>::infinity();
  // axis[i * count + j] = P(decide level j | level i sent) on one axis.
  std::vector<double> axis(count * count);
  for (std::size_t i = 0; i < count; ++i) {
    for (std::size_t j = 0; j < count; ++j) {
      const double lo = j == 0 ? -kInf : 0.5 * (levels[j - 1] + levels[j]);
      const double hi = j + 1 == count ? kInf : 0.5 * (levels[j] + levels[j + 1]);
      const double mean = levels[i];
      auto density = [mean, n0](double y) {
        return std::exp(-(y - mean) * (y - mean) / n0) / std::sqrt(kPi * n0);
      };
      axis[i * count + j] = gauss_kronrod<double, 31>::integrate(density, lo, hi, 20, 1e-13);
    }
  }
  double wrong = 0.0, bit_errors = 0.0;
  for (int k = 0; k < order; ++k) {
    const cf32 x = points[static_cast<std::size_t>(k)];
    for (int j = 0; j < order; ++j) {
      if (j == k) continue;  // Ps sums the wrong regions: no cancellation
      const cf32 z = points[static_cast<std::size_t>(j)];
      const double p = axis[level_index(x.real()) * count + level_index(z.real())] *
                       axis[level_index(x.imag()) * count + level_index(z.imag())];
      wrong += p;
      bit_errors += p * std::popcount(static_cast<unsigned>(j ^ k));
    }
  }
  return {wrong / order, bit_errors / (order * m)};
}

TEST(QFunction, MatchesTabulatedValues) {
  // Q(0) = 1/2 (symmetry); Q(1), Q(3): evaluated with scipy.special.erfc
  // (0.5 erfc(x / sqrt 2)), 1.586552539314571e-01 and 1.349898031630096e-03.
  EXPECT_DOUBLE_EQ(QFunction(0.0), 0.5);
  EXPECT_NEAR(QFunction(1.0), 1.586552539314571e-01, 1e-15);
  EXPECT_NEAR(QFunction(3.0) / 1.349898031630096e-03, 1.0, 1e-13);
}

TEST(InverseQ, InvertsQFunctionAndMatchesScipy) {
  // Q^-1(1e-5) = 4.264890793922826 (scipy: sqrt(2) * erfcinv(2e-5)).
  EXPECT_NEAR(InverseQ(1e-5), 4.264890793922826, 1e-12);
  for (double p : {0.49, 0.1, 1e-3, 1e-9, 1e-30}) {
    EXPECT_NEAR(QFunction(InverseQ(p)) / p, 1.0, 1e-12) << p;
  }
  EXPECT_TRUE(std::isnan(InverseQ(0.0)));
  EXPECT_TRUE(std::isnan(InverseQ(-0.1)));
}

TEST(UncodedBer, BpskMatchesPublishedValues) {
  // Pb = Q(sqrt(2 Eb/N0)) (Proakis & Salehi, Digital Communications, 5th ed.,
  // ch. 4): 1.2501e-2 at 4 dB; at 9.59 dB 1e-5 (common practice). Re-evaluated
  // with scipy.special.erfc: 1.2500818041e-02 and 9.9530021768e-06.
  EXPECT_NEAR(UncodedBer(kBpsk, 4.0), 1.2501e-2, 0.00005e-2);
  EXPECT_NEAR(UncodedBer(kBpsk, 4.0) / 1.2500818041e-02, 1.0, 1e-9);
  EXPECT_NEAR(UncodedBer(kBpsk, 9.59) / 1e-5, 1.0, 0.005);
  EXPECT_NEAR(UncodedBer(kBpsk, 9.59) / 9.9530021768e-06, 1.0, 1e-9);
  EXPECT_DOUBLE_EQ(UncodedSer(kBpsk, 4.0), UncodedBer(kBpsk, 4.0));
}

TEST(UncodedBer, QpskAnd4QamEqualBpskPerBit) {
  // Gray QPSK = two independent BPSK channels at the same Eb/N0 (Proakis &
  // Salehi, Digital Communications, 5th ed., ch. 4; from memory); Ps = 1 - (1 - p)^2 follows from independence.
  for (double ebno_db : {-5.0, 0.0, 4.0, 9.59, 14.0}) {
    const double p = UncodedBer(kBpsk, ebno_db);
    EXPECT_NEAR(UncodedBer(kQpsk, ebno_db) / p, 1.0, 1e-14) << ebno_db;
    EXPECT_NEAR(UncodedBer(k4Qam, ebno_db) / p, 1.0, 1e-13) << ebno_db;
    // 1 - (1 - p)^2 written as p (2 - p) to avoid cancellation.
    EXPECT_NEAR(UncodedSer(kQpsk, ebno_db) / (p * (2.0 - p)), 1.0, 1e-14);
    EXPECT_NEAR(UncodedSer(k4Qam, ebno_db) / UncodedSer(kQpsk, ebno_db), 1.0, 1e-13);
  }
}

TEST(UncodedBer, PskMatchesBruteForcePolarIntegration) {
  // Reference: PolarSectorProbability above, summed with the Hamming
  // distances of Mapper's labels (independent of Craig's form).
  for (const Modulation& modulation : {k8Psk, k16Psk}) {
    for (double ebno_db : {0.0, 4.0, 8.0, 12.0}) {
      const Rates ref = PskRatesBruteForce(modulation, ebno_db);
      EXPECT_NEAR(UncodedSer(modulation, ebno_db) / ref.ser, 1.0, 1e-7)
          << ToString(modulation) << " " << ebno_db;
      EXPECT_NEAR(UncodedBer(modulation, ebno_db) / ref.ber, 1.0, 1e-7)
          << ToString(modulation) << " " << ebno_db;
    }
  }
}

TEST(UncodedSer, PskMatchesOwensTClosedForm) {
  // Independent closed form of the same probability: with h = sqrt(2 Es/N0)
  // sin(pi/M), Ps = Q(h) + 2 T(h, cot(pi/M)), T = Owen's T function (D. B.
  // Owen, Ann. Math. Statist. 27, 1956; the link to the PSK error region is
  // our own derivation from the wedge geometry). Evaluated with Boost.Math
  // owens_t over a fine grid that crosses both integration regimes.
  for (int order : {8, 16, 32, 64}) {
    const Modulation modulation{ModulationFamily::kPsk, order};
    for (double ebno_db = -6.0; ebno_db <= 30.0; ebno_db += 0.75) {
      const double esno = EsN0(modulation, ebno_db);
      const double h = std::sqrt(2.0 * esno) * std::sin(kPi / order);
      const double ref = QFunction(h) + 2.0 * boost::math::owens_t(h, 1.0 / std::tan(kPi / order));
      if (ref < 1e-300) break;
      EXPECT_NEAR(UncodedSer(modulation, ebno_db) / ref, 1.0, 1e-10) << order << " " << ebno_db;
    }
  }
}

TEST(UncodedBer, SquareQamMatchesBruteForceRegionIntegration) {
  // Reference: QamRatesBruteForce above (independent of Cho & Yoon's sum).
  for (const Modulation& modulation : {k16Qam, k64Qam}) {
    for (double ebno_db : {0.0, 4.0, 8.0, 12.0}) {
      const Rates ref = QamRatesBruteForce(modulation, ebno_db);
      EXPECT_NEAR(UncodedSer(modulation, ebno_db) / ref.ser, 1.0, 1e-7)
          << ToString(modulation) << " " << ebno_db;
      EXPECT_NEAR(UncodedBer(modulation, ebno_db) / ref.ber, 1.0, 1e-7)
          << ToString(modulation) << " " << ebno_db;
    }
  }
}

TEST(UncodedBer, SixteenQamApproachesLeadingErfcTermAtHighSnr) {
  // Pb ~ (3/8) erfc(sqrt(0.4 Eb/N0)) for Gray 16-QAM (Proakis & Salehi, 5th
  // ed., ch. 4; common practice). The neglected terms are (1/4) erfc(3a) -
  // (1/8) erfc(5a), a relative 1e-13 at 10 dB, so 1e-6 is a loose bound there;
  // at 0 dB they are several percent, which the test also checks.
  for (double ebno_db : {10.0, 12.0, 14.0}) {
    const double approx = 0.375 * std::erfc(std::sqrt(0.4 * std::pow(10.0, ebno_db / 10.0)));
    EXPECT_NEAR(UncodedBer(k16Qam, ebno_db) / approx, 1.0, 1e-6) << ebno_db;
  }
  const double approx0 = 0.375 * std::erfc(std::sqrt(0.4));
  EXPECT_GT(std::abs(UncodedBer(k16Qam, 0.0) / approx0 - 1.0), 0.01);
}

TEST(UncodedBer, LargeQamApproachesNearestNeighbourBoundAtHighSnr) {
  // Nearest-neighbour approximation (Proakis & Salehi, 5th ed., ch. 4;
  // common practice): Ps ~ 4 (1 - 1/L) Q(sqrt(3 Es / ((M - 1) N0))) and, with
  // Gray labels, Pb ~ Ps / m. Terms dropped involve Q at three times the
  // argument (relative < 1e-10 at Pb ~ 1e-6); the Ps approximation also drops
  // the (P_L)^2 term, of relative size ~P_L / 2. Tolerance 1e-4.
  struct Case {
    Modulation modulation;
    double ebno_db;
  };
  for (const Case& c :
       {Case{k64Qam, 18.0}, Case{k64Qam, 20.0}, Case{k256Qam, 24.0}, Case{k256Qam, 26.0}}) {
    const int order = c.modulation.order;
    const int m = std::countr_zero(static_cast<unsigned>(order));
    const double levels = std::sqrt(static_cast<double>(order));
    const double q = QFunction(std::sqrt(3.0 * EsN0(c.modulation, c.ebno_db) / (order - 1)));
    const double ser_nn = 4.0 * (1.0 - 1.0 / levels) * q;
    EXPECT_LT(UncodedBer(c.modulation, c.ebno_db), 1e-5);
    EXPECT_NEAR(UncodedSer(c.modulation, c.ebno_db) / ser_nn, 1.0, 1e-4)
        << ToString(c.modulation) << " " << c.ebno_db;
    EXPECT_NEAR(UncodedBer(c.modulation, c.ebno_db) / (ser_nn / m), 1.0, 1e-4)
        << ToString(c.modulation) << " " << c.ebno_db;
  }
}

TEST(UncodedBer, GrayPskBerExceedsSerOverMAndApproachesItAtHighSnr) {
  // Every symbol error costs at least one bit, so Pb >= Ps / m; at high SNR
  // almost all errors go to a neighbour (one bit), so Pb -> Ps / m
  // (Pb ~ Ps / m is the usual high-SNR approximation for Gray PSK: common
  // practice).
  for (const Modulation& modulation : {k8Psk, k16Psk}) {
    const int m = std::countr_zero(static_cast<unsigned>(modulation.order));
    const double low = UncodedBer(modulation, 0.0) / (UncodedSer(modulation, 0.0) / m);
    EXPECT_GT(low, 1.05) << ToString(modulation);
    const double high_db = modulation.order == 8 ? 14.0 : 18.0;
    const double high = UncodedBer(modulation, high_db) / (UncodedSer(modulation, high_db) / m);
    EXPECT_GE(high, 1.0);
    EXPECT_LT(high, 1.001) << ToString(modulation);
  }
}

TEST(UncodedBer, FallsMonotonicallyWithEbno) {
  for (const Modulation& modulation : {kBpsk, k8Psk, k16Psk, k16Qam, k256Qam}) {
    double previous = 0.5;
    for (double ebno_db = -10.0; ebno_db <= 30.0; ebno_db += 0.5) {
      const double ber = UncodedBer(modulation, ebno_db);
      EXPECT_LT(ber, previous) << ToString(modulation) << " " << ebno_db;
      previous = ber;
      if (ber == 0.0) break;
    }
  }
}

TEST(UncodedEbnoDbAtBer, BpskAt1e5Is9Point59Db) {
  // 9.59 dB (common practice); scipy: 10 log10(Q^-1(1e-5)^2 / 2) = 9.587858347.
  EXPECT_NEAR(UncodedEbnoDbAtBer(kBpsk, 1e-5), 9.587858347, 2e-6);
}

TEST(UncodedEbnoDbAtBer, InvertsUncodedBer) {
  for (const Modulation& modulation : {kQpsk, k8Psk, k16Qam, k256Qam}) {
    for (double ber : {1e-2, 1e-5, 1e-9}) {
      const double ebno_db = UncodedEbnoDbAtBer(modulation, ber);
      ASSERT_TRUE(std::isfinite(ebno_db)) << ToString(modulation);
      // 1e-6 dB bracket width moves BER by < 1e-5 relative at these slopes.
      EXPECT_NEAR(UncodedBer(modulation, ebno_db) / ber, 1.0, 1e-5)
          << ToString(modulation) << " " << ber;
    }
  }
}

TEST(UncodedEbnoDbAtBer, UnreachableOrInvalidTargetsGiveNan) {
  EXPECT_TRUE(std::isnan(UncodedEbnoDbAtBer(kBpsk, 0.5)));
  EXPECT_TRUE(std::isnan(UncodedEbnoDbAtBer(kBpsk, 0.0)));
  EXPECT_TRUE(std::isnan(UncodedEbnoDbAtBer(kBpsk, -1e-3)));
  EXPECT_TRUE(std::isnan(UncodedEbnoDbAtBer(Modulation{ModulationFamily::kQam, 8}, 1e-3)));
}

TEST(UncodedTheory, UnsupportedOrdersGiveNan) {
  EXPECT_TRUE(std::isnan(UncodedBer(Modulation{ModulationFamily::kPsk, 3}, 5.0)));
  EXPECT_TRUE(std::isnan(UncodedSer(Modulation{ModulationFamily::kQam, 32}, 5.0)));
  EXPECT_TRUE(std::isnan(UncodedBer(Modulation{ModulationFamily::kQam, 2}, 5.0)));
}

}  // namespace
}  // namespace capgap::analysis
