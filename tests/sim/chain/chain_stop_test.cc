// Chain::RunUnitUnlessStopped: with the flag clear it is RunUnit exactly;
// a set flag abandons the unit (nullopt, no partial counts), also when it is
// set while a long unit runs; RunPoint interrupted mid-unit keeps exactly the
// counted prefix of the units finished before.
#include <atomic>
#include <chrono>
#include <optional>
#include <string>
#include <thread>

#include <gtest/gtest.h>

#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

RunConfig Config(const std::string& scheme_keys) {
  const std::string text =
      "[sweep]\nebno_db = 2\nstop_bit_errors = 1000000000\nstop_bits = 1000000000\nseed = 5\n"
      "[scheme.s]\n" + scheme_keys;
  auto r = ParseRunConfig(text, "chain_stop_test", {});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.value();
}

Chain Make(const RunConfig& cfg) {
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  return std::move(chain).value();
}

const char kBcjrK9[] =
    "modulation = bpsk\ncode = conv\ngenerators = 561,753\nconstraint_length = 9\n"
    "decoder = bcjr\nframe_bits = 200\n";

TEST(ChainStop, ClearFlagGivesExactlyRunUnit) {
  const std::atomic<bool> go{false};
  for (const std::string& keys :
       {std::string(kBcjrK9) + "unit_frames = 3\n",
        std::string("modulation = qpsk\ncode = ldpc\nunit_frames = 600\n"),  // two LDPC batches
        std::string("modulation = bpsk\ndemapper = hard\nframe_bits = 1000\nunit_frames = 5\n")}) {
    const RunConfig cfg = Config(keys);
    const Chain chain = Make(cfg);
    const auto channel = chain.MakePointChannel(2.0);
    ChainWorkspace ws = chain.MakeWorkspace();
    for (std::uint32_t unit = 0; unit < 3; ++unit) {
      const UnitCounts plain = chain.RunUnit(*channel, 0, unit, ws);
      const std::optional<UnitCounts> watched =
          chain.RunUnitUnlessStopped(*channel, 0, unit, ws, &go);
      ASSERT_TRUE(watched.has_value()) << keys;
      EXPECT_EQ(*watched, plain) << keys << " unit " << unit;
      EXPECT_GT(plain.frames, 0u);
    }
  }
}

TEST(ChainStop, SetFlagAbandonsTheUnit) {
  const RunConfig cfg = Config(std::string(kBcjrK9) + "unit_frames = 3\n");
  const Chain chain = Make(cfg);
  const auto channel = chain.MakePointChannel(2.0);
  ChainWorkspace ws = chain.MakeWorkspace();
  const std::atomic<bool> stop{true};
  EXPECT_FALSE(chain.RunUnitUnlessStopped(*channel, 0, 0, ws, &stop).has_value());
  // The workspace is still good for the next unit.
  ChainWorkspace fresh = chain.MakeWorkspace();
  EXPECT_EQ(chain.RunUnit(*channel, 0, 1, ws), chain.RunUnit(*channel, 0, 1, fresh));
}

// 10^6 frames of 200 bits through a K = 9 max-log BCJR: minutes of work, so
// the unit is still running when the flag is set 50 ms in; the call returns
// (rather than running to the end) with nothing.
TEST(ChainStop, FlagSetDuringALongUnitAbandonsIt) {
  const RunConfig cfg = Config(std::string(kBcjrK9) + "unit_frames = 1000000\n");
  const Chain chain = Make(cfg);
  const auto channel = chain.MakePointChannel(2.0);
  ChainWorkspace ws = chain.MakeWorkspace();
  std::atomic<bool> stop{false};
  std::thread setter([&] {
    std::this_thread::sleep_for(std::chrono::milliseconds(50));
    stop.store(true);
  });
  const std::optional<UnitCounts> r = chain.RunUnitUnlessStopped(*channel, 0, 0, ws, &stop);
  setter.join();
  EXPECT_FALSE(r.has_value());
}

// The interrupt flag set from the checkpoint callback (the supervising
// thread) once two units are counted: the point ends interrupted with a
// counted prefix that is exactly the serial sum of its units, whatever unit
// was in flight.
TEST(ChainStop, RunPointInterruptedMidUnitKeepsTheExactCountedPrefix) {
  const RunConfig cfg = Config(std::string(kBcjrK9) + "unit_frames = 20\n");
  const Chain chain = Make(cfg);
  for (int threads : {1, 2}) {
    std::atomic<bool> interrupt{false};
    EngineOptions eo;
    eo.threads = threads;
    eo.interrupt = &interrupt;
    eo.checkpoint_interval_seconds = 1e-3;
    eo.on_checkpoint = [&](const PointSnapshot& s) {
      if (s.units >= 2) interrupt.store(true);
    };
    const PointResult r = RunPoint(chain, cfg.sweep, 0, 2.0, eo);
    EXPECT_EQ(r.stop_reason, StopReason::kInterrupted);
    ASSERT_GE(r.units, 2u);
    UnitCounts serial;
    const auto channel = chain.MakePointChannel(2.0);
    ChainWorkspace ws = chain.MakeWorkspace();
    for (std::uint32_t u = 0; u < r.units; ++u) serial += chain.RunUnit(*channel, 0, u, ws);
    EXPECT_EQ(r.counts, serial) << threads << " thread(s)";
  }
}

}  // namespace
}  // namespace capgap
