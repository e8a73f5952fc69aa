// End-to-end: simulated uncoded BER of every modulation through the engine
// lies within the 99 % Clopper-Pearson interval of the simulated count around
// the exact closed-form theory, at three Eb/N0 points each. This is the check
// that the chain has no scaling bug (Eb vs Es, N0 per dimension, LLR sign).
//
// Sample size: each point runs to 4000 bit errors (or 4e7 bits), giving a 99 %
// interval of about +-4 % around the measured BER. Theory: BPSK/QPSK Q-function
// (Proakis & Salehi, Digital Communications, 5th ed., ch. 4); square QAM exact
// Gray BER (Cho & Yoon, IEEE Trans. Commun. 50(7), 2002); M-PSK exact Gray BER
// by numerical integration (analysis/uncoded_theory.h). Bit errors inside one
// symbol are slightly correlated for M > 4 (a symbol error can flip two bits),
// which widens the true spread a little beyond the binomial one; the points
// are chosen where symbol errors to non-neighbours are rare. Fixed seed.
#include <cstdio>

#include <gtest/gtest.h>

#include "analysis/uncoded_theory.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

struct Case {
  const char* modulation;
  const char* demapper;
  std::vector<double> ebno_db;  // BER between ~2e-2 and ~1e-3
};

const Case kCases[] = {
    {"bpsk", "hard", {2, 4, 6}},     {"bpsk", "maxlog", {2, 4, 6}},
    {"qpsk", "hard", {2, 4, 6}},     {"qpsk", "maxlog", {2, 4, 6}},
    {"8psk", "hard", {4, 6, 8}},     {"8psk", "maxlog", {4, 6, 8}},
    {"16qam", "hard", {5, 7, 9}},    {"16qam", "maxlog", {5, 7, 9}},
    {"64qam", "hard", {9, 11, 13}},  {"64qam", "maxlog", {9, 11, 13}},
    {"256qam", "hard", {13, 15, 17}}, {"256qam", "maxlog", {13, 15, 17}},
};

// 36 points are checked. Each point's own 99 % interval would miss theory by
// chance with probability 1 % (about 0.36 expected misses in all), so the test
// (a) requires theory inside every point's Bonferroni-corrected interval at
// confidence 1 - 0.01/36 (family-wise 99 %: the whole test fails by chance
// with probability <= 1 %), and (b) allows at most 3 misses of the plain
// per-point 99 % intervals (P(>= 4 of 36 | 1 % each) = 5e-4, binomial).
TEST(UncodedBer, EveryModulationWithin99PercentIntervalOfTheory) {
  int points = 0, misses99 = 0;
  for (const Case& c : kCases) points += static_cast<int>(c.ebno_db.size());
  const double family_confidence = 1.0 - 0.01 / points;
  for (const Case& c : kCases) {
    SweepConfig sweep;
    sweep.ebno_db = c.ebno_db;
    sweep.stop_bit_errors = 4000;
    sweep.stop_bits = 40000000;
    sweep.ber_floor = 0;
    sweep.seed = 20261201;
    SchemeConfig scheme;
    scheme.name = std::string(c.modulation) + "_" + c.demapper;
    auto mod = ParseModulation(c.modulation);
    ASSERT_TRUE(mod.ok());
    scheme.modulation = mod.value();
    scheme.demapper = ParseDemapMethod(c.demapper).value();
    scheme.frame_bits = 3840;
    auto chain = Chain::Create(scheme, sweep.seed);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    EngineOptions eo;
    eo.threads = 2;
    for (std::size_t i = 0; i < c.ebno_db.size(); ++i) {
      const PointResult r =
          RunPoint(chain.value(), sweep, static_cast<std::uint32_t>(i), c.ebno_db[i], eo);
      const double theory = analysis::UncodedBer(mod.value(), c.ebno_db[i]);
      const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, family_confidence);
      const Interval ci99 = ClopperPearson(r.counts.bit_errors, r.counts.bits, 0.99);
      EXPECT_GE(r.counts.bit_errors, 4000u);
      EXPECT_LE(ci.low, theory) << scheme.name << " at " << c.ebno_db[i] << " dB: BER " << r.ber();
      EXPECT_GE(ci.high, theory) << scheme.name << " at " << c.ebno_db[i] << " dB: BER " << r.ber();
      if (theory < ci99.low || theory > ci99.high) {
        ++misses99;
        std::printf("note: %s at %.1f dB: theory %.4e outside the per-point 99%% interval "
                    "[%.4e, %.4e] (%llu errors)\n",
                    scheme.name.c_str(), c.ebno_db[i], theory, ci99.low, ci99.high,
                    static_cast<unsigned long long>(r.counts.bit_errors));
      }
    }
  }
  EXPECT_LE(misses99, 3) << "per-point 99 % misses out of " << points;
}

// The check above has power: a 0.2 dB bookkeeping error (for instance Es/N0
// off by the wrong 10 log10 rho) moves theory outside the same interval.
TEST(UncodedBer, WouldDetectATwoTenthsDbScalingError) {
  SweepConfig sweep;
  sweep.ebno_db = {7};
  sweep.stop_bit_errors = 4000;
  sweep.stop_bits = 40000000;
  sweep.seed = 20261201;
  SchemeConfig scheme;
  scheme.name = "power_check";
  scheme.modulation = ParseModulation("16qam").value();
  scheme.demapper = DemapMethod::kMaxLog;
  scheme.frame_bits = 3840;
  auto chain = Chain::Create(scheme, sweep.seed);
  ASSERT_TRUE(chain.ok());
  EngineOptions eo;
  eo.threads = 2;
  const PointResult r = RunPoint(chain.value(), sweep, 0, 7.0, eo);
  const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, 1.0 - 0.01 / 36);
  EXPECT_GT(analysis::UncodedBer(scheme.modulation, 6.8), ci.high);
  EXPECT_LT(analysis::UncodedBer(scheme.modulation, 7.2), ci.low);
}

}  // namespace
}  // namespace capgap
