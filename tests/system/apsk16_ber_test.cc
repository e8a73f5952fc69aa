// End-to-end: simulated uncoded BER of `16apsk` (a generic constellation,
// sim/families/apsk16_constellation.h) through the engine against its theory,
// the union bound over pairwise distances (analysis/constellation_bounds.h;
// Proakis & Salehi, Digital Communications, 5th ed., ch. 4, union bound,
// section from memory). The bound is an upper bound on the bit errors of
// minimum-distance decisions (hard and max-log signs are those decisions;
// bit-wise MAP, the log-MAP signs, has the smallest BER of all, common
// practice), and tight at high SNR where nearest neighbours dominate. So:
//  * the bound must lie above the lower end of each point's interval (the
//    chain is not worse than theory allows), and
//  * at BER ~ 3e-4 (12 dB) the simulation must reach at least 90 % of the
//    bound (its excess there is small: the pairs beyond the
//    nearest neighbours and the overlap of the pairwise regions), which a
//    0.2 dB Eb/N0 bookkeeping error (about 25 % in BER at this slope) fails.
// Sample size: 3000 bit errors per point (99.9 % Clopper-Pearson interval
// about +-6 %), fixed seed.
#include <cstdio>

#include <gtest/gtest.h>

#include "analysis/uncoded_theory.h"
#include "sim/chain/registry.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

TEST(Apsk16Ber, SimulationSitsJustBelowTheUnionBound) {
  for (const char* demapper : {"hard", "maxlog", "logmap"}) {
    SweepConfig sweep;
    sweep.ebno_db = {10.0, 12.0};
    sweep.stop_bit_errors = 3000;
    sweep.stop_bits = 100000000;
    sweep.ber_floor = 0;
    sweep.seed = 20261205;
    SchemeConfig scheme;
    scheme.name = std::string("apsk16_") + demapper;
    scheme.modulation = ParseConstellation("16apsk").value();
    scheme.demapper = ParseDemapMethod(demapper).value();
    scheme.frame_bits = 3840;
    auto chain = Chain::Create(scheme, sweep.seed);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    EngineOptions eo;
    eo.threads = 2;
    for (std::size_t i = 0; i < sweep.ebno_db.size(); ++i) {
      const double ebno_db = sweep.ebno_db[i];
      const PointResult r = RunPoint(chain.value(), sweep, static_cast<std::uint32_t>(i), ebno_db, eo);
      const double bound = analysis::UncodedBer(scheme.modulation, ebno_db);
      const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, 0.999);
      std::printf("%s at %.1f dB: BER %.4e [%.4e, %.4e], union bound %.4e, ratio %.4f\n",
                  scheme.name.c_str(), ebno_db, r.ber(), ci.low, ci.high, bound,
                  r.ber() / bound);
      EXPECT_GE(r.counts.bit_errors, 3000u);
      EXPECT_LE(ci.low, bound) << scheme.name << " at " << ebno_db << " dB";
      if (ebno_db >= 12.0) {
        EXPECT_GE(ci.high, 0.9 * bound) << scheme.name << " at " << ebno_db << " dB";
      }
    }
  }
}

}  // namespace
}  // namespace capgap
