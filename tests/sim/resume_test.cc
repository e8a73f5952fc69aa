// Resume and extension give exactly the counts of an uninterrupted run:
// in-process (RunPoint from any saved prefix, from checkpoint snapshots, after
// an interrupt, with a raised target) and through the CLI as a user meets it
// (SIGKILL at random moments then --resume, SIGTERM -> status 75 with a good
// checkpoint, a second SIGINT -> status 130 at once, a changed scheme refused,
// stop_bit_errors raised on a finished run, more points and a lower floor).
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include <gtest/gtest.h>

#include "sim/io/checkpoint.h"
#include "sim/io/curves_file.h"
#include "sim/engine/engine.h"
#include "tests/sim/capgap_process.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;
using Clock = std::chrono::steady_clock;
using test::Config;
using test::ExpectSameRecords;
using test::FileCounts;
using test::Process;
using test::ReadCounts;
using test::ReadGood;
using test::RunCapgap;
using test::RunOutput;
using test::WaitForFinishedPoints;

fs::path TempDir(const std::string& name) { return test::TempDir("resume_test", name); }

// ------------------------------------------------------------- in-process
RunConfig PointConfig(std::uint64_t stop_bit_errors) {
  const std::string text = "[sweep]\nebno_db = 5\nstop_bit_errors = " + std::to_string(stop_bit_errors) +
                           "\nstop_bits = 100000000\nseed = 3\n[scheme.s]\nmodulation = 16qam\n"
                           "demapper = maxlog\nframe_bits = 480\nunit_frames = 2\n";
  auto r = ParseRunConfig(text, "resume_test", {});
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.value();
}

Chain MakeChain(const RunConfig& cfg) {
  auto chain = Chain::Create(cfg.schemes[0], cfg.sweep.seed);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  return std::move(chain).value();
}

// Serial sum of units [0, k) of point 0.
PointStart SerialPrefix(const Chain& chain, double ebno_db, std::uint32_t k) {
  const auto point_channel = MakePointChannel(chain, ebno_db);
  const Channel& channel = *point_channel;
  ChainWorkspace ws = chain.MakeWorkspace();
  PointStart s;
  s.units = k;
  for (std::uint32_t u = 0; u < k; ++u) s.counts += chain.RunUnit(channel, 0, u, ws);
  return s;
}

void ExpectSamePoint(const PointResult& a, const PointResult& b) {
  EXPECT_EQ(a.counts, b.counts);
  EXPECT_EQ(a.units, b.units);
  EXPECT_EQ(a.stop_reason, b.stop_reason);
}

// 16QAM at 5 dB, 1000 target errors: BER about 1.9e-2 (Cho & Yoon 2002
// closed form, as in analysis/uncoded_theory), so about 55 units of 960 bits.
TEST(Resume, PointContinuedFromAnySavedPrefixEqualsUninterrupted) {
  const RunConfig cfg = PointConfig(1000);
  const Chain chain = MakeChain(cfg);
  EngineOptions eo;
  eo.threads = 2;
  const PointResult whole = RunPoint(chain, cfg.sweep, 0, 5.0, eo);
  ASSERT_EQ(whole.stop_reason, StopReason::kStopBitErrors);
  ASSERT_GT(whole.units, 20u);
  for (int threads : {1, 3}) {
    eo.threads = threads;
    for (std::uint32_t k : {0u, 1u, static_cast<std::uint32_t>(whole.units / 2),
                            static_cast<std::uint32_t>(whole.units - 1)}) {
      const PointResult r = RunPoint(chain, cfg.sweep, 0, 5.0, eo, SerialPrefix(chain, 5.0, k));
      ExpectSamePoint(r, whole);
      if (threads == 1) {
        EXPECT_EQ(r.units_simulated, whole.units - k) << k;
      }
    }
  }
  // A saved prefix that already meets the rule is returned as it is.
  const PointResult again =
      RunPoint(chain, cfg.sweep, 0, 5.0, eo,
               SerialPrefix(chain, 5.0, static_cast<std::uint32_t>(whole.units)));
  ExpectSamePoint(again, whole);
  EXPECT_EQ(again.units_simulated, 0u);
}

