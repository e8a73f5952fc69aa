// Tests for analysis/fading_theory: published closed forms (BPSK over
// Rayleigh with L-branch MRC, the E1 form of ergodic capacity, outage of
// block Rayleigh), identities between laws (Nakagami m = 1 is Rayleigh,
// Rician K -> inf is AWGN), the diversity slope, two independent routes to
// the same average (MGF in Craig's form against the density average), and
// a Monte Carlo average of the AWGN error rate over drawn gains.
#include "analysis/fading_theory.h"

#include <gtest/gtest.h>

#include <boost/math/special_functions/binomial.hpp>
#include <cmath>
#include <complex>
#include <limits>
#include <numbers>
#include <random>
#include <vector>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "blocks/mapping/mapper.h"

namespace capgap::analysis {
namespace {

const Modulation kBpsk{ModulationFamily::kPsk, 2};
const Modulation kQpsk{ModulationFamily::kPsk, 4};
const Modulation k8Psk{ModulationFamily::kPsk, 8};
const Modulation k16Psk{ModulationFamily::kPsk, 16};
const Modulation k16Qam{ModulationFamily::kQam, 16};
const Modulation k64Qam{ModulationFamily::kQam, 64};

ChannelSpec Spec(FadingLaw law, int branches = 1, Combining combining = Combining::kMrc) {
  ChannelSpec s;
  s.law = law;
  s.branches = branches;
  s.combining = combining;
  return s;
}

ChannelSpec Rician(double k_db, int branches = 1, Combining combining = Combining::kMrc) {
  ChannelSpec s = Spec(FadingLaw::kRician, branches, combining);
  s.rician_k_db = k_db;
  return s;
}

ChannelSpec Nakagami(double m, int branches = 1, Combining combining = Combining::kMrc) {
  ChannelSpec s = Spec(FadingLaw::kNakagami, branches, combining);
  s.nakagami_m = m;
  return s;
}

std::vector<cf32> Points(const Modulation& modulation) {
  Result<Mapper> mapper = Mapper::Create(modulation);
  EXPECT_TRUE(mapper.ok());
  const auto p = mapper.value().points();
  return {p.begin(), p.end()};
}

double Db(double linear) { return 10.0 * std::log10(linear); }
double Lin(double db) { return std::pow(10.0, db / 10.0); }

// ---- Closed forms ----

// Proakis & Salehi, Digital Communications, 5th ed., ch. 13: BPSK over flat
// Rayleigh with perfect CSI, Pb = 1/2 (1 - sqrt(g / (1 + g))); 2.3269e-2 at
// Eb/N0 = 10 dB (evaluated: 0.5 (1 - sqrt(10/11)) = 0.0232687).
TEST(FadingBer, BpskRayleighMatchesProakisAt10dB) {
  const ChannelSpec rayleigh = Spec(FadingLaw::kRayleigh);
  EXPECT_NEAR(FadingBer(kBpsk, rayleigh, 10.0), 2.3269e-2, 5e-7);
  for (double db = -10.0; db <= 40.0; db += 2.5) {
    const double g = Lin(db);
    const double expected = 0.5 * (1.0 - std::sqrt(g / (1.0 + g)));
    EXPECT_NEAR(FadingBer(kBpsk, rayleigh, db) / expected, 1.0, 1e-8) << db;
  }
}

// Proakis & Salehi, 5th ed., ch. 13: L-branch MRC of BPSK over i.i.d.
// Rayleigh, Pb = ((1-mu)/2)^L sum_k C(L-1+k, k) ((1+mu)/2)^k, against the MGF
// integral in Craig's form, to 1e-8 relative.
TEST(FadingBer, MrcMgfIntegralMatchesClosedFormTo1e8) {
  for (int l = 1; l <= 4; ++l) {
    const ChannelSpec spec = Spec(FadingLaw::kRayleigh, l);
    for (double db = -10.0; db <= 40.0; db += 2.5) {
      const double closed = BpskRayleighMrcBerClosedForm(Lin(db), l);
      EXPECT_NEAR(FadingBer(kBpsk, spec, db) / closed, 1.0, 1e-8) << "L=" << l << " " << db;
    }
  }
  // The closed form itself at L = 1 is the one-branch formula above.
  EXPECT_NEAR(BpskRayleighMrcBerClosedForm(10.0, 1), 0.5 * (1.0 - std::sqrt(10.0 / 11.0)), 1e-15);
}

// QPSK with Gray labels has the BPSK bit error rate at the same Eb/N0 on any
// fading (two independent BPSK rails; common practice).
TEST(FadingBer, QpskBitErrorRateEqualsBpsk) {
  for (const ChannelSpec& spec : {Spec(FadingLaw::kRayleigh, 2), Rician(6.0), Nakagami(2.0)}) {
    for (double db : {0.0, 10.0, 20.0}) {
      EXPECT_NEAR(FadingBer(kQpsk, spec, db) / FadingBer(kBpsk, spec, db), 1.0, 1e-9);
    }
  }
}

// Uncoded decisions are symbol by symbol with perfect CSI, so only the
// marginal law of h matters: fast, block and Doppler fading share one
// average error rate (the statement fading_theory.h documents).
TEST(FadingBer, TimeVariationDoesNotChangeTheUncodedAverage) {
  ChannelSpec fast = Rician(4.0, 2);
  ChannelSpec block = fast, doppler = fast;
  block.time = FadingTime::kBlock;
  block.coherence_symbols = 100;
  doppler.time = FadingTime::kDoppler;
  doppler.doppler = 0.05;
  for (double db : {5.0, 15.0}) {
    EXPECT_EQ(FadingBer(k16Qam, block, db), FadingBer(k16Qam, fast, db));
    EXPECT_EQ(FadingBer(k16Qam, doppler, db), FadingBer(k16Qam, fast, db));
  }
}

// ---- Identities between laws ----

TEST(FadingBer, NakagamiWithMEqualToOneIsRayleigh) {
  for (const Modulation& mod : {kBpsk, k8Psk, k16Qam}) {
    for (int l : {1, 2, 3}) {
      for (double db : {0.0, 8.0, 16.0, 30.0}) {
        const double rayleigh = FadingBer(mod, Spec(FadingLaw::kRayleigh, l), db);
        EXPECT_NEAR(FadingBer(mod, Nakagami(1.0, l), db) / rayleigh, 1.0, 1e-9) << db;
        EXPECT_NEAR(FadingSer(mod, Nakagami(1.0, l), db) /
                        FadingSer(mod, Spec(FadingLaw::kRayleigh, l), db),
                    1.0, 1e-9);
      }
    }
  }
}

// Rician with K -> infinity has no diffuse part: the AWGN curve (common
// practice). The gain variance is (1 + 2K)/(1 + K)^2 ~ 2/K, so the distance
// shrinks about tenfold per 10 dB of K.
TEST(FadingBer, RicianTendsToAwgnAsKGrows) {
  const ChannelSpec awgn;
  for (const Modulation& mod : {kBpsk, k16Qam, k8Psk}) {
    const double db = 8.0;
    const double target = UncodedBer(mod, db);
    double previous = std::numeric_limits<double>::infinity();
    for (double k_db : {10.0, 20.0, 30.0, 40.0, 50.0}) {
      const double distance = std::abs(FadingBer(mod, Rician(k_db), db) / target - 1.0);
      EXPECT_LT(distance, previous) << k_db;
      previous = distance;
    }
    // K = 50 dB: relative distance of order (Var X / 2) (a gamma)^2, below 1e-3.
    EXPECT_LT(previous, 1e-3);
  }
  // And the AWGN spec gives the AWGN functions themselves.
  EXPECT_EQ(FadingBer(k16Qam, awgn, 7.0), UncodedBer(k16Qam, 7.0));
  EXPECT_EQ(FadingSer(k8Psk, awgn, 7.0), UncodedSer(k8Psk, 7.0));
  // AWGN with two MRC branches: array gain of 3.01 dB.
  EXPECT_NEAR(FadingBer(kBpsk, Spec(FadingLaw::kAwgn, 2), 5.0), UncodedBer(kBpsk, 5.0 + Db(2.0)),
              1e-15);
}

// Rician with K = 0 (rician_k_db = -inf) is Rayleigh.
TEST(FadingBer, RicianWithZeroKIsRayleigh) {
  const double rayleigh = FadingBer(k16Qam, Spec(FadingLaw::kRayleigh), 12.0);
  EXPECT_EQ(FadingBer(k16Qam, Rician(-std::numeric_limits<double>::infinity()), 12.0), rayleigh);
  EXPECT_NEAR(FadingBer(k16Qam, Rician(-60.0), 12.0) / rayleigh, 1.0, 1e-5);
}

// Diversity order L: L decades of BER per 10 dB at high SNR (common
// practice; Proakis & Salehi, 5th ed., ch. 13).
TEST(FadingBer, MrcHighSnrSlopeIsLDecadesPer10dB) {
  for (const Modulation& mod : {kBpsk, k16Qam, k8Psk}) {
    for (int l = 1; l <= 4; ++l) {
      const ChannelSpec spec = Spec(FadingLaw::kRayleigh, l);
      const double decades =
          std::log10(FadingBer(mod, spec, 40.0)) - std::log10(FadingBer(mod, spec, 50.0));
      EXPECT_NEAR(decades, l, 0.01) << mod.order << " L=" << l;
    }
  }
  // Nakagami-m with L branches: diversity m L.
  const ChannelSpec n2 = Nakagami(2.0, 2);
  EXPECT_NEAR(std::log10(FadingBer(kBpsk, n2, 40.0)) - std::log10(FadingBer(kBpsk, n2, 50.0)), 4.0,
              0.01);
}

// ---- Two routes to the same average ----

// Selection combining of Rayleigh branches: the product MGF prod k/(k+s)
// equals Simon & Alouini's alternating sum (2nd ed., ch. 9)
// L sum_k (-1)^k C(L-1, k) / (1 + k + s).
TEST(CombinedGain, SelectionRayleighMgfMatchesAlternatingSum) {
  for (int l = 1; l <= 5; ++l) {
    const CombinedGain g =
        CombinedGain::FromSpec(Spec(FadingLaw::kRayleigh, l, Combining::kSelection));
    for (double s : {0.01, 0.3, 1.0, 4.0, 20.0}) {
      double sum = 0.0;
      for (int k = 0; k < l; ++k) {
        sum += (k % 2 == 0 ? 1.0 : -1.0) *
               boost::math::binomial_coefficient<double>(static_cast<unsigned>(l - 1),
                                                         static_cast<unsigned>(k)) *
               l / (1.0 + k + s);
      }
      EXPECT_NEAR(g.Mgf(s) / sum, 1.0, 1e-11) << l << " " << s;
    }
  }
}

// The density average (CombinedGain::Average, used for SC of Rician and
// Nakagami) against the MGF route, on channels where both apply, and the
// numerical SC MGF against the density average.
TEST(FadingBer, DensityAverageAgreesWithMgfRoute) {
  for (const ChannelSpec& spec :
       {Spec(FadingLaw::kRayleigh, 1), Spec(FadingLaw::kRayleigh, 3), Rician(7.0, 2),
        Nakagami(0.7, 2), Spec(FadingLaw::kRayleigh, 2, Combining::kSelection)}) {
    const CombinedGain g = CombinedGain::FromSpec(spec);
    for (double db : {0.0, 10.0, 25.0}) {
      const double by_mgf = FadingBer(k16Qam, spec, db);
      const double by_density =
          g.Average([db](double x) { return UncodedBer(k16Qam, db + Db(x)); });
      EXPECT_NEAR(by_density / by_mgf, 1.0, 1e-7) << db;
    }
  }
  // SC of Nakagami and Rician (tabulated numerical MGF in FadingBer) against
  // the density average of the AWGN rate.
  for (const ChannelSpec& sc :
       {Nakagami(1.5, 2, Combining::kSelection), Nakagami(0.6, 3, Combining::kSelection),
        Rician(6.0, 2, Combining::kSelection)}) {
    const CombinedGain g = CombinedGain::FromSpec(sc);
    for (double db : {0.0, 10.0, 20.0, 35.0}) {
      for (const Modulation& mod : {kBpsk, k16Qam}) {
        const double by_density = g.Average([&](double x) { return UncodedBer(mod, db + Db(x)); });
        EXPECT_NEAR(FadingBer(mod, sc, db) / by_density, 1.0, 1e-6) << db;
      }
    }
  }
}

// SER likewise (the Q^2 terms of QPSK/QAM and Craig's M-PSK integral).
TEST(FadingSer, DensityAverageAgreesWithMgfRoute) {
  for (const ChannelSpec& spec :
       {Rician(7.0, 2), Nakagami(0.8, 1), Nakagami(1.5, 2, Combining::kSelection)}) {
    const CombinedGain g = CombinedGain::FromSpec(spec);
    for (const Modulation& mod : {kQpsk, k16Qam}) {
      for (double db : {3.0, 12.0}) {
        const double by_density = g.Average([&](double x) { return UncodedSer(mod, db + Db(x)); });
        EXPECT_NEAR(FadingSer(mod, spec, db) / by_density, 1.0, 1e-6) << mod.order << " " << db;
      }
    }
  }
  // 8-PSK once (its AWGN SER is itself an integral, so the density route is slow).
  const ChannelSpec spec = Rician(7.0, 2);
  const double by_density = CombinedGain::FromSpec(spec).Average(
      [](double x) { return UncodedSer(k8Psk, 12.0 + Db(x)); });
  EXPECT_NEAR(FadingSer(k8Psk, spec, 12.0) / by_density, 1.0, 1e-6);
}

// The tabulated SC MGF against its defining integral between grid points
// (stated accuracy: 3e-7 relative; measured up to 1.9e-7).
TEST(CombinedGain, TabulatedSelectionMgfWithin3e7) {
  for (const ChannelSpec& sc :
       {Nakagami(1.5, 2, Combining::kSelection), Rician(6.0, 3, Combining::kSelection)}) {
    const CombinedGain g = CombinedGain::FromSpec(sc);
    EXPECT_FALSE(g.closed_form_mgf());
    for (double s = 1.234e-9; s < 1e16; s *= 7.77) {
      EXPECT_NEAR(g.Mgf(s) / g.MgfIntegral(s), 1.0, 3e-7) << s;
    }
  }
}

// Monte Carlo average of the AWGN error rate over drawn gains (an estimate
// independent of both the MGF and the density routes). N = 100000 gains per
// QAM case and 2000 per PSK case (its AWGN rate is itself an integral),
// fixed seed; the sample mean is within 5 standard errors (its own
// sample standard deviation / sqrt(N)) of the exact average: a false failure
// has probability below 1e-6 per case (normal approximation).
TEST(FadingBer, MatchesMonteCarloAverageOfAwgnRate) {
  struct Case {
    Modulation mod;
    ChannelSpec spec;
    double ebno_db;
    int samples;
  };
  const std::vector<Case> cases = {
      {k16Qam, Spec(FadingLaw::kRayleigh), 15.0, 100000},
      {k16Qam, Spec(FadingLaw::kRayleigh, 2), 10.0, 100000},
      {k16Qam, Rician(Db(5.0)), 12.0, 100000},
      {k8Psk, Spec(FadingLaw::kRayleigh), 15.0, 2000},
      {k8Psk, Nakagami(2.0), 10.0, 2000},
      {k16Psk, Rician(6.0, 2, Combining::kSelection), 14.0, 2000},
  };
  std::mt19937_64 rng(20261204);
  for (const Case& c : cases) {
    std::normal_distribution<double> normal(0.0, std::sqrt(0.5));
    std::gamma_distribution<double> gamma(c.spec.nakagami_m, 1.0 / c.spec.nakagami_m);
    const double k = std::pow(10.0, c.spec.rician_k_db / 10.0);
    auto branch_gain = [&]() {
      switch (c.spec.law) {
        case FadingLaw::kNakagami:
          return gamma(rng);
        case FadingLaw::kRician: {
          const std::complex<double> h =
              std::sqrt(k / (k + 1.0)) +
              std::sqrt(1.0 / (k + 1.0)) * std::complex<double>(normal(rng), normal(rng));
          return std::norm(h);
        }
        default:
          return std::norm(std::complex<double>(normal(rng), normal(rng)));
      }
    };
    double sum = 0.0, sum_sq = 0.0;
    for (int i = 0; i < c.samples; ++i) {
      double x = 0.0;
      for (int l = 0; l < c.spec.branches; ++l) {
        const double b = branch_gain();
        x = c.spec.combining == Combining::kMrc ? x + b : std::max(x, b);
      }
      const double p = UncodedBer(c.mod, c.ebno_db + Db(x));
      sum += p;
      sum_sq += p * p;
    }
    const double mean = sum / c.samples;
    const double sd = std::sqrt(std::max(sum_sq / c.samples - mean * mean, 0.0));
    const double exact = FadingBer(c.mod, c.spec, c.ebno_db);
    EXPECT_NEAR(mean, exact, 5.0 * sd / std::sqrt(static_cast<double>(c.samples)))
        << c.mod.order << " law " << static_cast<int>(c.spec.law);
  }
}

// SER of BPSK equals its BER; SER >= BER for the others; both fall with SNR.
TEST(FadingSer, OrderingAndMonotonicity) {
  const ChannelSpec spec = Rician(3.0, 2);
  EXPECT_NEAR(FadingSer(kBpsk, spec, 7.0) / FadingBer(kBpsk, spec, 7.0), 1.0, 1e-12);
  for (const Modulation& mod : {kQpsk, k8Psk, k16Qam, k64Qam}) {
    double previous = 1.0;
    for (double db = 0.0; db <= 30.0; db += 5.0) {
      const double ser = FadingSer(mod, spec, db);
      EXPECT_GE(ser, FadingBer(mod, spec, db));
      EXPECT_LT(ser, previous);
      previous = ser;
    }
  }
}

// ---- Ergodic capacity ----

// Rayleigh, Gaussian input, receiver CSI: C = log2(e) e^{1/g} E1(1/g)
// (common practice; e.g. Simon & Alouini, 2nd ed., ch. 15) against the
// quadrature over the gain density.
TEST(ErgodicCapacity, RayleighE1FormMatchesQuadrature) {
  const ChannelSpec rayleigh = Spec(FadingLaw::kRayleigh);
  for (double db = -20.0; db <= 40.0; db += 5.0) {
    EXPECT_NEAR(ErgodicGaussianCapacity(rayleigh, db) / RayleighErgodicCapacityClosedForm(Lin(db)),
                1.0, 1e-8)
        << db;
  }
  // Below AWGN by Jensen; at high SNR the gap is the Euler constant:
  // log2(g) - gamma_E log2(e) (common practice).
  EXPECT_LT(RayleighErgodicCapacityClosedForm(10.0), std::log2(11.0));
  // (The next term is of order log2(e) ln(g) / g: 3e-7 at g = 1e8.)
  EXPECT_NEAR(RayleighErgodicCapacityClosedForm(1e8),
              std::log2(1e8) - 0.5772156649 * std::numbers::log2e, 1e-6);
  // Tiny SNR uses the asymptotic series: C ~ g log2(e).
  EXPECT_NEAR(RayleighErgodicCapacityClosedForm(1e-4) / (1e-4 * std::numbers::log2e), 1.0, 2e-4);
}

// As the spectral efficiency tends to 0 the ergodic Eb/N0 limit with receiver
// CSI tends to the AWGN value 10 log10(ln 2) = -1.59 dB (common practice:
// fading costs nothing in the wideband limit when the receiver knows h).
// With L MRC branches it is lowered by the array gain 10 log10 L, with SC of
// Rayleigh by 10 log10 of E[X] = 1 + 1/2 + ... + 1/L.
TEST(ErgodicCapacity, LowRateLimitTendsToMinus159dB) {
  const double shannon = 10.0 * std::log10(std::numbers::ln2);
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(Spec(FadingLaw::kRayleigh), 1e-4), shannon, 2e-3);
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(Nakagami(0.6), 1e-4), shannon, 2e-3);
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(Spec(FadingLaw::kRayleigh, 2), 1e-4), shannon - Db(2.0),
              2e-3);
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(Spec(FadingLaw::kRayleigh, 2, Combining::kSelection), 1e-4),
              shannon - Db(1.5), 2e-3);
  // Without fading the ergodic limit is the AWGN one, (2^rho - 1)/rho
  // (Shannon, Proc. IRE, 1949), lowered by the array gain with MRC.
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(ChannelSpec{}, 2.0), ShannonMinEbnoDb(2.0), 1e-5);
  EXPECT_NEAR(ErgodicShannonMinEbnoDb(Spec(FadingLaw::kAwgn, 2), 2.0),
              ShannonMinEbnoDb(2.0) - Db(2.0), 1e-5);
  // At rate 1 fading costs more than AWGN's 0 dB; two branches recover some.
  const double one = ErgodicShannonMinEbnoDb(Spec(FadingLaw::kRayleigh), 1.0);
  EXPECT_GT(one, 0.0);
  EXPECT_LT(ErgodicShannonMinEbnoDb(Spec(FadingLaw::kRayleigh, 2), 1.0), one);
  // Consistency: the capacity at that Eb/N0 is the rate.
  EXPECT_NEAR(RayleighErgodicCapacityClosedForm(Lin(one)), 1.0, 1e-6);
}

