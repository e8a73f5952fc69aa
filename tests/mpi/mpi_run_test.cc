// MPI mode through mpirun on this machine (shared memory): 2 and 3 ranks (3
// oversubscribing 2 cores) write the counts of a one-thread single-process
// run, with one progress stream; a SIGKILLed rank ends the run without a hang
// and --resume finishes it to the same counts; SIGTERM to every rank (what a
// batch scheduler sends) stops cleanly with status 75; SIGTERM to mpirun
// leaves a good checkpoint that a single process can resume; SIGTERM inside
// long units, or while a worker rank builds the code, stops every rank
// within 2 s (finished units saved).
#include <dirent.h>
#include <signal.h>
#include <unistd.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include <gtest/gtest.h>

#include "sim/io/checkpoint.h"
#include "tests/sim/capgap_process.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;
using test::CapgapBinary;
using test::Config;
using test::ExpectSameRecords;
using test::Process;
using test::ReadCounts;
using test::ReadGood;
using test::RunCapgap;
using test::RunOutput;
using test::RunProgram;
using test::WaitForFinishedPoints;

fs::path TempDir(const std::string& name) { return test::TempDir("mpi_run_test", name); }

std::vector<std::string> RunArgs(const std::string& out, std::vector<std::string> extra = {}) {
  std::vector<std::string> a = {"run", Config("ci_resume.ini"), "-o", out};
  a.insert(a.end(), extra.begin(), extra.end());
  return a;
}

// mpirun arguments for `np` ranks of capgap. OpenMPI refuses to run as root
// unless both variables are set (CI containers run as root).
std::vector<std::string> Mpi(int np, const std::vector<std::string>& capgap_args) {
  ::setenv("OMPI_ALLOW_RUN_AS_ROOT", "1", 1);
  ::setenv("OMPI_ALLOW_RUN_AS_ROOT_CONFIRM", "1", 1);
  std::vector<std::string> a = {"--oversubscribe", "-np", std::to_string(np), CapgapBinary()};
  a.insert(a.end(), capgap_args.begin(), capgap_args.end());
  return a;
}

RunOutput RunMpi(int np, const std::vector<std::string>& capgap_args, const fs::path& dir) {
  return RunProgram(CAPGAP_MPIEXEC, Mpi(np, capgap_args), dir);
}

// The signal tests need a run that lasts seconds, so that a signal lands
// mid-sweep: ci_resume.ini's first 6 points with 150x the errors per point
// (about 4 s on one core here).
std::vector<std::string> Heavy(std::vector<std::string> extra) {
  std::vector<std::string> a = {"--set", "sweep.ebno_db=0 to 5 by 1", "--set",
                                "sweep.stop_bit_errors=3000000", "--set",
                                "sweep.stop_bits=1000000000"};
  a.insert(a.end(), extra.begin(), extra.end());
  return a;
}

// The references: one process, one thread (computed once per test program,
// removed at exit).
struct TempTree {
  fs::path dir;
  ~TempTree() {
    std::error_code ec;
    fs::remove_all(dir, ec);
  }
};

std::string MakeReference(const fs::path& dir, const std::vector<std::string>& extra) {
  const std::string out = (dir / "ref.h5").string();
  std::vector<std::string> args = {"--threads", "1", "--quiet"};
  args.insert(args.end(), extra.begin(), extra.end());
  const RunOutput r = RunCapgap(RunArgs(out, args), dir);
  EXPECT_EQ(r.status, 0) << r.log;
  return out;
}

const std::string& Reference() {
  static const TempTree tree{TempDir("reference")};
  static const std::string path = MakeReference(tree.dir, {});
  return path;
}

const std::string& HeavyReference() {
  static const TempTree tree{TempDir("heavy_reference")};
  static const std::string path = MakeReference(tree.dir, Heavy({}));
  return path;
}

std::size_t Count(const std::string& text, const std::string& what) {
  std::size_t n = 0;
  for (std::size_t pos = text.find(what); pos != std::string::npos; pos = text.find(what, pos + 1)) ++n;
  return n;
}

