// Prompt stops through the CLI: SIGTERM while a large PEG code is being
// constructed, and while a long work unit runs, exits with status 75 within
// 2 s, the checkpoint saved; a stop mid-point keeps the units finished before
// it, and --resume then completes to the counts of an uninterrupted run.
#include <signal.h>

#include <chrono>
#include <cstdio>
#include <fstream>
#include <string>
#include <thread>
#include <vector>

#include <gtest/gtest.h>

#include "sim/io/checkpoint.h"
#include "tests/sim/capgap_process.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;
using test::Clock;
using test::ExpectSameRecords;
using test::Process;
using test::ReadCounts;
using test::ReadGood;
using test::RunCapgap;
using test::RunOutput;
using test::SecondsSince;

fs::path TempDir(const std::string& name) { return test::TempDir("stop_test", name); }

std::string WriteConfig(const fs::path& dir, const std::string& text) {
  const std::string path = (dir / "run.ini").string();
  std::ofstream(path) << text;
  return path;
}

std::vector<std::string> Args(const std::string& config, const std::string& out,
                              std::vector<std::string> extra = {}) {
  std::vector<std::string> a = {"run", config, "-o", out, "--quiet", "--threads", "1"};
  a.insert(a.end(), extra.begin(), extra.end());
  return a;
}

