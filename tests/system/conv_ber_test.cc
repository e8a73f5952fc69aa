// End-to-end convolutional coding: the K = 7 (133,171) rate-1/2 code with
// soft-decision Viterbi over BPSK on AWGN, through the engine.
//
// References: the soft-decision union bound computed from the code's own
// distance spectrum (blocks/fec/distance_spectrum.h) is tight at 4-4.5 dB, so
// the simulated BER must lie at or below it within the 99 % Clopper-Pearson
// interval; BER 1e-5 is reached near 4.2-4.5 dB, about 5 dB of coding gain
// over uncoded BPSK at 9.59 dB (common practice); hard
// decisions lose about 2 dB against soft (common practice). Bit errors of a
// Viterbi decoder come in bursts, so the binomial interval on bits is too
// narrow by roughly the mean burst length; the checks use a 99 % interval on
// bit errors divided by 5 (a mean error burst of about 5 bits for this code,
// from memory) as the effective sample. Fixed seed; 300-600 errors per point.
#include <cmath>

#include <gtest/gtest.h>

#include "analysis/uncoded_theory.h"
#include "sim/engine/engine.h"
#include "sim/chain/scheme_result.h"

namespace capgap {
namespace {

SchemeConfig K7(const char* decoder) {
  SchemeConfig s;
  s.name = std::string("k7_") + decoder;
  s.modulation = ParseModulation("bpsk").value();
  s.demapper = DemapMethod::kMaxLog;
  s.frame_bits = 1920;
  s.code = "conv";
  s.conv.generators = "133,171";
  s.conv.constraint_length = 7;
  s.conv.decoder = ParseConvDecoderKind(decoder).value();
  return s;
}

// 99 % interval with the sample shrunk by the mean burst length.
Interval BurstInterval(const PointResult& r, double burst = 5.0) {
  const auto k = static_cast<std::uint64_t>(std::llround(static_cast<double>(r.counts.bit_errors) / burst));
  const auto n = static_cast<std::uint64_t>(std::llround(static_cast<double>(r.counts.bits) / burst));
  return ClopperPearson(k, n, 0.99);
}

TEST(ConvBer, SoftViterbiAtOrBelowUnionBoundAt4And4Point5Db) {
  auto chain = Chain::Create(K7("viterbi_soft"), 11);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  SweepConfig sweep;
  sweep.ebno_db = {4.0, 4.5};
  sweep.stop_bit_errors = 600;
  sweep.stop_bits = 400000000;
  sweep.seed = 11;
  const SchemeResult r = AnalyseScheme(chain.value(), sweep, {});
  ASSERT_FALSE(r.theory.ber_bound.empty());
  EngineOptions eo;
  eo.threads = 2;
  for (std::size_t i = 0; i < sweep.ebno_db.size(); ++i) {
    const double x = sweep.ebno_db[i];
    const PointResult p = RunPoint(chain.value(), sweep, static_cast<std::uint32_t>(i), x, eo);
    // Bound on the 0.05 dB theory grid at exactly x.
    double bound = NAN;
    for (std::size_t j = 0; j < r.theory.ebno_db.size(); ++j) {
      if (std::abs(r.theory.ebno_db[j] - x) < 1e-9) bound = r.theory.ber_bound[j];
    }
    ASSERT_TRUE(std::isfinite(bound));
    EXPECT_LE(BurstInterval(p).low, bound) << "at " << x << " dB: BER " << p.ber();
    // Tight: within a factor of 3 below the bound.
    EXPECT_GE(BurstInterval(p).high, bound / 3) << "at " << x << " dB: BER " << p.ber();
  }
}

TEST(ConvBer, ReachesTargetNear4Point2To4Point5DbWithAboutFiveDbGain) {
  auto chain = Chain::Create(K7("viterbi_soft"), 12);
  ASSERT_TRUE(chain.ok());
  SweepConfig sweep;
  sweep.ebno_db = {3.5, 4.0, 4.5, 5.0};
  sweep.stop_bit_errors = 300;
  sweep.stop_bits = 400000000;
  sweep.ber_floor = 1e-6;
  sweep.seed = 12;
  EngineOptions eo;
  eo.threads = 2;
  const SchemeResult r = AnalyseScheme(chain.value(), sweep, RunSweep(chain.value(), sweep, eo));
  // 4.2-4.5 dB (common practice) with 0.15 dB of allowance for the fine
  // (int16) quantisation here versus the 3-bit quantisation of that figure.
  EXPECT_GT(r.summary.ebno_at_target_db, 4.0);
  EXPECT_LT(r.summary.ebno_at_target_db, 4.5);
  EXPECT_NEAR(r.summary.coding_gain_db, 5.3, 0.4);
  EXPECT_NEAR(r.summary.uncoded_ebno_at_target_db, 9.59, 0.01);
  // Constrained limit at rho = R_eff (binary input, rate ~1/2): about 0.19 dB
  // (Richardson & Urbanke, Modern Coding Theory, 2008; from memory).
  EXPECT_NEAR(r.limits.constrained_ebno_db, 0.19, 0.03);
}

TEST(ConvBer, HardDecisionLosesAboutTwoDb) {
  SweepConfig sweep;
  sweep.ebno_db = {5.0};
  sweep.stop_bit_errors = 400;
  sweep.stop_bits = 400000000;
  sweep.seed = 13;
  EngineOptions eo;
  eo.threads = 2;
  auto soft = Chain::Create(K7("viterbi_soft"), 13);
  auto hard = Chain::Create(K7("viterbi_hard"), 13);
  ASSERT_TRUE(soft.ok() && hard.ok());
  // Hard decoding at 5 dB performs like soft decoding near 3 dB: its BER
  // must lie between the soft BERs at 2.5 and 3.5 dB.
  SweepConfig soft_sweep = sweep;
  soft_sweep.ebno_db = {2.5, 3.5};
  const PointResult h = RunPoint(hard.value(), sweep, 0, 5.0, eo);
  const PointResult s25 = RunPoint(soft.value(), soft_sweep, 0, 2.5, eo);
  const PointResult s35 = RunPoint(soft.value(), soft_sweep, 1, 3.5, eo);
  EXPECT_LT(h.ber(), s25.ber());
  EXPECT_GT(h.ber(), s35.ber());
}

TEST(ConvBer, BcjrAtLeastAsGoodAsViterbiWithinInterval) {
  SweepConfig sweep;
  sweep.ebno_db = {3.0};
  sweep.stop_bit_errors = 500;
  sweep.stop_bits = 100000000;
  sweep.seed = 14;
  EngineOptions eo;
  eo.threads = 2;
  auto v = Chain::Create(K7("viterbi_soft"), 14);
  auto b = Chain::Create(K7("bcjr"), 14);
  ASSERT_TRUE(v.ok() && b.ok()) << b.status().message();
  const PointResult pv = RunPoint(v.value(), sweep, 0, 3.0, eo);
  const PointResult pb = RunPoint(b.value(), sweep, 0, 3.0, eo);
  EXPECT_LE(BurstInterval(pb).low, BurstInterval(pv).high) << pb.ber() << " vs " << pv.ber();
}

TEST(ConvBer, CountsIdenticalForOneAndTwoThreads) {
  auto chain = Chain::Create(K7("viterbi_soft"), 15);
  ASSERT_TRUE(chain.ok());
  SweepConfig sweep;
  sweep.ebno_db = {2.0, 3.0};
  sweep.stop_bit_errors = 200;
  sweep.stop_bits = 10000000;
  sweep.seed = 15;
  EngineOptions one, two;
  one.threads = 1;
  two.threads = 2;
  const auto a = RunSweep(chain.value(), sweep, one);
  const auto c = RunSweep(chain.value(), sweep, two);
  ASSERT_EQ(a.size(), c.size());
  for (std::size_t i = 0; i < a.size(); ++i) EXPECT_EQ(a[i].counts, c[i].counts);
}

}  // namespace
}  // namespace capgap
