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
                     const std::string& ebno, std::uint64_t target_errors,
                     std::uint64_t max_bits, const std::string& extra = "") {
  const std::string text = "[sweep]\nebno_db = " + ebno +
                           "\ntarget_errors = " + std::to_string(target_errors) +
                           "\nmax_bits = " + std::to_string(max_bits) +
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
  return RunSweep(chain.value(), cfg.sweep, eo);
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
    const RunConfig cfg = MakeConfig(mod, "maxlog", "2:2:6", 300, 2000000);
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

// The point stops at the first unit whose prefix reaches target_errors: the
// prefix without its last unit must still be below the target.
TEST(Engine, StopsAtFirstPrefixReachingTargetErrors) {
  const RunConfig cfg = MakeConfig("qpsk", "maxlog", "3", 500, 100000000);
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  ASSERT_TRUE(chain.ok());
  EngineOptions eo;
  eo.threads = 2;
  const PointResult r = RunPoint(chain.value(), cfg.sweep, 0, 3.0, eo);
  EXPECT_EQ(r.stop_reason, StopReason::kTargetErrors);
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

TEST(Engine, StopsAtMaxBitsAndSweepEndsAfterAnErrorFreePoint) {
  // QPSK at 20 dB: Q(sqrt(200)) ~ 1e-45 (same formula; arithmetic), so no
  // error in 1e5 bits; the sweep must stop there.
  const RunConfig cfg = MakeConfig("qpsk", "hard", "0,20,25", 1000000, 100000);
  const auto points = RunAll(cfg, 2);
  ASSERT_EQ(points.size(), 2u);
  EXPECT_EQ(points[0].stop_reason, StopReason::kMaxBits);
  EXPECT_EQ(points[1].stop_reason, StopReason::kMaxBits);
  EXPECT_EQ(points[1].counts.bit_errors, 0u);
  EXPECT_GE(points[1].counts.bits, 100000u);
  EXPECT_LT(points[1].counts.bits, 100000u + 4u * 480u);
}

TEST(Engine, SweepEndsAfterFirstPointBelowBerFloor) {
  RunConfig cfg = MakeConfig("bpsk", "hard", "0:2:10", 50, 2000000);
  // BPSK Pb = Q(sqrt(2 Eb/N0)): 7.9e-2 at 0 dB, 1.25e-2 at 4 dB, 2.4e-3 at 6 dB
  // (Proakis & Salehi, Digital Communications, 5th ed., ch. 4; evaluated with
  // scipy.special.erfc), so the first point below 1e-2 is 6 dB.
  cfg.sweep.ber_floor = 1e-2;
  const auto points = RunAll(cfg, 2);
  ASSERT_EQ(points.size(), 4u);
  EXPECT_LT(points.back().ber(), 1e-2);
  EXPECT_GE(points[points.size() - 2].ber(), 1e-2);
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
