// Fading schemes keep the engine's guarantees: counts identical for 1, 2 and
// 3 threads, a point continued from any saved prefix (resume) or with a
// raised target (extension) equals the uninterrupted run. Block and Doppler
// processes start afresh in every work unit, so a unit's counts depend only
// on (seed, scheme, point, unit).
#include <gtest/gtest.h>

#include <string>

#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

RunConfig FadingConfig(std::uint64_t stop_bit_errors, const std::string& scheme_keys) {
  const std::string text = "[sweep]\nebno_db = 8\nstop_bit_errors = " +
                           std::to_string(stop_bit_errors) +
                           "\nstop_bits = 100000000\nseed = 5\n[scheme.s]\n" + scheme_keys;
  auto r = ParseRunConfig(text, "fading_resume_test", {});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.value();
}

// Uncoded 16-QAM, Doppler Rician with 2-branch MRC; and a convolutional
// code over block Rayleigh fading with a random interleaver over 2 frames.
const char* const kSchemes[] = {
    "modulation = 16qam\ndemapper = maxlog\nframe_bits = 480\nunit_frames = 2\n"
    "channel = rician\nrician_k_db = 3\nfading = doppler\ndoppler = 0.02\nbranches = 2\n",
    "modulation = qpsk\ndemapper = maxlog\nframe_bits = 240\nunit_frames = 2\ncode = conv\n"
    "generators = 5,7\nconstraint_length = 3\nchannel = rayleigh\nfading = block\n"
    "coherence_symbols = 50\ninterleaver = random\ninterleaver_frames = 2\n",
};

PointStart SerialPrefix(const Chain& chain, double ebno_db, std::uint32_t k) {
  const auto channel = MakePointChannel(chain, ebno_db);
  ChainWorkspace ws = chain.MakeWorkspace();
  PointStart s;
  s.units = k;
  for (std::uint32_t u = 0; u < k; ++u) s.counts += chain.RunUnit(*channel, 0, u, ws);
  return s;
}

TEST(FadingResume, ThreadsResumeAndExtensionGiveTheSameCounts) {
  for (const char* keys : kSchemes) {
    const RunConfig cfg = FadingConfig(400, keys);
    const Chain chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed).value();
    EngineOptions eo;
    eo.threads = 1;
    const PointResult whole = RunPoint(chain, cfg.sweep, 0, 8.0, eo);
    ASSERT_EQ(whole.stop_reason, StopReason::kStopBitErrors) << keys;
    ASSERT_GT(whole.units, 8u) << keys;
    for (int threads : {2, 3}) {
      eo.threads = threads;
      const PointResult r = RunPoint(chain, cfg.sweep, 0, 8.0, eo);
      EXPECT_EQ(r.counts, whole.counts) << keys << " threads " << threads;
      EXPECT_EQ(r.units, whole.units);
      for (std::uint32_t k : {1u, static_cast<std::uint32_t>(whole.units / 2)}) {
        const PointResult c = RunPoint(chain, cfg.sweep, 0, 8.0, eo, SerialPrefix(chain, 8.0, k));
        EXPECT_EQ(c.counts, whole.counts) << keys << " resumed at " << k;
        EXPECT_EQ(c.units, whole.units);
      }
    }
    // Extension: a finished point with a raised target continues.
    const RunConfig larger = FadingConfig(1200, keys);
    eo.threads = 2;
    const PointResult big = RunPoint(chain, larger.sweep, 0, 8.0, eo);
    const PointStart start{static_cast<std::uint32_t>(whole.units), whole.counts, whole.seconds};
    const PointResult extended = RunPoint(chain, larger.sweep, 0, 8.0, eo, start);
    EXPECT_EQ(extended.counts, big.counts) << keys;
    EXPECT_EQ(extended.units, big.units) << keys;
  }
}

// Running the same unit twice in one workspace (after other units) gives the
// same counts: no process state leaks from one unit into the next.
TEST(FadingResume, UnitCountsDoNotDependOnWhatRanBefore) {
  for (const char* keys : kSchemes) {
    const RunConfig cfg = FadingConfig(100, keys);
    const Chain chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed).value();
    const auto channel = MakePointChannel(chain, 8.0);
    ChainWorkspace fresh = chain.MakeWorkspace(), used = chain.MakeWorkspace();
    const UnitCounts a = chain.RunUnit(*channel, 0, 5, fresh);
    chain.RunUnit(*channel, 0, 2, used);
    chain.RunUnit(*channel, 0, 9, used);
    EXPECT_EQ(chain.RunUnit(*channel, 0, 5, used), a) << keys;
  }
}

}  // namespace
}  // namespace capgap