// Ranks started by mpirun `launcher`: its children, with their MPI rank from
// the environment OpenMPI gives them.
std::vector<std::pair<int, pid_t>> Ranks(pid_t launcher) {
  std::vector<std::pair<int, pid_t>> out;
  DIR* proc = ::opendir("/proc");
  if (!proc) return out;
  while (dirent* e = ::readdir(proc)) {
    const pid_t pid = static_cast<pid_t>(std::atoi(e->d_name));
    if (pid <= 0) continue;
    std::ifstream stat("/proc/" + std::string(e->d_name) + "/stat");
    std::string line;
    std::getline(stat, line);
    const auto close = line.rfind(')');
    if (close == std::string::npos) continue;
    std::istringstream rest(line.substr(close + 2));
    std::string state;
    pid_t ppid = 0;
    rest >> state >> ppid;
    if (ppid != launcher) continue;
    std::ifstream env("/proc/" + std::string(e->d_name) + "/environ", std::ios::binary);
    std::string var;
    while (std::getline(env, var, '\0')) {
      if (var.rfind("OMPI_COMM_WORLD_RANK=", 0) == 0) out.emplace_back(std::atoi(var.c_str() + 21), pid);
    }
  }
  ::closedir(proc);
  return out;
}

// True while `pid` exists and is not a zombie (a rank whose launcher has
// exited may wait a while to be reaped by whoever adopted it).
bool Running(pid_t pid) {
  std::ifstream stat("/proc/" + std::to_string(pid) + "/stat");
  std::string line;
  if (!std::getline(stat, line)) return false;
  const auto close = line.rfind(')');
  return close != std::string::npos && close + 2 < line.size() && line[close + 2] != 'Z';
}

TEST(MpiRun, TwoAndThreeRanksWriteTheCountsOfOneThread) {
  const fs::path dir = TempDir("counts");
  const std::string ref = Reference();
  struct Case {
    int np;
    const char* threads;
  };
  for (const Case c : {Case{2, "1"}, Case{3, "1"}, Case{2, "2"}}) {
    const std::string out = (dir / ("np" + std::to_string(c.np) + "_t" + c.threads + ".h5")).string();
    // Progress on (no --quiet): MPI mode prints plain lines from rank 0 only.
    const RunOutput r = RunMpi(c.np, RunArgs(out, {"--threads", c.threads}), dir);
    ASSERT_EQ(r.status, 0) << r.log;
    EXPECT_EQ(ReadCounts(out), ReadCounts(ref)) << c.np << " ranks x " << c.threads << " threads";
    // The file records the processes of the run (attribute "ranks") beside
    // the threads of each; the single-process reference records 1.
    auto stored = ReadCurvesFile(out);
    ASSERT_TRUE(stored.ok()) << stored.status().message();
    EXPECT_EQ(stored.value().ranks, c.np);
    EXPECT_EQ(stored.value().threads, std::atoi(c.threads));
    auto single = ReadCurvesFile(ref);
    ASSERT_TRUE(single.ok()) << single.status().message();
    EXPECT_EQ(single.value().ranks, 1);
    ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(ref)));
    EXPECT_EQ(Count(r.log, "wrote " + out), 1u) << r.log;
    EXPECT_EQ(Count(r.log, "process(es) x"), 1u) << r.log;  // one banner
    EXPECT_NE(r.log.find(std::to_string(c.np) + " process(es) x " + c.threads + " thread(s)"),
              std::string::npos)
        << r.log;
    EXPECT_EQ(Count(r.log, "\r"), 0u);  // no in-place bars in logs
    EXPECT_EQ(Count(r.log, "[qpsk] point 1/10"), 1u) << r.log;  // one line per finished point
  }
  fs::remove_all(dir);
}