TEST(Resume, CheckpointSnapshotsArePrefixSumsAndResumeFromThem) {
  // About 1e8 bits: long enough (tens of ms or more) for the supervising
  // thread to be scheduled between two busy workers several times.
  const RunConfig cfg = PointConfig(2000000);
  const Chain chain = MakeChain(cfg);
  EngineOptions eo;
  eo.threads = 2;
  std::vector<PointSnapshot> snaps;
  eo.checkpoint_interval_seconds = 1e-3;
  eo.on_checkpoint = [&](const PointSnapshot& s) { snaps.push_back(s); };
  const PointResult whole = RunPoint(chain, cfg.sweep, 0, 5.0, eo);
  ASSERT_GE(snaps.size(), 3u) << "point too fast to take snapshots";
  eo.on_checkpoint = nullptr;
  std::uint32_t last = 0;
  for (std::size_t i = 0; i < snaps.size(); i += std::max<std::size_t>(1, snaps.size() / 4)) {
    const PointSnapshot& s = snaps[i];
    EXPECT_GE(s.units, last);
    last = s.units;
    const PointStart serial = SerialPrefix(chain, 5.0, s.units);
    EXPECT_EQ(s.counts, serial.counts) << "snapshot " << i << " at unit " << s.units;
    PointStart start{s.units, s.counts, s.seconds};
    ExpectSamePoint(RunPoint(chain, cfg.sweep, 0, 5.0, eo, start), whole);
  }
}

TEST(Resume, InterruptedPointResumesToTheUninterruptedCounts) {
  const RunConfig cfg = PointConfig(20000);
  const Chain chain = MakeChain(cfg);
  EngineOptions eo;
  eo.threads = 2;
  const PointResult whole = RunPoint(chain, cfg.sweep, 0, 5.0, eo);
  std::mt19937 rng(std::random_device{}());
  for (int round = 0; round < 3; ++round) {
    std::atomic<bool> stop{false};
    eo.interrupt = &stop;
    const int delay_us = std::uniform_int_distribution<int>(0, 20000)(rng);
    std::thread killer([&] {
      std::this_thread::sleep_for(std::chrono::microseconds(delay_us));
      stop = true;
    });
    const PointResult part = RunPoint(chain, cfg.sweep, 0, 5.0, eo);
    killer.join();
    eo.interrupt = nullptr;
    if (part.stop_reason != StopReason::kInterrupted) continue;  // finished first
    EXPECT_EQ(part.counts, SerialPrefix(chain, 5.0, static_cast<std::uint32_t>(part.units)).counts);
    const PointStart start{static_cast<std::uint32_t>(part.units), part.counts, part.seconds};
    ExpectSamePoint(RunPoint(chain, cfg.sweep, 0, 5.0, eo, start), whole);
  }
}

TEST(Resume, RaisedTargetContinuesAFinishedPointWithOnlyTheExtraUnits) {
  const RunConfig small = PointConfig(300), large = PointConfig(900);
  const Chain chain = MakeChain(small);
  EngineOptions eo;
  eo.threads = 1;  // no overshoot: units simulated are exactly the extra ones
  const PointResult a = RunPoint(chain, small.sweep, 0, 5.0, eo);
  const PointResult b = RunPoint(chain, large.sweep, 0, 5.0, eo);
  const PointStart start{static_cast<std::uint32_t>(a.units), a.counts, a.seconds};
  const PointResult extended = RunPoint(chain, large.sweep, 0, 5.0, eo, start);
  ExpectSamePoint(extended, b);
  EXPECT_EQ(extended.units_simulated, b.units - a.units);
}

// -------------------------------------------------------------------- CLI
std::vector<std::string> RunArgs(const std::string& out, std::vector<std::string> extra = {}) {
  std::vector<std::string> a = {"run", Config("ci_resume.ini"), "-o", out, "--quiet"};
  a.insert(a.end(), extra.begin(), extra.end());
  return a;
}