// The tabulated AWGN CM/BICM capacity (channel without fading: the ergodic
// average is the table value itself) against direct evaluation between grid
// points; the stated interpolation accuracy is 2e-6 bit.
TEST(ErgodicCapacity, CapacityTableInterpolationWithin2e6Bit) {
  const ChannelSpec awgn;
  for (const Modulation& mod : {kQpsk, k8Psk, k16Qam}) {
    const std::vector<cf32> pts = Points(mod);
    for (double db = -15.13; db <= 25.0; db += 3.37) {
      EXPECT_NEAR(ErgodicConstrainedCapacity(pts, awgn, db), ConstrainedCapacity(pts, db), 2e-6)
          << mod.order << " " << db;
      EXPECT_NEAR(ErgodicBicmCapacity(pts, awgn, db), BicmCapacity(pts, db), 2e-6)
          << mod.order << " " << db;
    }
  }
}

TEST(ErgodicCapacity, ConstrainedLimitsAreOrdered) {
  const std::vector<cf32> qam = Points(k16Qam);
  const ChannelSpec rayleigh = Spec(FadingLaw::kRayleigh);
  const double rho = 2.0;  // rate-1/2 coded 16-QAM
  const double shannon = ErgodicShannonMinEbnoDb(rayleigh, rho);
  const double cm = ErgodicConstrainedMinEbnoDb(qam, rayleigh, rho);
  const double bicm = ErgodicBicmMinEbnoDb(qam, rayleigh, rho);
  EXPECT_LT(shannon, cm);
  EXPECT_LE(cm, bicm + 1e-3);
  // Each fading limit lies above its AWGN counterpart.
  EXPECT_GT(cm, ConstrainedMinEbnoDb(qam, rho));
  EXPECT_GT(shannon, ShannonMinEbnoDb(rho));
  // No fading: the ergodic limit is the AWGN limit (to the table's accuracy).
  EXPECT_NEAR(ErgodicConstrainedMinEbnoDb(qam, ChannelSpec{}, rho), ConstrainedMinEbnoDb(qam, rho),
              2e-3);
  // The capacity at the limit is rho.
  EXPECT_NEAR(ErgodicConstrainedCapacity(qam, rayleigh, cm + Db(rho)), rho, 1e-5);
  // Uncoded (rho = m): unreachable.
  EXPECT_TRUE(std::isinf(ErgodicConstrainedMinEbnoDb(qam, rayleigh, 4.0)));
}

