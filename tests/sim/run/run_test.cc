// Run (sim/run/run.h) in-process: a tiny config writes its curves file with
// the golden counts of the CLI (tests/golden), an interrupt flag set before
// the start stops with status 75 and a checkpoint that --resume finishes to
// the same counts, and every refused run (bad config, malformed or
// out-of-range command-line values, an unusable -o) has its exact status and
// one message naming the option or key, writes no file and leaves the
// previous outputs byte for byte intact.
#include "sim/run/run.h"

#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <atomic>
#include <filesystem>
#include <fstream>
#include <functional>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include "sim/io/checkpoint.h"
#include "sim/io/curves_file.h"
#include "tests/golden/golden_counts.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

const char kTinyRun[] = "configs/ci_tiny.ini";  // its name in the golden file

std::string TinyConfig() { return std::string(CAPGAP_SOURCE_DIR) + "/" + kTinyRun; }

fs::path TempDir(const std::string& name) {
  const fs::path dir =
      fs::temp_directory_path() / ("capgap_run_test_" + std::to_string(::getpid()) + "_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

// The golden limits (tests/golden/golden_counts.h) as RunOptions overrides.
std::vector<std::string> GoldenSets() {
  std::vector<std::string> sets;
  const auto& args = golden::GoldenOverrides();
  for (std::size_t i = 0; i + 1 < args.size(); i += 2) {
    EXPECT_EQ(args[i], "--set");
    sets.push_back(args[i + 1]);
  }
  return sets;
}

std::vector<golden::PointCounts> GoldenTiny() {
  std::string error;
  std::vector<golden::PointCounts> tiny;
  for (const auto& p : golden::ReadGolden(&error)) {
    if (p.run == kTinyRun) tiny.push_back(p);
  }
  EXPECT_TRUE(error.empty()) << error;
  EXPECT_FALSE(tiny.empty());
  return tiny;
}

void ExpectGoldenCounts(const fs::path& h5) {
  const auto got = golden::ReadFileCounts(h5.string(), kTinyRun);
  const auto want = GoldenTiny();
  ASSERT_EQ(got.size(), want.size());
  for (std::size_t i = 0; i < got.size(); ++i) {
    EXPECT_EQ(golden::Format(got[i]), golden::Format(want[i]));
  }
}

struct Outcome {
  int status;
  std::string out, err;
};

Outcome RunCaptured(RunOptions o) {
  std::ostringstream out, err;
  o.out = &out;
  o.err = &err;
  const int status = Run(o);
  return {status, out.str(), err.str()};
}

RunOptions Tiny(const fs::path& output) {
  RunOptions o;
  o.config_path = TinyConfig();
  o.overrides = GoldenSets();
  o.output = output.string();
  o.progress = ProgressMode::kOff;
  return o;
}

std::string Slurp(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  std::stringstream ss;
  ss << in.rdbuf();
  return ss.str();
}

// Every file below `dir` with its bytes.
std::map<std::string, std::string> Snapshot(const fs::path& dir) {
  std::map<std::string, std::string> files;
  for (const auto& e : fs::recursive_directory_iterator(dir)) {
    files[e.path().string()] = e.is_regular_file() ? Slurp(e.path()) : "<dir>";
  }
  return files;
}

TEST(Run, TinyConfigWritesTheFileWithTheGoldenCountsOfTheCli) {
  const fs::path dir = TempDir("tiny");
  const fs::path h5 = dir / "tiny.h5";
  for (long long threads : {1, 2}) {
    fs::remove(h5);
    RunOptions o = Tiny(h5);
    o.threads = threads;
    const Outcome r = RunCaptured(o);
    ASSERT_EQ(r.status, kExitDone) << r.err;
    EXPECT_EQ(r.err, "");
    EXPECT_NE(r.out.find("wrote " + h5.string() + "\n"), std::string::npos) << r.out;
    EXPECT_NE(r.out.find("qpsk"), std::string::npos) << r.out;
    auto stored = ReadCurvesFile(h5.string());
    ASSERT_TRUE(stored.ok()) << stored.status().message();
    EXPECT_EQ(stored.value().threads, threads);
    ExpectGoldenCounts(h5);
    auto ckpt = ReadCheckpoint(CheckpointPath(h5.string()));
    ASSERT_TRUE(ckpt.ok()) << ckpt.status().message();
    EXPECT_TRUE(ckpt.value().complete);
  }
  fs::remove_all(dir);
}

TEST(Run, InterruptSetBeforeTheStartGives75AndACheckpointThatResumes) {
  const fs::path dir = TempDir("interrupt");
  const fs::path h5 = dir / "tiny.h5";
  const std::string ckpt_path = CheckpointPath(h5.string());
  std::atomic<bool> stop{true};
  RunOptions o = Tiny(h5);
  o.interrupt = &stop;
  const Outcome r = RunCaptured(o);
  EXPECT_EQ(r.status, kExitStopped) << r.err;
  EXPECT_NE(r.err.find("capgap: stopped by signal; checkpoint " + ckpt_path + " saved"),
            std::string::npos)
      << r.err;
  EXPECT_NE(r.err.find("--resume"), std::string::npos) << r.err;
  EXPECT_EQ(r.out, "");
  EXPECT_FALSE(fs::exists(h5));  // no curves file until the run is complete
  auto ckpt = ReadCheckpoint(ckpt_path);
  ASSERT_TRUE(ckpt.ok()) << ckpt.status().message();
  EXPECT_FALSE(ckpt.value().complete);
  EXPECT_EQ(ckpt.value().schemes.size(), 3u);

  // Without --resume the unfinished run is protected; with it, it finishes
  // to the counts of an uninterrupted run.
  stop = false;
  const Outcome again = RunCaptured(o);
  EXPECT_EQ(again.status, kExitFailed);
  EXPECT_NE(again.err.find(ckpt_path + " holds an unfinished run"), std::string::npos) << again.err;
  o.resume = true;
  const Outcome resumed = RunCaptured(o);
  ASSERT_EQ(resumed.status, kExitDone) << resumed.err;
  ExpectGoldenCounts(h5);
  fs::remove_all(dir);
}

// A checkpoint whose checksum is valid but whose counts are impossible is
// refused on resume with status 1 and a message naming the record, before
// anything is written: the checkpoint and the curves file keep their bytes.
TEST(Run, ResumeRefusesImpossibleCountsAndRewritesNothing) {
  const fs::path dir = TempDir("badcounts");
  const fs::path h5 = dir / "tiny.h5";
  const std::string ckpt_path = CheckpointPath(h5.string());
  ASSERT_EQ(RunCaptured(Tiny(h5)).status, kExitDone);
  const auto good = ReadCheckpoint(ckpt_path);
  ASSERT_TRUE(good.ok()) << good.status().message();
  // The first point of the second scheme (16qam): a record rule the parser
  // checks alone, and the two rules that need the chain.
  const PointRecord p0 = good.value().schemes.at(1).points.at(0);
  ASSERT_GT(p0.counts.frames, p0.units);  // units + 1 passes the parser's frames >= units
  struct Case {
    std::function<void(PointRecord&)> edit;
    std::string message;
  };
  const std::string head = "capgap: cannot resume: " + ckpt_path + ": line ";
  const std::vector<Case> cases = {
      {[](PointRecord& p) { p.counts.bit_errors = p.counts.bits + 1; },
       "scheme 16qam point 0: bit_errors = " + std::to_string(p0.counts.bits + 1) +
           " > bits = " + std::to_string(p0.counts.bits) + "\n"},
      {[](PointRecord& p) { p.units += 1; },
       "capgap: cannot resume from " + ckpt_path + ": scheme 16qam point 0: frames = " +
           std::to_string(p0.counts.frames) + " != units = " + std::to_string(p0.units + 1) +
           " x " + std::to_string(p0.counts.frames / p0.units) + " frames per unit\n"},
      {[](PointRecord& p) { p.counts.bits += 1; },
       "capgap: cannot resume from " + ckpt_path + ": scheme 16qam point 0: bits = " +
           std::to_string(p0.counts.bits + 1) + " != frames = " + std::to_string(p0.counts.frames) +
           " x " + std::to_string(p0.counts.bits / p0.counts.frames) + " bits per frame\n"},
  };
  for (const Case& k : cases) {
    Checkpoint bad = good.value();
    bad.complete = false;
    k.edit(bad.schemes[1].points[0]);
    ASSERT_TRUE(WriteCheckpoint(ckpt_path, bad).ok());
    const auto before = Snapshot(dir);
    RunOptions o = Tiny(h5);
    o.resume = true;
    const Outcome r = RunCaptured(o);
    EXPECT_EQ(r.status, kExitFailed) << r.err;
    if (k.message.rfind("capgap: ", 0) == 0) {
      EXPECT_EQ(r.err, k.message);
    } else {
      EXPECT_EQ(r.err.rfind(head, 0), 0u) << r.err;
      ASSERT_NE(r.err.find("scheme "), std::string::npos) << r.err;
      EXPECT_EQ(r.err.substr(r.err.find("scheme ")), k.message);
    }
    EXPECT_EQ(r.out, "");
    EXPECT_EQ(Snapshot(dir), before);  // checkpoint and curves file untouched
  }
  fs::remove_all(dir);
}

TEST(Run, BadConfigGives1WithOneLineOnTheErrorStreamAndNoFile) {
  const fs::path dir = TempDir("badcfg");
  RunOptions o = Tiny(dir / "bad.h5");
  o.overrides.push_back("sweep.stop_bit_errors=-5");
  Outcome r = RunCaptured(o);
  EXPECT_EQ(r.status, kExitFailed);
  EXPECT_EQ(r.err,
            "capgap: " + TinyConfig() + ": sweep.stop_bit_errors = '-5': must be an integer >= 0 (0: no bit-error target)\n");
  EXPECT_EQ(r.out, "");
  o = Tiny(dir / "bad.h5");
  o.config_path = (dir / "missing.ini").string();
  r = RunCaptured(o);
  EXPECT_EQ(r.status, kExitFailed);
  EXPECT_EQ(r.err, "capgap: " + (dir / "missing.ini").string() + ": cannot open config file\n");
  EXPECT_TRUE(fs::is_empty(dir));
  fs::remove_all(dir);
}

// A refused run: `mutate` spoils the options of a run whose output already
// exists (a finished earlier run); the status and the message are exact,
// and every file in the directory keeps its bytes, none is added.
struct Refusal {
  const char* what;
  std::function<void(RunOptions&, const fs::path& dir)> mutate;
  int status;
  std::function<std::string(const fs::path& dir)> message;
};

TEST(Run, RefusedArgumentsHaveOneStatusRuleAndLeavePreviousOutputsIntact) {
  const fs::path dir = TempDir("refused");
  const fs::path h5 = dir / "prev.h5";
  ASSERT_EQ(RunCaptured(Tiny(h5)).status, kExitDone);
  fs::create_directories(dir / "sub");
  { std::ofstream(dir / "plain.txt") << "not a directory\n"; }
  const std::string threads_rule = ": must be an integer in [0, 4096] (0: all cores)\n";
  const std::string seed_rule = ": must be an integer in [0, 18446744073709551615]\n";
  const std::vector<Refusal> cases = {
      {"--threads -1", [](RunOptions& o, const fs::path&) { o.threads = -1; }, kExitUsage,
       [&](const fs::path&) { return "capgap: run: --threads = -1" + threads_rule; }},
      {"--threads 100000", [](RunOptions& o, const fs::path&) { o.threads = 100000; }, kExitUsage,
       [&](const fs::path&) { return "capgap: run: --threads = 100000" + threads_rule; }},
      {"--seed -3", [](RunOptions& o, const fs::path&) { o.seed = "-3"; }, kExitUsage,
       [&](const fs::path&) { return "capgap: run: --seed = '-3'" + seed_rule; }},
      {"--seed abc", [](RunOptions& o, const fs::path&) { o.seed = "abc"; }, kExitUsage,
       [&](const fs::path&) { return "capgap: run: --seed = 'abc'" + seed_rule; }},
      {"--seed 2^64", [](RunOptions& o, const fs::path&) { o.seed = "18446744073709551616"; },
       kExitUsage,
       [&](const fs::path&) { return "capgap: run: --seed = '18446744073709551616'" + seed_rule; }},
      {"--set without =",
       [](RunOptions& o, const fs::path&) { o.overrides.push_back("sweep.seed"); }, kExitUsage,
       [](const fs::path&) {
         return std::string(
             "capgap: run: --set 'sweep.seed': expected KEY=VALUE, e.g. --set "
             "sweep.stop_bit_errors=500\n");
       }},
      {"--set =5", [](RunOptions& o, const fs::path&) { o.overrides.push_back("=5"); }, kExitUsage,
       [](const fs::path&) {
         return std::string(
             "capgap: run: --set '=5': expected KEY=VALUE, e.g. --set "
             "sweep.stop_bit_errors=500\n");
       }},
      {"-o ''", [](RunOptions& o, const fs::path&) { o.output = ""; }, kExitUsage,
       [](const fs::path&) {
         return std::string(
             "capgap: run: -o '': must name the output file, e.g. -o "
             "results/curves.h5\n");
       }},
      {"-o DIR/", [](RunOptions& o, const fs::path& d) { o.output = (d / "sub").string() + "/"; },
       kExitUsage,
       [](const fs::path& d) {
         const std::string s = (d / "sub").string() + "/";
         return "capgap: run: -o '" + s +
                "': ends in '/', which names a directory; give a file "
                "name, e.g. -o " +
                s + "curves.h5\n";
       }},
      {"-o DIR", [](RunOptions& o, const fs::path& d) { o.output = (d / "sub").string(); },
       kExitFailed,
       [](const fs::path& d) {
         const std::string s = (d / "sub").string();
         return "capgap: run: -o '" + s + "': is a directory; give a file name, e.g. " + s +
                "/curves.h5\n";
       }},
      {"-o MISSING/x.h5",
       [](RunOptions& o, const fs::path& d) { o.output = (d / "no" / "x.h5").string(); },
       kExitFailed,
       [](const fs::path& d) {
         return "capgap: run: -o '" + (d / "no" / "x.h5").string() + "': directory '" +
                (d / "no").string() + "' does not exist (create it first)\n";
       }},
      {"-o FILE/x.h5",
       [](RunOptions& o, const fs::path& d) { o.output = (d / "plain.txt" / "x.h5").string(); },
       kExitFailed,
       [](const fs::path& d) {
         return "capgap: run: -o '" + (d / "plain.txt" / "x.h5").string() + "': '" +
                (d / "plain.txt").string() + "' is not a directory\n";
       }},
      // A --set value is a config value: the config rule, status 1.
      {"--set sweep.threads=-1",
       [](RunOptions& o, const fs::path&) { o.overrides.push_back("sweep.threads=-1"); },
       kExitFailed,
       [](const fs::path&) {
         return "capgap: " + TinyConfig() +
                ": sweep.threads = '-1': must be an integer in [0, 4096] (0: all cores)\n";
       }},
  };
  const auto before = Snapshot(dir);
  for (const Refusal& c : cases) {
    RunOptions o = Tiny(h5);
    c.mutate(o, dir);
    const Outcome r = RunCaptured(o);
    EXPECT_EQ(r.status, c.status) << c.what;
    EXPECT_EQ(r.err, c.message(dir)) << c.what;
    EXPECT_EQ(r.out, "") << c.what;
    EXPECT_TRUE(Snapshot(dir) == before) << c.what << ": a file was written, changed or removed";
  }
  EXPECT_FALSE(fs::exists(dir / "sub.ckpt"));
  EXPECT_FALSE(fs::exists(dir / "no"));
  // The usage errors are decided without reading any file: a missing config
  // does not hide them.
  RunOptions o = Tiny(h5);
  o.config_path = (dir / "missing.ini").string();
  o.threads = -1;
  EXPECT_EQ(RunCaptured(o).status, kExitUsage);
  fs::remove_all(dir);
}

TEST(Run, UnwritableOutputDirectoryIsRefusedNamingIt) {
  if (::geteuid() == 0) GTEST_SKIP() << "root may write anywhere: no unwritable directory to test";
  const fs::path dir = TempDir("ro");
  const fs::path ro = dir / "ro";
  fs::create_directories(ro);
  ASSERT_EQ(::chmod(ro.c_str(), 0500), 0);
  const Outcome r = RunCaptured(Tiny(ro / "x.h5"));
  EXPECT_EQ(r.status, kExitFailed);
  EXPECT_EQ(r.err, "capgap: run: -o '" + (ro / "x.h5").string() + "': directory '" + ro.string() +
                       "' is not writable\n");
  EXPECT_TRUE(fs::is_empty(ro));
  ::chmod(ro.c_str(), 0700);
  fs::remove_all(dir);
}

TEST(Run, ArgumentCheckNamesTheCommandLineOptionNotTheConfigKey) {
  RunOptions o;
  o.config_path = TinyConfig();
  o.seed = "12x";
  Status s = CheckRunArguments(o);
  ASSERT_FALSE(s.ok());
  EXPECT_NE(s.message().find("--seed"), std::string::npos) << s.message();
  EXPECT_EQ(s.message().find("sweep.seed"), std::string::npos) << s.message();
  o.seed = "18446744073709551615";  // 2^64 - 1, the largest seed
  o.threads = 4096;
  EXPECT_TRUE(CheckRunArguments(o).ok());
  o.threads = 4097;
  s = CheckRunArguments(o);
  ASSERT_FALSE(s.ok());
  EXPECT_NE(s.message().find("--threads"), std::string::npos) << s.message();
  EXPECT_EQ(s.message().find("sweep.threads"), std::string::npos) << s.message();
  o = RunOptions{};
  EXPECT_EQ(CheckRunArguments(o).message(), "run: missing CONFIG (see capgap run --help)");
}

}  // namespace
}  // namespace capgap
