// Sweep engine: counts are bit-identical for any thread count, the stopping
// rule is decided on the prefix of units in index order, and the sweep stops
// at ber_floor or at a point with no errors.
#include "sim/engine/engine.h"

#include <gtest/gtest.h>

#include "blocks/channel/awgn_channel.h"
#include "sim/config/config.h"

namespace capgap {
namespace {

RunConfig MakeConfig(const std::string& modulation, const std::string& demapper,
                     const std::string& ebno, std::uint64_t stop_bit_errors,
                     std::uint64_t stop_bits, const std::string& extra = "") {
  const std::string text = "[sweep]\nebno_db = " + ebno +
                           "\nstop_bit_errors = " + std::to_string(stop_bit_errors) +
                           "\nstop_bits = " + std::to_string(stop_bits) +
                           "\nseed = 42\n[scheme.s]\nmodulation = " + modulation +
                           "\ndemapper = " + demapper + "\nframe_bits = 480\nunit_frames = 4\n" +
                           extra;
  auto r = ParseRunConfig(text, "engine_test", {});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.value();
}

std::vector<PointResult> RunAll(const RunConfig& cfg, int threads) {
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  EngineOptions eo;
  eo.threads = threads;
  return RunSweep(chain.value(), cfg.SweepFor(0), eo);
}

void ExpectSameCounts(const std::vector<PointResult>& a, const std::vector<PointResult>& b) {
  ASSERT_EQ(a.size(), b.size());
  for (std::size_t i = 0; i < a.size(); ++i) {
    EXPECT_EQ(a[i].counts, b[i].counts) << "point " << i;
    EXPECT_EQ(a[i].units, b[i].units) << "point " << i;
    EXPECT_EQ(a[i].stop_reason, b[i].stop_reason) << "point " << i;
  }
}

TEST(Engine, CountsAreIdenticalForOneTwoAndThreeThreads) {
  for (const char* mod : {"bpsk", "16qam", "8psk"}) {
    const RunConfig cfg = MakeConfig(mod, "maxlog", "2 to 6 by 2", 300, 2000000);
    const auto one = RunAll(cfg, 1);
    ExpectSameCounts(one, RunAll(cfg, 2));
    ExpectSameCounts(one, RunAll(cfg, 3));
    ASSERT_FALSE(one.empty());
    EXPECT_GT(one[0].counts.bit_errors, 0u);
  }
}

TEST(Engine, SameSeedSameCountsDifferentSeedDifferentCounts) {
  const RunConfig cfg = MakeConfig("qpsk", "hard", "4", 200, 1000000);
  const auto a = RunAll(cfg, 2);
  ExpectSameCounts(a, RunAll(cfg, 2));
  RunConfig other = cfg;
  other.sweep.seed = 43;
  const auto b = RunAll(other, 2);
  EXPECT_NE(a[0].counts.bit_errors, b[0].counts.bit_errors);
}

// The point stops at the first unit whose prefix reaches stop_bit_errors: the
// prefix without its last unit must still be below the target.
TEST(Engine, StopsAtFirstPrefixReachingStopBitErrors) {
  const RunConfig cfg = MakeConfig("qpsk", "maxlog", "3", 500, 100000000);
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  ASSERT_TRUE(chain.ok());
  EngineOptions eo;
  eo.threads = 2;
  const PointResult r = RunPoint(chain.value(), cfg.sweep, 0, 3.0, eo);
  EXPECT_EQ(r.stop_reason, StopReason::kStopBitErrors);
  EXPECT_GE(r.counts.bit_errors, 500u);
  // Recompute the prefix serially, unit by unit.
  NoiseSpec spec;
  spec.ebno_db = 3.0;
  spec.bits_per_symbol = 2;
  const AwgnChannel channel(spec);
  ChainWorkspace ws = chain.value().MakeWorkspace();
  UnitCounts prefix;
  for (std::uint32_t u = 0; u + 1 < r.units; ++u) {
    prefix += chain.value().RunUnit(channel, 0, u, ws);
  }
  EXPECT_LT(prefix.bit_errors, 500u);
  prefix += chain.value().RunUnit(channel, 0, static_cast<std::uint32_t>(r.units - 1), ws);
  EXPECT_EQ(prefix, r.counts);
  EXPECT_EQ(r.counts.bits, r.units * 4u * 480u);
  EXPECT_EQ(r.counts.frames, r.units * 4u);
}

TEST(Engine, StopsAtStopBitsAndSweepEndsAfterAnErrorFreePoint) {
  // QPSK at 20 dB: Q(sqrt(200)) ~ 1e-45 (same formula; arithmetic), so no
  // error in 1e5 bits; the sweep must stop there.
  const RunConfig cfg = MakeConfig("qpsk", "hard", "0,20,25", 1000000, 100000);
  const auto points = RunAll(cfg, 2);
  ASSERT_EQ(points.size(), 2u);
  EXPECT_EQ(points[0].stop_reason, StopReason::kStopBits);
  EXPECT_EQ(points[1].stop_reason, StopReason::kStopBits);
  EXPECT_EQ(points[1].counts.bit_errors, 0u);
  EXPECT_GE(points[1].counts.bits, 100000u);
  EXPECT_LT(points[1].counts.bits, 100000u + 4u * 480u);
}

TEST(Engine, SweepEndsAfterFirstPointBelowBerFloor) {
  RunConfig cfg = MakeConfig("bpsk", "hard", "0 to 10 by 2", 50, 2000000);
  // BPSK Pb = Q(sqrt(2 Eb/N0)): 7.9e-2 at 0 dB, 1.25e-2 at 4 dB, 2.4e-3 at 6 dB
  // (Proakis & Salehi, Digital Communications, 5th ed., ch. 4; evaluated with
  // scipy.special.erfc), so the first point below 1e-2 is 6 dB.
  cfg.sweep.ber_floor = 1e-2;
  const auto points = RunAll(cfg, 2);
  ASSERT_EQ(points.size(), 4u);
  EXPECT_LT(points.back().ber(), 1e-2);
  EXPECT_GE(points[points.size() - 2].ber(), 1e-2);
}

// Frame-error target (sweep.stop_frame_errors). Uncoded QPSK at 7 dB with
// 480-bit frames: Pb = Q(sqrt(2 Eb/N0)) = 7.7e-4 (Proakis & Salehi, 5th ed.,
// ch. 4; evaluated with scipy.special.erfc), so a frame is in error with
// probability 1 - (1 - Pb)^480 ~ 0.31 and 150 frame errors take ~480 frames.
RunConfig FrameTargetConfig(std::uint64_t stop_bit_errors, std::uint64_t stop_frame_errors) {
  return MakeConfig("qpsk", "maxlog", "6,7", stop_bit_errors, 100000000,
                    "stop_frame_errors = " + std::to_string(stop_frame_errors) + "\n");
}

TEST(Engine, FrameErrorTargetCountsAreIdenticalForOneTwoAndThreeThreads) {
  const RunConfig cfg = FrameTargetConfig(0, 150);
  EXPECT_EQ(cfg.SweepFor(0).stop_frame_errors, 150u);
  const auto one = RunAll(RunConfig(cfg), 1);
  ASSERT_EQ(one.size(), 2u);
  for (const PointResult& p : one) {
    EXPECT_EQ(p.stop_reason, StopReason::kStopFrameErrors);
    EXPECT_GE(p.counts.frame_errors, 150u);
    EXPECT_LT(p.counts.frame_errors, 150u + 4u);  // a unit holds 4 frames
  }
  ExpectSameCounts(one, RunAll(cfg, 2));
  ExpectSameCounts(one, RunAll(cfg, 3));
}

// With both targets the point stops at the first unit where either holds.
TEST(Engine, EitherTargetEndsThePointWhicheverComesFirst) {
  auto chain = Chain::Create(FrameTargetConfig(1, 1).schemes[0], 42);
  ASSERT_TRUE(chain.ok());
  EngineOptions eo;
  eo.threads = 2;
  // Frame errors first: 40 frame errors come with far fewer than 10^6 bit errors.
  const RunConfig frames_first = FrameTargetConfig(1000000, 40);
  const PointResult a = RunPoint(chain.value(), frames_first.SweepFor(0), 0, 7.0, eo);
  EXPECT_EQ(a.stop_reason, StopReason::kStopFrameErrors);
  EXPECT_GE(a.counts.frame_errors, 40u);
  // Bit errors first: 40 bit errors come before 10^6 frame errors.
  const RunConfig bits_first = FrameTargetConfig(40, 1000000);
  const PointResult b = RunPoint(chain.value(), bits_first.SweepFor(0), 0, 7.0, eo);
  EXPECT_EQ(b.stop_reason, StopReason::kStopBitErrors);
  EXPECT_GE(b.counts.bit_errors, 40u);
  EXPECT_LT(b.counts.frame_errors, 40u);
  // The deciding unit is the first at which either holds: without it, neither.
  for (const PointResult* r : {&a, &b}) {
    const RunConfig& cfg = r == &a ? frames_first : bits_first;
    NoiseSpec spec;
    spec.ebno_db = 7.0;
    spec.bits_per_symbol = 2;
    const AwgnChannel channel(spec);
    ChainWorkspace ws = chain.value().MakeWorkspace();
    UnitCounts prefix;
    for (std::uint32_t u = 0; u + 1 < r->units; ++u) prefix += chain.value().RunUnit(channel, 0, u, ws);
    StopReason reason;
    EXPECT_FALSE(StopRuleMet(prefix, cfg.SweepFor(0), &reason));
    prefix += chain.value().RunUnit(channel, 0, static_cast<std::uint32_t>(r->units - 1), ws);
    EXPECT_EQ(prefix, r->counts);
  }
}

// Raising stop_frame_errors continues the same streams: a point resumed from
// the prefix recorded under the lower target ends with the counts of a fresh
// run under the raised one and simulates only the units beyond the prefix.
TEST(Engine, RaisedFrameErrorTargetContinuesTheRecordedPrefix) {
  const RunConfig low = FrameTargetConfig(0, 60);
  const RunConfig high = FrameTargetConfig(0, 150);
  auto chain = Chain::Create(low.schemes[0], low.sweep.seed);
  ASSERT_TRUE(chain.ok());
  EngineOptions eo;
  eo.threads = 1;  // one worker simulates no unit beyond the deciding one
  const PointResult first = RunPoint(chain.value(), low.SweepFor(0), 0, 7.0, eo);
  ASSERT_EQ(first.stop_reason, StopReason::kStopFrameErrors);
  const PointResult fresh = RunPoint(chain.value(), high.SweepFor(0), 0, 7.0, eo);
  PointStart start;
  start.units = static_cast<std::uint32_t>(first.units);
  start.counts = first.counts;
  const PointResult resumed = RunPoint(chain.value(), high.SweepFor(0), 0, 7.0, eo, start);
  EXPECT_EQ(resumed.counts, fresh.counts);
  EXPECT_EQ(resumed.units, fresh.units);
  EXPECT_EQ(resumed.units_simulated, fresh.units - first.units);
  // The same prefix under the lower target is already finished.
  const PointResult again = RunPoint(chain.value(), low.SweepFor(0), 0, 7.0, eo, start);
  EXPECT_EQ(again.units_simulated, 0u);
  EXPECT_EQ(again.counts, first.counts);
}

TEST(Engine, InterruptStopsThePoint) {
  const RunConfig cfg = MakeConfig("qpsk", "hard", "30", 1000, 1000000000000ull);
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  ASSERT_TRUE(chain.ok());
  std::atomic<bool> stop{true};
  EngineOptions eo;
  eo.threads = 2;
  eo.interrupt = &stop;
  const PointResult r = RunPoint(chain.value(), cfg.sweep, 0, 30.0, eo);
  EXPECT_EQ(r.stop_reason, StopReason::kInterrupted);
}

}  // namespace
}  // namespace capgap