// ---- Outage ----

// Block Rayleigh, Gaussian input: P_out = 1 - exp(-(2^R - 1)/SNR) (common
// practice); two MRC branches: the gamma(2) CDF 1 - e^{-t}(1 + t),
// t = (2^R - 1)/SNR (common practice), evaluated as e^{-t} (expm1(t) - t) to
// avoid cancellation at small t.
TEST(Outage, GaussianRayleighClosedForms) {
  for (double rate : {0.5, 1.0, 2.0, 3.0}) {
    for (double ebno_db = -5.0; ebno_db <= 40.0; ebno_db += 5.0) {
      const double snr = rate * Lin(ebno_db);
      const double t = (std::pow(2.0, rate) - 1.0) / snr;
      EXPECT_NEAR(
          OutageProbabilityGaussian(Spec(FadingLaw::kRayleigh), rate, ebno_db) / -std::expm1(-t),
          1.0, 1e-12);
      EXPECT_NEAR(OutageProbabilityGaussian(Spec(FadingLaw::kRayleigh, 2), rate, ebno_db) /
                      (std::exp(-t) * (std::expm1(t) - t)),
                  1.0, 1e-9);
    }
  }
}

TEST(Outage, QuantileInvertsProbabilityAndConstrainedLiesAbove) {
  const std::vector<cf32> qpsk = Points(kQpsk);
  for (const ChannelSpec& spec :
       {Spec(FadingLaw::kRayleigh), Spec(FadingLaw::kRayleigh, 2), Rician(6.0), Nakagami(2.0, 2),
        Rician(3.0, 2, Combining::kSelection)}) {
    const double rho = 1.0;
    const double th_gauss = GaussianOutageThresholdEsnoDb(rho);
    const double th_cm = OutageThresholdEsnoDb(qpsk, rho);
    EXPECT_GT(th_cm, th_gauss);
    for (double p : {1e-1, 1e-3, 1e-5}) {
      const double ebno = OutageEbnoDbAtProbability(spec, th_gauss, rho, p);
      EXPECT_NEAR(OutageProbabilityGaussian(spec, rho, ebno) / p, 1.0, 1e-6);
      const double ebno_cm = OutageEbnoDbAtProbability(spec, th_cm, rho, p);
      EXPECT_NEAR(OutageProbabilityConstrained(qpsk, spec, rho, ebno_cm) / p, 1.0, 1e-6);
      EXPECT_GT(ebno_cm, ebno);
    }
  }
  // rho = m: the constrained capacity never reaches it, outage is certain.
  EXPECT_EQ(OutageProbabilityConstrained(qpsk, Spec(FadingLaw::kRayleigh), 2.0, 30.0), 1.0);
}

}  // namespace
}  // namespace capgap::analysis