// Fading schemes (fading channels keep a per-unit process state, reset when
// a unit starts, so a unit's gains depend only on its own kFading stream):
// fast Rayleigh 16-QAM through the fused count, Nakagami block fading with
// selection combining, Rician Doppler with MRC, Nakagami-m Doppler, a
// coded scheme with the random interleaver over groups of frames, and a
// pulse-shaped chain fading at the symbol rate. One process with one
// thread, then 1, 2 and 3 ranks: identical counts.
TEST(MpiRun, FadingSchemesGiveTheCountsOfOneThreadOnOneTwoAndThreeRanks) {
  const fs::path dir = TempDir("fading");
  const std::string cfg = (dir / "fading.ini").string();
  {
    std::ofstream f(cfg);
    f << "[sweep]\nebno_db = 0:4:12\ntarget_errors = 200\nmax_bits = 400000\n"
         "ber_floor = 1e-6\nseed = 5\n"
         "[scheme.qam16_fast]\nmodulation = 16qam\ndemapper = maxlog\nframe_bits = 480\n"
         "unit_frames = 4\nchannel = rayleigh\n"
         "[scheme.qpsk_naka_block_sc]\nmodulation = qpsk\ndemapper = maxlog\n"
         "frame_bits = 480\nunit_frames = 4\nchannel = nakagami\nnakagami_m = 0.8\n"
         "fading = block\ncoherence_symbols = 50\nbranches = 2\ncombining = selection\n"
         "[scheme.psk8_rician_doppler_mrc]\nmodulation = 8psk\ndemapper = logmap\n"
         "frame_bits = 480\nunit_frames = 4\nchannel = rician\nrician_k_db = 3\n"
         "fading = doppler\ndoppler = 0.02\nbranches = 3\n"
         "[scheme.bpsk_naka_doppler]\nmodulation = bpsk\ndemapper = maxlog\n"
         "frame_bits = 480\nunit_frames = 4\nchannel = nakagami\nnakagami_m = 2.5\n"
         "fading = doppler\ndoppler = 0.01\n"
         "[scheme.qpsk_conv_random]\nmodulation = qpsk\ndemapper = maxlog\n"
         "frame_bits = 240\nunit_frames = 4\ncode = conv\ngenerators = 5,7\n"
         "constraint_length = 3\nchannel = rayleigh\nfading = block\n"
         "coherence_symbols = 100\ninterleaver = random\ninterleaver_frames = 2\n"
         "[scheme.qpsk_rrc_rayleigh]\nmodulation = qpsk\ndemapper = maxlog\n"
         "frame_bits = 480\nunit_frames = 4\nshaping = rrc\nrolloff = 0.35\nspan = 8\n"
         "samples_per_symbol = 4\nchannel = rayleigh\n";
  }
  const std::string ref = (dir / "ref.h5").string();
  const RunOutput r1 = RunCapgap({"run", cfg, "-o", ref, "--threads", "1", "--quiet"}, dir);
  ASSERT_EQ(r1.status, 0) << r1.log;
  const auto want = ReadCounts(ref);
  ASSERT_EQ(want.schemes.size(), 6u);
  for (const int np : {1, 2, 3}) {
    const std::string out = (dir / ("np" + std::to_string(np) + ".h5")).string();
    const RunOutput r = RunMpi(np, {"run", cfg, "-o", out, "--threads", "1", "--quiet"}, dir);
    ASSERT_EQ(r.status, 0) << r.log;
    EXPECT_EQ(ReadCounts(out), want) << np << " ranks";
  }
  fs::remove_all(dir);
}

// Points that stop on frame errors (sweep.stop_frame_errors, no bit-error
// target): 2 and 3 ranks write the counts of one process with one thread.
TEST(MpiRun, FrameErrorStoppingGivesTheCountsOfOneThread) {
  const fs::path dir = TempDir("frames");
  const std::vector<std::string> frames = {"--set", "sweep.stop_bit_errors=0", "--set",
                                           "sweep.stop_frame_errors=150", "--quiet"};
  std::vector<std::string> one = frames;
  one.insert(one.end(), {"--threads", "1"});
  const std::string ref = (dir / "ref.h5").string();
  const RunOutput r1 = RunCapgap(RunArgs(ref, one), dir);
  ASSERT_EQ(r1.status, 0) << r1.log;
  for (const int np : {2, 3}) {
    const std::string out = (dir / ("np" + std::to_string(np) + ".h5")).string();
    const RunOutput r = RunMpi(np, RunArgs(out, frames), dir);
    ASSERT_EQ(r.status, 0) << r.log;
    EXPECT_EQ(ReadCounts(out), ReadCounts(ref)) << np << " ranks";
  }
  fs::remove_all(dir);
}

