// End-to-end with pulse shaping: root-raised-cosine transmit filter at S
// samples per symbol, AWGN of variance N0 per sample, matched filter and
// symbol-rate sampling. Es/N0 at the matched-filter output equals that of the
// unshaped chain (DEVELOPERS.md, energy conventions), so the BER must match the
// uncoded closed form; a timing offset must cost BER; counts stay identical
// across thread counts; the measured 99 % bandwidth sets the spectral
// efficiency.
//
// Sample size: each point runs to 4000 bit errors; 6 points are checked with a
// Bonferroni-corrected interval (confidence 1 - 0.01/6 each: family-wise 99 %).
// Theory: QPSK Q(sqrt(2 Eb/N0)) (Proakis & Salehi, Digital Communications,
// 5th ed., ch. 4); 16-QAM exact Gray BER (Cho & Yoon, IEEE Trans. Commun.
// 50(7), 2002). ISI of the span-16, a = 0.35 RRC pair is -51 dB
// (tests/blocks/shaping/fir_filter_test.cc), negligible at these BERs.
#include <gtest/gtest.h>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "sim/engine/engine.h"
#include "sim/chain/scheme_result.h"

namespace capgap {
namespace {

SchemeConfig Shaped(const char* modulation, double timing_offset = 0) {
  SchemeConfig s;
  s.name = std::string("shaped_") + modulation;
  s.modulation = ParseModulation(modulation).value();
  s.demapper = DemapMethod::kMaxLog;
  s.frame_bits = 3840;
  s.shaping = PulseShape::kRootRaisedCosine;
  s.rolloff = 0.35;
  s.span = 16;
  s.samples_per_symbol = 4;
  s.timing_offset = timing_offset;
  return s;
}

SweepConfig Sweep(std::vector<double> ebno) {
  SweepConfig sweep;
  sweep.ebno_db = std::move(ebno);
  sweep.stop_bit_errors = 4000;
  sweep.stop_bits = 40000000;
  sweep.ber_floor = 0;
  sweep.seed = 77;
  return sweep;
}

TEST(ShapedBer, RrcChainMatchesTheoryWithinFamilyWise99Percent) {
  struct Case { const char* modulation; std::vector<double> ebno; };
  const Case cases[] = {{"qpsk", {2, 4, 6}}, {"16qam", {5, 7, 9}}};
  EngineOptions eo;
  eo.threads = 2;
  for (const Case& c : cases) {
    auto chain = Chain::Create(Shaped(c.modulation), 77);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    const SweepConfig sweep = Sweep(c.ebno);
    for (std::size_t i = 0; i < c.ebno.size(); ++i) {
      const PointResult r = RunPoint(chain.value(), sweep, static_cast<std::uint32_t>(i), c.ebno[i], eo);
      const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, 1.0 - 0.01 / 6);
      const double theory = analysis::UncodedBer(chain.value().scheme().modulation, c.ebno[i]);
      EXPECT_GE(r.counts.bit_errors, 4000u);
      EXPECT_LE(ci.low, theory) << c.modulation << " at " << c.ebno[i] << " dB: BER " << r.ber();
      EXPECT_GE(ci.high, theory) << c.modulation << " at " << c.ebno[i] << " dB: BER " << r.ber();
    }
  }
}

// A sampling offset of a quarter symbol leaves ISI from the neighbouring
// symbols (the RC pulse at +-0.75 T is about 0.2 for a = 0.35) and reduces
// the useful sample: QPSK at 6 dB must lose clearly (more than twice the BER).
TEST(ShapedBer, QuarterSymbolTimingOffsetRaisesBer) {
  EngineOptions eo;
  eo.threads = 2;
  const SweepConfig sweep = Sweep({6});
  auto ideal = Chain::Create(Shaped("qpsk"), 77);
  auto offset = Chain::Create(Shaped("qpsk", 0.25), 77);
  ASSERT_TRUE(ideal.ok() && offset.ok());
  const PointResult a = RunPoint(ideal.value(), sweep, 0, 6.0, eo);
  const PointResult b = RunPoint(offset.value(), sweep, 0, 6.0, eo);
  EXPECT_GT(b.ber_ci.low, 2.0 * a.ber_ci.high) << a.ber() << " vs " << b.ber();
}

TEST(ShapedBer, CountsIdenticalForOneAndTwoThreads) {
  SweepConfig sweep = Sweep({3, 6});
  sweep.stop_bit_errors = 300;
  auto chain = Chain::Create(Shaped("16qam"), 77);
  ASSERT_TRUE(chain.ok());
  EngineOptions one, two;
  one.threads = 1;
  two.threads = 2;
  const auto a = RunSweep(chain.value(), sweep, one);
  const auto b = RunSweep(chain.value(), sweep, two);
  ASSERT_EQ(a.size(), b.size());
  for (std::size_t i = 0; i < a.size(); ++i) EXPECT_EQ(a[i].counts, b[i].counts);
}

// Ideal 99 % power bandwidth of the RC spectrum with a = 0.35 is 1.1667 symbol
// rates (numerical integral of the ideal raised-cosine power spectrum,
// tests/blocks/shaping/spectrum_test.cc); the measured spectral efficiency is
// rho / B99 and the ideal one rho / (1 + a).
TEST(ShapedBer, SpectralEfficiencyUsesMeasuredBandwidth) {
  auto chain = Chain::Create(Shaped("qpsk"), 77);
  ASSERT_TRUE(chain.ok());
  const SweepConfig sweep = Sweep({8});
  const SchemeResult r = AnalyseScheme(chain.value(), sweep, {});
  ASSERT_TRUE(r.spectrum.present);
  EXPECT_NEAR(r.spectrum.occupied_bandwidth_99, 1.1667, 0.03 * 1.1667);
  EXPECT_NEAR(r.spectral_efficiency, 2.0 / r.spectrum.occupied_bandwidth_99, 1e-12);
  EXPECT_NEAR(r.spectral_efficiency_ideal, 2.0 / 1.35, 1e-12);
  EXPECT_NEAR(r.limits.shannon_ebno_db, analysis::ShannonMinEbnoDb(r.spectral_efficiency), 1e-12);
}

}  // namespace
}  // namespace capgap
