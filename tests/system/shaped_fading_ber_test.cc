// Pulse-shaped chains over flat fading at the symbol rate (fading_channel.h):
// each symbol is multiplied by its gain before the RRC transmit filter, AWGN
// of N0 per sample, matched filter, symbol-rate sampling, equalisation with
// the known gain (perfect channel state). The matched filter's sample of
// symbol k is h_k x_k + n_k with n_k ~ CN(0, N0) (the RRC pair is Nyquist),
// so the uncoded BER must equal the exact average BER over the fading law
// (analysis::FadingBer: MGF method, M. K. Simon and M.-S. Alouini, Digital
// Communication over Fading Channels, 2nd ed., ch. 5 and 8).
//
// Sample size and confidence: each point runs to 4000 bit errors (fast
// fading: independent gains, so bit errors of different symbols are
// independent); 6 points are checked with Clopper-Pearson intervals at
// 1 - 0.01/6 each (Bonferroni: family-wise 99 %). ISI of the span-16,
// a = 0.35 RRC pair is -51 dB (tests/blocks/shaping/fir_filter_test.cc),
// negligible at these BERs.
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "analysis/fading_theory.h"
#include "sim/chain/chain.h"
#include "sim/engine/engine.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

SchemeConfig ShapedFading(const char* modulation, FadingLaw law, double k_db) {
  SchemeConfig s;
  s.name = std::string("shaped_fading_") + modulation;
  s.modulation = ParseModulation(modulation).value();
  s.demapper = DemapMethod::kMaxLog;
  s.frame_bits = 3840;
  s.shaping = PulseShape::kRootRaisedCosine;
  s.rolloff = 0.35;
  s.span = 16;
  s.samples_per_symbol = 4;
  s.channel.law = law;
  s.channel.rician_k_db = k_db;
  s.channel.time = FadingTime::kFast;
  return s;
}

SweepConfig Sweep(std::vector<double> ebno) {
  SweepConfig sweep;
  sweep.ebno_db = std::move(ebno);
  sweep.target_errors = 4000;
  sweep.max_bits = 40000000;
  sweep.ber_floor = 0;
  sweep.seed = 78;
  return sweep;
}

// QPSK over Rayleigh and 16-QAM over Rician K = 5 (linear, 6.99 dB).
TEST(ShapedFadingBer, RrcChainMatchesFadingTheoryWithinFamilyWise99Percent) {
  struct Case {
    const char* modulation;
    FadingLaw law;
    double k_db;
    std::vector<double> ebno;
  };
  const Case cases[] = {{"qpsk", FadingLaw::kRayleigh, 0.0, {4, 10, 16}},
                        {"16qam", FadingLaw::kRician, 10.0 * std::log10(5.0), {8, 12, 16}}};
  EngineOptions eo;
  eo.threads = 2;
  for (const Case& c : cases) {
    auto chain = Chain::Create(ShapedFading(c.modulation, c.law, c.k_db), 78);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    ASSERT_TRUE(chain.value().shaped());
    const SweepConfig sweep = Sweep(c.ebno);
    for (std::size_t i = 0; i < c.ebno.size(); ++i) {
      const PointResult r =
          RunPoint(chain.value(), sweep, static_cast<std::uint32_t>(i), c.ebno[i], eo);
      const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, 1.0 - 0.01 / 6);
      const double theory = analysis::FadingBer(chain.value().scheme().modulation,
                                                chain.value().scheme().channel, c.ebno[i]);
      std::printf("%s at %g dB: %llu errors in %llu bits, BER %.4e, theory %.4e\n", c.modulation,
                  c.ebno[i], static_cast<unsigned long long>(r.counts.bit_errors),
                  static_cast<unsigned long long>(r.counts.bits), r.ber(), theory);
      EXPECT_GE(r.counts.bit_errors, 4000u);
      EXPECT_LE(ci.low, theory) << c.modulation << " at " << c.ebno[i] << " dB: BER " << r.ber();
      EXPECT_GE(ci.high, theory) << c.modulation << " at " << c.ebno[i] << " dB: BER " << r.ber();
    }
  }
}

// The fade really reaches the samples: the same shaped QPSK chain over AWGN
// at 10 dB has BER Q(sqrt(20)) = 3.9e-6 (Proakis & Salehi, 5th ed., ch. 4),
// Rayleigh about 2.3e-2 (FIELD_NOTES section 3, Proakis & Salehi ch. 13);
// so a shaped Rayleigh chain below 1e-2 would mean the gains were lost.
TEST(ShapedFadingBer, FadingRaisesBerFarAboveAwgn) {
  auto chain = Chain::Create(ShapedFading("qpsk", FadingLaw::kRayleigh, 0.0), 78).value();
  const SweepConfig sweep = Sweep({10});
  EngineOptions eo;
  eo.threads = 1;
  const PointResult r = RunPoint(chain, sweep, 0, 10.0, eo);
  EXPECT_GT(r.ber(), 1e-2);
}

}  // namespace
}  // namespace capgap