TEST(MpiRun, KilledRankEndsTheRunAndResumeFinishesIt) {
  const fs::path dir = TempDir("kill");
  const std::string out = (dir / "out.h5").string();
  Process launcher(CAPGAP_MPIEXEC, Mpi(3, RunArgs(out, Heavy({"--threads", "1", "--quiet"}))),
                   dir / "kill_log.txt");
  ASSERT_TRUE(WaitForFinishedPoints(launcher, CheckpointPath(out), 2)) << launcher.Log();
  pid_t victim = 0;
  for (const auto& [rank, pid] : Ranks(launcher.pid())) {
    if (rank == 2) victim = pid;
  }
  ASSERT_GT(victim, 0) << "rank 2 not found among the children of mpirun";
  ::kill(victim, SIGKILL);
  const int status = launcher.Wait(60);
  EXPECT_NE(status, -1000) << "mpirun still running 60 s after a rank was killed\n" << launcher.Log();
  EXPECT_NE(status, 0);
  const Checkpoint c = ReadGood(CheckpointPath(out));
  EXPECT_FALSE(c.complete);
  EXPECT_GE(c.FinishedPoints(), 2u);
  const RunOutput r = RunMpi(2, RunArgs(out, Heavy({"--threads", "1", "--quiet", "--resume"})), dir);
  ASSERT_EQ(r.status, 0) << r.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(HeavyReference()));
  ExpectSameRecords(ReadGood(CheckpointPath(out)), ReadGood(CheckpointPath(HeavyReference())));
  fs::remove_all(dir);
}

TEST(MpiRun, SigtermToEveryRankStopsCleanlyWithStatus75) {
  const fs::path dir = TempDir("term");
  const std::string out = (dir / "out.h5").string();
  Process launcher(CAPGAP_MPIEXEC, Mpi(2, RunArgs(out, Heavy({"--threads", "1", "--quiet"}))),
                   dir / "term_log.txt");
  ASSERT_TRUE(WaitForFinishedPoints(launcher, CheckpointPath(out), 2)) << launcher.Log();
  const auto ranks = Ranks(launcher.pid());
  ASSERT_EQ(ranks.size(), 2u);
  for (const auto& [rank, pid] : ranks) ::kill(pid, SIGTERM);
  EXPECT_EQ(launcher.Wait(60), 75) << launcher.Log();
  EXPECT_NE(launcher.Log().find("stopped by signal; checkpoint " + CheckpointPath(out) + " saved"),
            std::string::npos)
      << launcher.Log();
  EXPECT_FALSE(fs::exists(out));
  EXPECT_FALSE(ReadGood(CheckpointPath(out)).complete);
  const RunOutput r = RunMpi(3, RunArgs(out, Heavy({"--threads", "1", "--quiet", "--resume"})), dir);
  ASSERT_EQ(r.status, 0) << r.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(HeavyReference()));
  fs::remove_all(dir);
}

TEST(MpiRun, SigtermToMpirunLeavesACheckpointASingleProcessResumes) {
  const fs::path dir = TempDir("mpirun_term");
  const std::string out = (dir / "out.h5").string();
  Process launcher(CAPGAP_MPIEXEC, Mpi(2, RunArgs(out, Heavy({"--threads", "1", "--quiet"}))),
                   dir / "mpirun_log.txt");
  ASSERT_TRUE(WaitForFinishedPoints(launcher, CheckpointPath(out), 2)) << launcher.Log();
  launcher.Signal(SIGTERM);
  const int status = launcher.Wait(60);
  EXPECT_NE(status, -1000) << launcher.Log();
  EXPECT_NE(status, 0);
  EXPECT_FALSE(ReadGood(CheckpointPath(out)).complete);
  const RunOutput r = RunCapgap(RunArgs(out, Heavy({"--threads", "2", "--quiet", "--resume"})), dir);
  ASSERT_EQ(r.status, 0) << r.log;
  EXPECT_EQ(ReadCounts(out), ReadCounts(HeavyReference()));
  fs::remove_all(dir);
}