// Five SIGKILLs at uniform random moments within the first 70 % of the
// uninterrupted run's duration (the seed is printed so a failure can be
// replayed), each followed by --resume; after every kill the checkpoint and
// any curves file must open. A round that finished before its kill starts
// the next one from scratch, so every round has work to interrupt. Ten times
// the config's errors per point: about a second per run, checkpoints every
// 0.2 s, so kills land inside points, in checkpoint writes and between points.
TEST(ResumeCli, KilledAtRandomMomentsThenResumedGivesUninterruptedCounts) {
  const fs::path dir = TempDir("kill");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  auto args = [&](const std::string& path, bool resume) {
    std::vector<std::string> extra = {"--threads", "2", "--set", "sweep.stop_bit_errors=200000"};
    if (resume) extra.push_back("--resume");
    return RunArgs(path, extra);
  };
  const RunOutput r = RunCapgap(args(ref, false), dir);
  ASSERT_EQ(r.status, 0) << r.log;
  const unsigned seed = std::random_device{}();
  std::printf("kill moments from seed %u; uninterrupted run %.2f s\n", seed, r.seconds);
  std::mt19937 rng(seed);
  std::uniform_real_distribution<double> moment(0.0, 0.7 * r.seconds);
  int killed_running = 0;
  for (int round = 0; round < 5; ++round) {
    Process p(args(out, true), dir / "kill_log.txt");
    const double t = moment(rng);
    const auto t0 = Clock::now();
    while (!p.Exited() && std::chrono::duration<double>(Clock::now() - t0).count() < t) {
      std::this_thread::sleep_for(std::chrono::microseconds(500));
    }
    killed_running += !p.Exited();
    p.Signal(SIGKILL);
    const int status = p.Wait();
    ASSERT_TRUE(status == -SIGKILL || status == 0) << status << "\n" << p.Log();
    if (fs::exists(CheckpointPath(out))) ReadGood(CheckpointPath(out));
    if (fs::exists(out)) {
      EXPECT_TRUE(ReadCurvesFile(out).ok()) << "round " << round;
    }
    if (status == 0) {  // finished before the kill: start over
      fs::remove(out);
      fs::remove(CheckpointPath(out));
    }
  }
  EXPECT_GE(killed_running, 1);
  const RunOutput last = RunCapgap(args(out, true), dir);
  ASSERT_EQ(last.status, 0) << last.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
  for (const auto& e : fs::directory_iterator(dir)) {
    EXPECT_EQ(e.path().string().find(".tmp-"), std::string::npos) << e.path();
  }
  fs::remove_all(dir);
}

TEST(ResumeCli, SigtermSavesTheCheckpointAndExitsWith75) {
  const fs::path dir = TempDir("term");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  ASSERT_EQ(RunCapgap(RunArgs(ref, {"--threads", "1"}), dir).status, 0);
  Process p(RunArgs(out, {"--threads", "1"}), dir / "term_log.txt");
  ASSERT_TRUE(WaitForFinishedPoints(p, CheckpointPath(out), 1)) << p.Log();
  p.Signal(SIGTERM);
  const auto t0 = Clock::now();
  EXPECT_EQ(p.Wait(), 75) << p.Log();
  EXPECT_LT(std::chrono::duration<double>(Clock::now() - t0).count(), 5.0);
  EXPECT_NE(p.Log().find("stopped by signal; checkpoint " + CheckpointPath(out) + " saved"),
            std::string::npos)
      << p.Log();
  EXPECT_FALSE(fs::exists(out));  // no curves file until the run is complete
  const Checkpoint c = ReadGood(CheckpointPath(out));
  EXPECT_FALSE(c.complete);
  EXPECT_GE(c.FinishedPoints(), 1u);
  // Without --resume the unfinished run is protected.
  const RunOutput fresh = RunCapgap(RunArgs(out, {"--threads", "1"}), dir);
  EXPECT_EQ(fresh.status, 1);
  EXPECT_NE(fresh.log.find(CheckpointPath(out) + " holds an unfinished run"), std::string::npos)
      << fresh.log;
  const RunOutput resumed = RunCapgap(RunArgs(out, {"--threads", "1", "--resume"}), dir);
  ASSERT_EQ(resumed.status, 0) << resumed.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  fs::remove_all(dir);
}