// Waits (at most 60 s) until the checkpoint records at least `units` counted
// units; false if the process exited first.
bool WaitForUnits(Process& p, const std::string& ckpt, std::size_t units) {
  const auto t0 = Clock::now();
  while (SecondsSince(t0) < 60) {
    if (p.Exited()) return false;
    auto c = ReadCheckpoint(ckpt);
    if (c.ok() && test::TotalUnits(c.value()) >= units) return true;
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  return false;
}

// SIGTERM, then the exit status and the seconds it took.
std::pair<int, double> Terminate(Process& p) {
  p.Signal(SIGTERM);
  const auto t0 = Clock::now();
  const int status = p.Wait(60);
  return {status, SecondsSince(t0)};
}

// PEG with n = 16384 takes about 14 s here (O(n m) breadth-first searches;
// README, "LDPC code sizes"), the encoder's elimination a few more: the
// signal lands inside the construction.
TEST(StopCli, SigtermDuringPegConstructionExitsWith75Within2s) {
  const fs::path dir = TempDir("peg");
  const std::string config = WriteConfig(dir,
                                         "[sweep]\nebno_db = 1\nseed = 1\n"
                                         "[scheme.big]\nmodulation = bpsk\ncode = ldpc\n"
                                         "length = 16384\n");
  const std::string out = (dir / "out.h5").string(), ckpt = CheckpointPath(out);
  Process p(Args(config, out), dir / "log.txt");
  std::this_thread::sleep_for(std::chrono::milliseconds(1000));
  ASSERT_FALSE(p.Exited()) << p.Log();
  const auto [status, seconds] = Terminate(p);
  EXPECT_EQ(status, 75) << p.Log();
  EXPECT_LT(seconds, 2.0);
  std::printf("stop latency during PEG construction: %.3f s\n", seconds);
  EXPECT_EQ(p.Log(), "capgap: stopped by signal while building the code of scheme 'big'; "
                     "checkpoint " + ckpt + " saved (0 point(s) finished); continue with: "
                     "capgap run " + config + " -o " + out + " --resume --threads 1\n");
  EXPECT_FALSE(fs::exists(out));
  // The checkpoint describes the run with nothing simulated yet; a plain
  // rerun is told to resume it.
  const Checkpoint c = ReadGood(ckpt);
  EXPECT_FALSE(c.complete);
  ASSERT_EQ(c.schemes.size(), 1u);
  EXPECT_EQ(c.schemes[0].name, "big");
  EXPECT_TRUE(c.schemes[0].points.empty());
  const RunOutput again = RunCapgap(Args(config, out), dir);
  EXPECT_EQ(again.status, 1);
  EXPECT_NE(again.log.find("holds an unfinished run"), std::string::npos) << again.log;
  fs::remove_all(dir);
}

// A K = 9 max-log BCJR decodes about 0.3 Mbit/s on one core here, so a unit
// of 10^5 frames of 1000 bits takes about five minutes: the signal lands
// inside the first unit, which is abandoned (nothing counted).
TEST(StopCli, SigtermDuringALongUnitExitsWith75Within2s) {
  const fs::path dir = TempDir("unit");
  const std::string config = WriteConfig(
      dir,
      "[sweep]\nebno_db = 2\nstop_bit_errors = 1000000\nstop_bits = 1000000000\nseed = 1\n"
      "[scheme.k9]\nmodulation = bpsk\ncode = conv\ngenerators = 561,753\n"
      "constraint_length = 9\ndecoder = bcjr\nframe_bits = 1000\nunit_frames = 100000\n");
  const std::string out = (dir / "out.h5").string(), ckpt = CheckpointPath(out);
  Process p(Args(config, out), dir / "log.txt");
  // The session writes its first checkpoint before the first unit.
  const auto t0 = Clock::now();
  while (!p.Exited() && !ReadCheckpoint(ckpt).ok() && SecondsSince(t0) < 30) {
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  std::this_thread::sleep_for(std::chrono::milliseconds(500));
  ASSERT_FALSE(p.Exited()) << p.Log();
  const auto [status, seconds] = Terminate(p);
  EXPECT_EQ(status, 75) << p.Log();
  EXPECT_LT(seconds, 2.0);
  std::printf("stop latency inside a unit of 10^5 BCJR frames: %.3f s\n", seconds);
  const Checkpoint c = ReadGood(ckpt);
  ASSERT_EQ(c.schemes.size(), 1u);
  ASSERT_EQ(c.schemes[0].points.size(), 1u);
  EXPECT_EQ(c.schemes[0].points[0].units, 0u);
  EXPECT_EQ(c.schemes[0].points[0].counts, UnitCounts{});
  EXPECT_FALSE(c.schemes[0].points[0].finished);
  fs::remove_all(dir);
}

// Units of 150 frames of 1000 bits (about half a second each), six of them
// per point (stop_bits): SIGTERM after two are counted lands inside a later
// one. The checkpoint keeps the finished units, and --resume gives exactly
// the uninterrupted run's counts and records.
TEST(StopCli, SigtermMidPointKeepsFinishedUnitsAndResumeMatchesUninterrupted) {
  const fs::path dir = TempDir("mid");
  const std::string config = WriteConfig(
      dir,
      "[sweep]\nebno_db = 2\nstop_bit_errors = 1000000\nstop_bits = 900000\nseed = 4\n"
      "checkpoint_seconds = 0.05\n"
      "[scheme.k9]\nmodulation = bpsk\ncode = conv\ngenerators = 561,753\n"
      "constraint_length = 9\ndecoder = bcjr\nframe_bits = 1000\nunit_frames = 150\n");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  const RunOutput whole = RunCapgap(Args(config, ref), dir);
  ASSERT_EQ(whole.status, 0) << whole.log;

  Process p(Args(config, out), dir / "log.txt");
  ASSERT_TRUE(WaitForUnits(p, CheckpointPath(out), 2)) << p.Log();
  std::this_thread::sleep_for(std::chrono::milliseconds(100));
  const auto [status, seconds] = Terminate(p);
  ASSERT_EQ(status, 75) << p.Log();
  EXPECT_LT(seconds, 2.0);
  std::printf("stop latency mid-point (units of 150 BCJR frames): %.3f s\n", seconds);
  const Checkpoint stopped = ReadGood(CheckpointPath(out));
  ASSERT_EQ(stopped.schemes.size(), 1u);
  ASSERT_EQ(stopped.schemes[0].points.size(), 1u);
  const PointRecord& rec = stopped.schemes[0].points[0];
  EXPECT_GE(rec.units, 2u);
  EXPECT_LT(rec.units, 6u);
  EXPECT_FALSE(rec.finished);
  // Whole units only: 150 frames of 1000 bits each.
  EXPECT_EQ(rec.counts.frames, 150u * rec.units);
  EXPECT_EQ(rec.counts.bits, 150000u * rec.units);

  const RunOutput resumed = RunCapgap(Args(config, out, {"--resume"}), dir);
  ASSERT_EQ(resumed.status, 0) << resumed.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
  fs::remove_all(dir);
}

}  // namespace
}  // namespace capgap