// Units of 2000 K = 9 BCJR frames of 1000 bits take several seconds each on
// one core (about 0.3 Mbit/s; tests/sim/stop_test.cc), so SIGTERM to every
// rank after the first units are counted lands inside a unit on each rank.
// The worker rank abandons its unit in flight at the next frame, rank 0
// abandons its own, saves the checkpoint with the units finished before and
// sends STOP: every rank is gone within 2 s (about 0.07 s here; before the
// worker abandoned its unit, 10 s: rank 0's wait for the worker's goodbye),
// and mpirun reports 75.
TEST(MpiRun, SigtermDuringALongUnitStopsEveryRankWithin2s) {
  const fs::path dir = TempDir("long_unit");
  const std::string config = (dir / "k9.ini").string();
  std::ofstream(config) << "[sweep]\nebno_db = 2\nstop_bit_errors = 100000000\n"
                           "stop_bits = 1000000000\nseed = 1\ncheckpoint_seconds = 0.05\n"
                           "[scheme.k9]\nmodulation = bpsk\ncode = conv\ngenerators = 561,753\n"
                           "constraint_length = 9\ndecoder = bcjr\nframe_bits = 1000\n"
                           "unit_frames = 2000\n";
  const std::string out = (dir / "out.h5").string(), ckpt = CheckpointPath(out);
  Process launcher(CAPGAP_MPIEXEC,
                   Mpi(2, {"run", config, "-o", out, "--threads", "1", "--quiet"}),
                   dir / "long_unit_log.txt");
  // Wait for the first counted unit: the next ones are then in flight.
  std::size_t counted = 0;
  const auto t0 = test::Clock::now();
  while (!launcher.Exited() && test::SecondsSince(t0) < 120) {
    auto c = ReadCheckpoint(ckpt);
    if (c.ok() && (counted = test::TotalUnits(c.value())) >= 1) break;
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  ASSERT_GE(counted, 1u) << launcher.Log();
  const auto ranks = Ranks(launcher.pid());
  ASSERT_EQ(ranks.size(), 2u);
  const auto signalled = test::Clock::now();
  for (const auto& [rank, pid] : ranks) ::kill(pid, SIGTERM);
  // When each rank is gone, then mpirun.
  std::vector<double> gone(ranks.size(), -1);
  while (!launcher.Exited() && test::SecondsSince(signalled) < 60) {
    for (std::size_t i = 0; i < ranks.size(); ++i) {
      if (gone[i] < 0 && !Running(ranks[i].second)) gone[i] = test::SecondsSince(signalled);
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  const double seconds = test::SecondsSince(signalled);
  const int status = launcher.Wait(1);
  for (std::size_t i = 0; i < ranks.size(); ++i) {
    if (gone[i] < 0 && !Running(ranks[i].second)) gone[i] = seconds;
    EXPECT_GE(gone[i], 0) << "rank " << ranks[i].first << " still running";
    EXPECT_LT(gone[i], 2.0) << "rank " << ranks[i].first << "\n" << launcher.Log();
    std::printf("rank %d stopped %.3f s after SIGTERM\n", ranks[i].first, gone[i]);
  }
  EXPECT_EQ(status, 75) << launcher.Log();
  // mpirun itself, once a rank exits non-zero, runs its kill sequence on the
  // (already finished) ranks: SIGCONT, SIGTERM, SIGKILL with a sleep of
  // odls_base_sigkill_timeout (1 s by default, Open MPI 4.1) before the last
  // two, so it exits 1-2 s after the ranks.
  EXPECT_LT(seconds, 5.0) << launcher.Log();
  std::printf("mpirun exited %.3f s after SIGTERM to the ranks\n", seconds);
  EXPECT_FALSE(fs::exists(out));
  const Checkpoint c = ReadGood(ckpt);
  EXPECT_FALSE(c.complete);
  ASSERT_EQ(c.schemes.size(), 1u);
  ASSERT_EQ(c.schemes[0].points.size(), 1u);
  const PointRecord& rec = c.schemes[0].points[0];
  EXPECT_GE(rec.units, counted);  // the finished units are kept
  EXPECT_EQ(rec.counts.frames, 2000u * rec.units);  // whole units only
  EXPECT_EQ(rec.counts.bits, 2000000u * rec.units);
  EXPECT_FALSE(rec.finished);
  fs::remove_all(dir);
}

// Minor page faults of `pid` so far (/proc/PID/stat field 10), or -1.
long MinorFaults(pid_t pid) {
  std::ifstream stat("/proc/" + std::to_string(pid) + "/stat");
  std::string line;
  if (!std::getline(stat, line)) return -1;
  const auto close = line.rfind(')');
  if (close == std::string::npos) return -1;
  std::istringstream rest(line.substr(close + 2));
  std::string field;
  for (int i = 0; i < 8 && rest >> field; ++i) {
  }
  return std::atol(field.c_str());
}

// Rank 0 builds its PEG code (n = 12288: about 8 s on one core here) while
// the worker waits in the config broadcast; then the worker builds the same
// code while rank 0 waits for its readiness in a blocking gather. The
// worker's construction shows as its first page faults since start-up (a
// rank waiting inside MPI touches no new memory). SIGTERM to every rank then
// must stop the worker's construction within a second: every rank gone
// within 2 s, status 75, and a checkpoint with the config and no point
// (before the worker saw the flag: the rest of its construction, seconds).
TEST(MpiRun, SigtermWhileTheWorkerRankBuildsTheCodeStopsWithin2s) {
  const fs::path dir = TempDir("worker_build");
  const std::string config = (dir / "peg.ini").string();
  std::ofstream(config) << "[sweep]\nebno_db = 1\nseed = 1\n[scheme.big]\nmodulation = bpsk\n"
                           "code = ldpc\nlength = 12288\n";
  const std::string out = (dir / "out.h5").string(), ckpt = CheckpointPath(out);
  Process launcher(CAPGAP_MPIEXEC,
                   Mpi(2, {"run", config, "-o", out, "--threads", "1", "--quiet"}),
                   dir / "worker_build_log.txt");
  std::vector<std::pair<int, pid_t>> ranks;
  const auto t0 = test::Clock::now();
  while (ranks.size() < 2 && test::SecondsSince(t0) < 30) {
    std::this_thread::sleep_for(std::chrono::milliseconds(100));
    ranks = Ranks(launcher.pid());
  }
  ASSERT_EQ(ranks.size(), 2u) << launcher.Log();
  const pid_t worker = ranks[0].first == 1 ? ranks[0].second : ranks[1].second;
  std::this_thread::sleep_for(std::chrono::seconds(1));  // MPI start-up settles
  const long idle = MinorFaults(worker);
  bool building = false;
  // Generous: rank 0's construction takes minutes on a loaded machine.
  while (!launcher.Exited() && test::SecondsSince(t0) < 600) {
    if (MinorFaults(worker) > idle + 20) {
      building = true;
      break;
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(10));
  }
  ASSERT_TRUE(building) << "the worker never started building\n" << launcher.Log();
  std::this_thread::sleep_for(std::chrono::milliseconds(500));
  ASSERT_FALSE(launcher.Exited()) << launcher.Log();
  const auto signalled = test::Clock::now();
  for (const auto& [rank, pid] : ranks) ::kill(pid, SIGTERM);
  std::vector<double> gone(ranks.size(), -1);
  while (!launcher.Exited() && test::SecondsSince(signalled) < 60) {
    for (std::size_t i = 0; i < ranks.size(); ++i) {
      if (gone[i] < 0 && !Running(ranks[i].second)) gone[i] = test::SecondsSince(signalled);
    }
    std::this_thread::sleep_for(std::chrono::milliseconds(2));
  }
  const double seconds = test::SecondsSince(signalled);
  const int status = launcher.Wait(1);
  for (std::size_t i = 0; i < ranks.size(); ++i) {
    if (gone[i] < 0 && !Running(ranks[i].second)) gone[i] = seconds;
    EXPECT_GE(gone[i], 0) << "rank " << ranks[i].first << " still running";
    EXPECT_LT(gone[i], 2.0) << "rank " << ranks[i].first << "\n" << launcher.Log();
    std::printf("rank %d stopped %.3f s after SIGTERM (worker building)\n", ranks[i].first,
                gone[i]);
  }
  EXPECT_EQ(status, 75) << launcher.Log();
  EXPECT_NE(launcher.Log().find("capgap: rank 1: stopped by signal while building the code of "
                                "scheme 'big'; checkpoint " + ckpt + " saved (0 point(s) finished)"),
            std::string::npos)
      << launcher.Log();
  EXPECT_FALSE(fs::exists(out));
  const Checkpoint c = ReadGood(ckpt);
  EXPECT_FALSE(c.complete);
  ASSERT_EQ(c.schemes.size(), 1u);
  EXPECT_TRUE(c.schemes[0].points.empty());
  fs::remove_all(dir);
}

}  // namespace
}  // namespace capgap