// Workers abandon a unit within a frame of a stop, so the longest stretch
// without a look at the flag is one decoder call: here an LDPC batch of 520
// frames (LdpcChannelCode::BatchFrames for n = 2016 and the one-lane float
// decoder) through sum-product at -5 dB, where no frame converges in 1000
// iterations (tens of seconds). The second SIGINT (50 ms after the first;
// two signals sent back to back may merge into one) arrives inside that
// call, before the run could stop by itself.
TEST(ResumeCli, SecondSigintExitsAtOnceWith130AndTheCheckpointStaysGood) {
  const fs::path dir = TempDir("int2");
  const std::string out = (dir / "out.h5").string();
  const std::string config = (dir / "slow.ini").string();
  std::ofstream(config) << "[sweep]\nebno_db = -5\nstop_bit_errors = 1000000\n"
                           "stop_bits = 1000000000\nseed = 11\n"
                           "[scheme.ldpc]\nmodulation = qpsk\ncode = ldpc\nconstruction = qc\n"
                           "base_matrix = "
                        << Config("codes/qc_r1-2_24x12.txt")
                        << "\ndecoder = sum_product\nmax_iterations = 1000\nunit_frames = 1024\n"
                           "[scheme.qpsk]\nmodulation = qpsk\nframe_bits = 960\n";
  Process p({"run", config, "-o", out, "--quiet", "--threads", "2"}, dir / "int_log.txt");
  const auto t0 = Clock::now();
  while (!p.Exited() && !ReadCheckpoint(CheckpointPath(out)).ok() &&
         std::chrono::duration<double>(Clock::now() - t0).count() < 30) {
    std::this_thread::sleep_for(std::chrono::milliseconds(1));
  }
  // The session's first checkpoint precedes the first unit: let it start.
  std::this_thread::sleep_for(std::chrono::milliseconds(200));
  p.Signal(SIGINT);
  std::this_thread::sleep_for(std::chrono::milliseconds(50));
  p.Signal(SIGINT);
  EXPECT_EQ(p.Wait(), 130) << p.Log();
  const Checkpoint c = ReadGood(CheckpointPath(out));
  EXPECT_FALSE(c.complete);
  EXPECT_EQ(c.schemes.size(), 2u);
  fs::remove_all(dir);
}

TEST(ResumeCli, ChangedSchemeOrSeedIsRefusedNamingTheKey) {
  const fs::path dir = TempDir("changed");
  const std::string out = (dir / "out.h5").string();
  ASSERT_EQ(RunCapgap(RunArgs(out, {"--set", "sweep.ebno_db=0 to 3 by 1"}), dir).status, 0);
  const std::string head = "capgap: cannot resume from " + CheckpointPath(out) + ": ";
  RunOutput r = RunCapgap(RunArgs(out, {"--resume", "--set", "scheme.qpsk.unit_frames=4"}), dir);
  EXPECT_EQ(r.status, 1);
  EXPECT_EQ(r.log, head + "scheme.qpsk.unit_frames changed from '8' to '4'; it fixes the random "
                          "streams of the recorded work (start a new output file to change it)\n");
  r = RunCapgap(RunArgs(out, {"--resume", "--seed", "12"}), dir);
  EXPECT_EQ(r.status, 1);
  EXPECT_EQ(r.log, head + "sweep.seed changed from 11 to 12; it fixes the random streams of the "
                          "recorded work (start a new output file to change it)\n");
  fs::remove_all(dir);
}

// A finished run at stop_bit_errors 20000 (config) extended to 40000: counts
// equal a fresh run at 40000, and with one thread the units simulated by the
// extension are exactly those the fresh run needs beyond the reused ones.
TEST(ResumeCli, ExtendingStopBitErrorsReusesTheFinishedUnits) {
  const fs::path dir = TempDir("extend");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  const std::vector<std::string> few = {"--threads", "1", "--set", "sweep.ebno_db=0 to 5 by 1"};
  auto with = [&](std::vector<std::string> a, const std::vector<std::string>& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
  };
  const RunOutput fresh = RunCapgap(RunArgs(ref, with(few, {"--set", "sweep.stop_bit_errors=40000"})), dir);
  ASSERT_EQ(fresh.status, 0) << fresh.log;
  ASSERT_EQ(RunCapgap(RunArgs(out, few), dir).status, 0);
  const Checkpoint before = ReadGood(CheckpointPath(out));
  std::uint64_t before_units = 0;
  for (const auto& s : before.schemes) {
    for (const auto& p : s.points) before_units += p.units;
  }
  const RunOutput ext =
      RunCapgap(RunArgs(out, with(few, {"--resume", "--set", "sweep.stop_bit_errors=40000"})), dir);
  ASSERT_EQ(ext.status, 0) << ext.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
  std::uint64_t total = 0;
  for (const auto& s : ReadGood(CheckpointPath(ref)).schemes) {
    for (const auto& p : s.points) total += p.units;
  }
  const std::string expect = "units: " + std::to_string(total) + " counted, " +
                             std::to_string(before_units) + " reused from the checkpoint, " +
                             std::to_string(total - before_units) + " simulated in this run\n";
  EXPECT_NE(ext.log.find(expect), std::string::npos) << expect << "\n" << ext.log;
  EXPECT_GT(before_units, 0u);
  // Nothing left to do: a second identical resume simulates nothing.
  const RunOutput again =
      RunCapgap(RunArgs(out, with(few, {"--resume", "--set", "sweep.stop_bit_errors=40000"})), dir);
  ASSERT_EQ(again.status, 0) << again.log;
  EXPECT_NE(again.log.find("units: " + std::to_string(total) + " counted, " + std::to_string(total) +
                           " reused from the checkpoint, 0 simulated in this run\n"),
            std::string::npos)
      << again.log;
  fs::remove_all(dir);
}

// The same with frame errors as the only target: a run finished at
// stop_frame_errors 300 and resumed at 600 equals a fresh run at 600, and
// with one thread simulates only the units beyond the reused ones.
TEST(ResumeCli, RaisingStopFrameErrorsReusesTheFinishedUnits) {
  const fs::path dir = TempDir("extend_frames");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  const std::vector<std::string> few = {"--threads", "1", "--set", "sweep.ebno_db=0 to 5 by 1",
                                        "--set", "sweep.stop_bit_errors=0"};
  auto with = [&](std::vector<std::string> a, const std::vector<std::string>& more) {
    a.insert(a.end(), more.begin(), more.end());
    return a;
  };
  const RunOutput fresh =
      RunCapgap(RunArgs(ref, with(few, {"--set", "sweep.stop_frame_errors=600"})), dir);
  ASSERT_EQ(fresh.status, 0) << fresh.log;
  ASSERT_EQ(RunCapgap(RunArgs(out, with(few, {"--set", "sweep.stop_frame_errors=300"})), dir).status,
            0);
  std::uint64_t before_units = 0;
  for (const auto& s : ReadGood(CheckpointPath(out)).schemes) {
    for (const auto& p : s.points) {
      before_units += p.units;
      EXPECT_EQ(p.stop_reason, StopReason::kStopFrameErrors);
    }
  }
  const RunOutput ext = RunCapgap(
      RunArgs(out, with(few, {"--resume", "--set", "sweep.stop_frame_errors=600"})), dir);
  ASSERT_EQ(ext.status, 0) << ext.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
  std::uint64_t total = 0;
  for (const auto& s : ReadGood(CheckpointPath(ref)).schemes) {
    for (const auto& p : s.points) total += p.units;
  }
  const std::string expect = "units: " + std::to_string(total) + " counted, " +
                             std::to_string(before_units) + " reused from the checkpoint, " +
                             std::to_string(total - before_units) + " simulated in this run\n";
  EXPECT_NE(ext.log.find(expect), std::string::npos) << expect << "\n" << ext.log;
  EXPECT_GT(before_units, 0u);
  // Lowering it again is refused.
  const RunOutput lower = RunCapgap(
      RunArgs(out, with(few, {"--resume", "--set", "sweep.stop_frame_errors=100"})), dir);
  EXPECT_NE(lower.status, 0);
  EXPECT_NE(lower.log.find("stop_frame_errors of scheme qpsk decreased from 600 to 100"),
            std::string::npos)
      << lower.log;
  fs::remove_all(dir);
}

// Extending the sweep itself: more Eb/N0 points and a lower ber_floor (so a
// scheme that ended early goes on) equal a fresh run of the final config.
TEST(ResumeCli, MorePointsAndALowerFloorExtendTheSweep) {
  const fs::path dir = TempDir("points");
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  const std::vector<std::string> final_cfg = {"--threads", "2", "--set", "sweep.ebno_db=0 to 9 by 1",
                                              "--set", "sweep.ber_floor=1e-6"};
  ASSERT_EQ(RunCapgap(RunArgs(ref, final_cfg), dir).status, 0);
  ASSERT_EQ(RunCapgap(RunArgs(out, {"--threads", "2", "--set", "sweep.ebno_db=0 to 6 by 1", "--set",
                              "sweep.ber_floor=1e-2"}),
                dir)
                .status,
            0);
  std::vector<std::string> resume = final_cfg;
  resume.push_back("--resume");
  const RunOutput r = RunCapgap(RunArgs(out, resume), dir);
  ASSERT_EQ(r.status, 0) << r.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  fs::remove_all(dir);
}

// memory_limit_mb is marked resume-changeable in the LDPC key table: it
// changes neither the random streams nor the recorded work, only whether the
// code may be built. A run made at 1 thread under a 4 MB limit is extended
// with 2 threads: the 4 MB limit is checked against the new thread count and
// refuses (naming the key; the checkpoint untouched), a raised limit is
// accepted and the extension equals a fresh run of the final config. Sizes:
// capgap's own estimate for a (3,6) PEG code, n = 2016 (LdpcMemoryEstimate):
// about 4 MB at one thread, 6 MB at two (3 MB of decoder state per thread).
TEST(ResumeCli, MemoryLimitMayChangeOnResume) {
  const fs::path dir = TempDir("memory_limit");
  const std::string config = (dir / "ldpc.ini").string();
  std::ofstream(config) << "[sweep]\nebno_db = 1.5,2\nstop_bit_errors = 50\nstop_bits = 2000000\n"
                           "seed = 3\n[scheme.l]\nmodulation = bpsk\ncode = ldpc\n"
                           "length = 2016\nmax_iterations = 20\n";
  const std::string ref = (dir / "ref.h5").string(), out = (dir / "out.h5").string();
  auto args = [&](const std::string& file, std::vector<std::string> extra) {
    std::vector<std::string> a = {"run", config, "-o", file, "--quiet"};
    a.insert(a.end(), extra.begin(), extra.end());
    return a;
  };
  const RunOutput fresh =
      RunCapgap(args(ref, {"--threads", "2", "--set", "sweep.stop_bit_errors=100"}), dir);
  ASSERT_EQ(fresh.status, 0) << fresh.log;
  const RunOutput first =
      RunCapgap(args(out, {"--threads", "1", "--set", "scheme.l.memory_limit_mb=4"}), dir);
  ASSERT_EQ(first.status, 0) << first.log;
  const std::string ckpt_before = test::ReadText(CheckpointPath(out));

  const RunOutput small = RunCapgap(args(out, {"--threads", "2", "--resume", "--set",
                                               "sweep.stop_bit_errors=100", "--set",
                                               "scheme.l.memory_limit_mb=4"}),
                                    dir);
  EXPECT_EQ(small.status, 1) << small.log;
  EXPECT_NE(small.log.find("decoder 2 thread(s) x 3 MB), over scheme.l.memory_limit_mb = 4;"),
            std::string::npos)
      << small.log;
  EXPECT_EQ(test::ReadText(CheckpointPath(out)), ckpt_before);

  const RunOutput raised = RunCapgap(args(out, {"--threads", "2", "--resume", "--set",
                                                "sweep.stop_bit_errors=100", "--set",
                                                "scheme.l.memory_limit_mb=64"}),
                                     dir);
  ASSERT_EQ(raised.status, 0) << raised.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(ref));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
  // A key the table leaves fixed is still refused.
  const RunOutput iters = RunCapgap(args(out, {"--threads", "2", "--resume", "--set",
                                               "sweep.stop_bit_errors=100", "--set",
                                               "scheme.l.max_iterations=30"}),
                                    dir);
  EXPECT_EQ(iters.status, 1);
  EXPECT_EQ(iters.log, "capgap: cannot resume from " + CheckpointPath(out) +
                           ": scheme.l.max_iterations changed from '20' to '30'; it fixes the "
                           "random streams of the recorded work (start a new output file to "
                           "change it)\n");
  fs::remove_all(dir);
}

}  // namespace
}  // namespace capgap
