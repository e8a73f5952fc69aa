// Checkpoint file: every UnitCounts field survives the text format and the MPI
// packing; a damaged, truncated or foreign file is refused with the reason; a
// write replaced by a kill at any instant leaves a good copy; and the resume
// rules refuse exactly the changes that would alter recorded streams, naming
// the key.
#include "sim/io/checkpoint.h"

#include <signal.h>
#include <sys/wait.h>
#include <sys/stat.h>
#include <unistd.h>

#include <cinttypes>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <functional>
#include <random>
#include <sstream>

#include <gtest/gtest.h>

namespace capgap {
namespace {

namespace fs = std::filesystem;

fs::path TempDir(const std::string& name) {
  fs::path dir = fs::temp_directory_path() /
                 ("capgap_checkpoint_test_" + std::to_string(::getpid()) + "_" + name);
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

// Every field a different non-zero value that real units could sum to (the
// reader refuses impossible counts): field k of point p is p * 1000 + an
// offset in 50..900, ordered bits > bit errors > frames > frame errors >
// undetected, iterations between max and frames x max.
UnitCounts DistinctCounts(std::uint64_t p) {
  UnitCounts c;
  const std::uint64_t offsets[kUnitCountFields] = {900, 500, 300, 200, 400, 100, 50};
  std::size_t k = 0;
  ForEachCountField(c, [&](const char*, auto& field) {
    field = static_cast<std::remove_reference_t<decltype(field)>>(p * 1000 + offsets[k++]);
  });
  return c;
}

const char kConfig[] =
    "[sweep]\nebno_db = 0 to 4 by 1\nstop_bit_errors = 100\nstop_bits = 1000000\nseed = 7\n"
    "[scheme.qpsk]\nmodulation = qpsk\nframe_bits = 960\n"
    "[scheme.q16]\nmodulation = 16qam\nframe_bits = 960\n";

RunConfig Config(const std::vector<std::string>& overrides = {}) {
  auto r = ParseRunConfig(kConfig, "test.ini", overrides);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return r.value();
}

Checkpoint MakeCheckpoint(std::size_t points_per_scheme = 3) {
  const RunConfig cfg = Config();
  Checkpoint c;
  c.seed = 7;
  c.kernel_target = "AVX2";
  c.updated_utc = "2026-01-02T03:04:05Z";
  c.config_text = cfg.ResolvedText();
  for (const char* name : {"qpsk", "q16"}) {
    SchemeRecord s;
    s.name = name;
    for (std::size_t i = 0; i < points_per_scheme; ++i) {
      PointRecord p;
      p.ebno_db = static_cast<double>(i);
      p.units = static_cast<std::uint32_t>(10 * i + 3);
      p.counts = DistinctCounts(i + 1);
      p.finished = i + 1 < points_per_scheme;
      p.stop_reason = p.finished ? (i % 2 ? StopReason::kStopBits : StopReason::kStopBitErrors)
                                 : StopReason::kInterrupted;
      p.seconds = 0.1 * static_cast<double>(i) + 1.0 / 3.0;
      s.points.push_back(p);
    }
    c.schemes.push_back(s);
  }
  return c;
}

void ExpectSame(const Checkpoint& a, const Checkpoint& b) {
  EXPECT_EQ(a.complete, b.complete);
  EXPECT_EQ(a.seed, b.seed);
  EXPECT_EQ(a.kernel_target, b.kernel_target);
  EXPECT_EQ(a.updated_utc, b.updated_utc);
  EXPECT_EQ(a.config_text, b.config_text);
  ASSERT_EQ(a.schemes.size(), b.schemes.size());
  for (std::size_t s = 0; s < a.schemes.size(); ++s) {
    EXPECT_EQ(a.schemes[s].name, b.schemes[s].name);
    ASSERT_EQ(a.schemes[s].points.size(), b.schemes[s].points.size());
    for (std::size_t i = 0; i < a.schemes[s].points.size(); ++i) {
      const PointRecord& x = a.schemes[s].points[i];
      const PointRecord& y = b.schemes[s].points[i];
      EXPECT_EQ(x.ebno_db, y.ebno_db);
      EXPECT_EQ(x.units, y.units);
      EXPECT_EQ(x.counts, y.counts);  // every field (defaulted operator==)
      EXPECT_EQ(x.finished, y.finished);
      EXPECT_EQ(x.stop_reason, y.stop_reason);
      EXPECT_EQ(x.seconds, y.seconds);  // %.17g round-trips a double exactly
    }
  }
}

// FNV-1a 64, written here independently of checkpoint.cc to forge files with
// a valid checksum (offset basis and prime from memory, as there).
std::string WithChecksum(const std::string& body) {
  std::uint64_t h = 0xcbf29ce484222325ull;
  for (char ch : body) {
    h ^= static_cast<unsigned char>(ch);
    h *= 0x100000001b3ull;
  }
  char sum[40];
  std::snprintf(sum, sizeof sum, "checksum %016" PRIx64 "\n", h);
  return body + sum;
}

std::string Body(const std::string& file) {
  const auto last = file.rfind('\n', file.size() - 2);
  return file.substr(0, last + 1);
}

TEST(Checkpoint, RoundTripKeepsEveryField) {
  Checkpoint c = MakeCheckpoint();
  auto back = ParseCheckpoint(SerializeCheckpoint(c), "x.ckpt");
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSame(c, back.value());
  c.complete = true;
  c.config_text = "[sweep]\nebno_db = 1";  // no final newline
  back = ParseCheckpoint(SerializeCheckpoint(c), "x.ckpt");
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSame(c, back.value());
  EXPECT_EQ(back.value().FinishedPoints(), 4u);
  EXPECT_EQ(back.value().RecordedPoints(), 6u);
}

TEST(Checkpoint, PackingCoversEveryField) {
  std::size_t fields = 0;
  UnitCounts probe;
  ForEachCountField(probe, [&](const char*, auto&) { ++fields; });
  EXPECT_EQ(fields, kUnitCountFields);
  const UnitCounts c = DistinctCounts(42);
  std::uint64_t words[kUnitCountFields];
  PackCounts(c, words);
  EXPECT_EQ(UnpackCounts(words), c);
  // No field left at its default by DistinctCounts, so a dropped field shows.
  EXPECT_FALSE(UnpackCounts(words) == UnitCounts{});
}

TEST(Checkpoint, EveryTruncationIsRefused) {
  const std::string text = SerializeCheckpoint(MakeCheckpoint());
  for (std::size_t n = 0; n < text.size(); ++n) {
    auto r = ParseCheckpoint(text.substr(0, n), "x.ckpt");
    ASSERT_FALSE(r.ok()) << "accepted a file cut at byte " << n << " of " << text.size();
  }
}

TEST(Checkpoint, DamagedOrForeignFilesAreRefusedWithTheReason) {
  const std::string text = SerializeCheckpoint(MakeCheckpoint());
  std::string flipped = text;
  char& digit = flipped[text.find("bit_errors=") + 11];
  digit = digit == '1' ? '2' : '1';  // a count digit
  auto r = ParseCheckpoint(flipped, "x.ckpt");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("x.ckpt: checksum mismatch (file damaged)"), std::string::npos)
      << r.status().message();

  r = ParseCheckpoint("[sweep]\nebno_db = 1\n", "x.ckpt");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "x.ckpt: not a capgap checkpoint (first line is not 'capgap-checkpoint N')");

  std::string v3 = Body(text);
  v3.replace(0, v3.find('\n'), "capgap-checkpoint 3");
  r = ParseCheckpoint(WithChecksum(v3), "x.ckpt");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "x.ckpt: checkpoint version 3 is not supported (this program reads 1 and 2)");

  // A point line without one of the UnitCounts fields (an older writer).
  std::string old = Body(text);
  const auto pos = old.find(" undetected_frame_errors=");
  old.erase(pos, old.find('\n', pos) - pos);
  r = ParseCheckpoint(WithChecksum(old), "x.ckpt");
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("point 0: field 'undetected_frame_errors' missing or invalid"),
            std::string::npos)
      << r.status().message();
}

// A valid checksum proves the file undamaged, not its numbers sound: every
// count rule is checked, naming the scheme and point.
TEST(Checkpoint, ImpossibleCountsWithAValidChecksumAreRefused) {
  struct Case {
    std::function<void(PointRecord&)> edit;
    std::string rule;
  };
  const std::vector<Case> cases = {
      {[](PointRecord& p) { p.counts.bit_errors = p.counts.bits + 1; },
       "bit_errors = 2901 > bits = 2900"},
      {[](PointRecord& p) { p.counts.frame_errors = p.counts.frames + 1; },
       "frame_errors = 2301 > frames = 2300"},
      {[](PointRecord& p) { p.counts.undetected_frame_errors = p.counts.frame_errors + 1; },
       "undetected_frame_errors = 2201 > frame_errors = 2200"},
      {[](PointRecord& p) { p.counts.bits = 0; p.counts.bit_errors = 0; },
       "frames = 2300 and bits = 0: both zero or both positive"},
      {[](PointRecord& p) { p.units = 5000; }, "frames = 2300 < units = 5000: every unit has a frame"},
      {[](PointRecord& p) { p.units = 0; }, "units = 0 but frames = 2300: an empty prefix counts nothing"},
      {[](PointRecord& p) { p.counts.frame_errors = 0; p.counts.undetected_frame_errors = 0; },
       "bit_errors = 2500 but frame_errors = 0"},
      {[](PointRecord& p) { p.counts.frame_errors = p.counts.bit_errors + 1; p.counts.frames = p.counts.bits; },
       "frame_errors = 2501 > bit_errors = 2500: an erroneous frame has a bit error"},
      {[](PointRecord& p) { p.counts.max_decoder_iterations = 3000; },
       "max_decoder_iterations = 3000 > decoder_iterations = 2400"},
      {[](PointRecord& p) { p.counts.max_decoder_iterations = 1; },
       "decoder_iterations = 2400 > frames x max_decoder_iterations = 2300 x 1"},
      {[](PointRecord& p) { p.seconds = -1; }, "seconds must be finite and >= 0"},
  };
  for (const Case& k : cases) {
    Checkpoint c = MakeCheckpoint();
    k.edit(c.schemes[1].points[1]);
    const auto r = ParseCheckpoint(SerializeCheckpoint(c), "x.ckpt");
    ASSERT_FALSE(r.ok()) << k.rule;
    const std::string& m = r.status().message();
    ASSERT_NE(m.find("scheme "), std::string::npos) << m;
    EXPECT_EQ(m.substr(m.find("scheme ")), "scheme q16 point 1: " + k.rule) << m;
    EXPECT_EQ(m.rfind("x.ckpt: line ", 0), 0u) << m;
  }
}

// Files that cannot be a checkpoint are refused without being read whole: a
// link to /dev/zero, a FIFO (no wait for a writer), a directory, a file over
// the size limit.
TEST(Checkpoint, NonFilesAndHugeFilesAreRefusedWithoutReading) {
  const fs::path dir = TempDir("nonfiles");
  const std::string link = (dir / "zero.ckpt").string();
  fs::create_symlink("/dev/zero", link);
  auto r = ReadCheckpoint(link);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), link + ": is not a regular file (a character device)");
  const std::string fifo = (dir / "fifo.ckpt").string();
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  r = ReadCheckpoint(fifo);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), fifo + ": is not a regular file (a FIFO)");
  r = ReadCheckpoint(dir.string());
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), dir.string() + ": is a directory, not a checkpoint");
  const std::string huge = (dir / "huge.ckpt").string();
  {
    std::ofstream out(huge, std::ios::binary);
    out << SerializeCheckpoint(MakeCheckpoint());
  }
  fs::resize_file(huge, kMaxCheckpointBytes + 1);  // sparse: no disk used
  r = ReadCheckpoint(huge);
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), huge + ": is " + std::to_string(kMaxCheckpointBytes + 1) +
                                      " bytes; a checkpoint may have at most " +
                                      std::to_string(kMaxCheckpointBytes) + " bytes");
  fs::remove_all(dir);
}

TEST(Checkpoint, WriteReplacesTheFileAndLeavesNoTemporary) {
  const fs::path dir = TempDir("write");
  const std::string path = (dir / "run.h5.ckpt").string();
  Checkpoint a = MakeCheckpoint(2), b = MakeCheckpoint(3);
  ASSERT_TRUE(WriteCheckpoint(path, a).ok());
  ASSERT_TRUE(WriteCheckpoint(path, b).ok());
  auto back = ReadCheckpoint(path);
  ASSERT_TRUE(back.ok()) << back.status().message();
  ExpectSame(b, back.value());
  int entries = 0;
  for (const auto& e : fs::directory_iterator(dir)) {
    ++entries;
    EXPECT_EQ(e.path().filename(), "run.h5.ckpt");
  }
  EXPECT_EQ(entries, 1);
  const Status missing_dir = WriteCheckpoint((dir / "no" / "such" / "x.ckpt").string(), a);
  EXPECT_FALSE(missing_dir.ok());
  EXPECT_NE(missing_dir.message().find("cannot create"), std::string::npos) << missing_dir.message();
  const auto gone = ReadCheckpoint((dir / "absent.ckpt").string());
  ASSERT_FALSE(gone.ok());
  EXPECT_EQ(gone.status().message(), (dir / "absent.ckpt").string() + ": cannot open checkpoint");
  fs::remove_all(dir);
}

// A child rewrites a large checkpoint (two versions in turn) as fast as it
// can; SIGKILL at random instants must always leave one complete version.
// 25 kills at uniform delays in [0, 30] ms: with writes taking about a
// millisecond, most kills land inside a write.
TEST(Checkpoint, KillDuringWriteLeavesTheLastGoodCopy) {
  const fs::path dir = TempDir("kill");
  const std::string path = (dir / "run.h5.ckpt").string();
  const Checkpoint a = MakeCheckpoint(400), b = MakeCheckpoint(401);
  ASSERT_TRUE(WriteCheckpoint(path, a).ok());
  std::mt19937 rng(std::random_device{}());
  std::uniform_int_distribution<int> delay_us(0, 30000);
  for (int round = 0; round < 25; ++round) {
    const pid_t child = ::fork();
    ASSERT_GE(child, 0);
    if (child == 0) {
      for (int i = 0;; ++i) {
        if (!WriteCheckpoint(path, i % 2 ? a : b).ok()) ::_exit(3);
      }
    }
    ::usleep(static_cast<useconds_t>(delay_us(rng)));
    ::kill(child, SIGKILL);
    int status = 0;
    ::waitpid(child, &status, 0);
    ASSERT_TRUE(WIFSIGNALED(status)) << "writer failed with status " << status;
    auto back = ReadCheckpoint(path);
    ASSERT_TRUE(back.ok()) << "round " << round << ": " << back.status().message();
    const std::size_t n = back.value().schemes[0].points.size();
    EXPECT_TRUE(n == 400 || n == 401) << n;
  }
  fs::remove_all(dir);
}

// ------------------------------------------------------------ resume rules
Checkpoint RecordedFor(const RunConfig& cfg, std::size_t points) {
  Checkpoint c;
  c.seed = cfg.sweep.seed;
  c.config_text = cfg.ResolvedText();
  for (const SchemeConfig& s : cfg.schemes) {
    SchemeRecord r;
    r.name = s.name;
    for (std::size_t i = 0; i < points; ++i) {
      PointRecord p;
      p.ebno_db = cfg.sweep.ebno_db[i];
      r.points.push_back(p);
    }
    c.schemes.push_back(r);
  }
  return c;
}

std::string Refusal(const std::vector<std::string>& overrides, const std::string& extra_text = "") {
  const Checkpoint c = RecordedFor(Config(), 3);
  auto cfg = ParseRunConfig(std::string(kConfig) + extra_text, "test.ini", overrides);
  EXPECT_TRUE(cfg.ok()) << cfg.status().message();
  const Status s = CheckResumable(c, cfg.value(), "r.ckpt");
  return s.ok() ? "" : s.message();
}

const char kFixed[] =
    "; it fixes the random streams of the recorded work (start a new output file to change it)";

TEST(CheckResumable, ExtensionKeysAreAllowed) {
  EXPECT_EQ(Refusal({}), "");
  EXPECT_EQ(Refusal({"sweep.stop_bit_errors=1000", "sweep.stop_bits=5000000", "sweep.ber_floor=0",
                     "sweep.target_ber=1e-4", "sweep.target_fer=1e-3", "sweep.threads=3",
                     "sweep.checkpoint_seconds=5"}),
            "");
  EXPECT_EQ(Refusal({"sweep.ebno_db=0 to 9 by 1"}), "");  // points appended
  EXPECT_EQ(Refusal({"sweep.ebno_db=0,1"}), "");    // fewer points: recorded ones beyond are dropped
  EXPECT_EQ(Refusal({}, "[scheme.extra]\nmodulation = bpsk\n"), "");  // a new scheme runs fresh
}

TEST(CheckResumable, ChangesThatAlterRecordedStreamsAreRefusedNamingTheKey) {
  EXPECT_EQ(Refusal({"scheme.qpsk.frame_bits=1920"}),
            std::string("cannot resume from r.ckpt: scheme.qpsk.frame_bits changed from '960' to "
                        "'1920'") + kFixed);
  EXPECT_EQ(Refusal({"scheme.q16.demapper=hard"}),
            std::string("cannot resume from r.ckpt: scheme.q16.demapper changed from 'maxlog' to "
                        "'hard'") + kFixed);
  // Switching shaping on also adds keys; the changed key is named first.
  EXPECT_EQ(Refusal({"scheme.qpsk.shaping=rrc"}),
            std::string("cannot resume from r.ckpt: scheme.qpsk.shaping changed from 'none' to "
                        "'rrc'") + kFixed);
  EXPECT_EQ(Refusal({"sweep.seed=8"}),
            std::string("cannot resume from r.ckpt: sweep.seed changed from 7 to 8") + kFixed);
  EXPECT_EQ(Refusal({"sweep.ebno_db=0,1.5,2"}),
            "cannot resume from r.ckpt: sweep.ebno_db point 1 (scheme qpsk) changed from 1 dB to "
            "1.5 dB; recorded points keep their Eb/N0 (append new points at the end)");
  EXPECT_EQ(Refusal({"sweep.stop_bit_errors=50"}),
            "cannot resume from r.ckpt: sweep.stop_bit_errors decreased from 100 to 50; a resume may "
            "only raise it (finished points may already hold more than the new value)");
  EXPECT_EQ(Refusal({"sweep.stop_bits=999999"}),
            "cannot resume from r.ckpt: sweep.stop_bits decreased from 1000000 to 999999; a resume "
            "may only raise it (finished points may already hold more than the new value)");
}

// Error targets on resume: stop_frame_errors (sweep or scheme key) may grow
// or go away, not shrink or appear (an unset target is infinite); target_fer
// is free.
TEST(CheckResumable, FrameErrorTargetMayOnlyGrow) {
  const auto refusal = [&](const std::vector<std::string>& overrides, bool recorded_with_frames) {
    auto old_cfg = ParseRunConfig(std::string(kConfig), "test.ini",
                                  recorded_with_frames
                                      ? std::vector<std::string>{"sweep.stop_frame_errors=50"}
                                      : std::vector<std::string>{});
    EXPECT_TRUE(old_cfg.ok()) << old_cfg.status().message();
    const Checkpoint c = RecordedFor(old_cfg.value(), 3);
    auto cfg = ParseRunConfig(std::string(kConfig), "test.ini", overrides);
    EXPECT_TRUE(cfg.ok()) << cfg.status().message();
    const Status s = CheckResumable(c, cfg.value(), "r.ckpt");
    return s.ok() ? std::string() : s.message();
  };
  EXPECT_EQ(refusal({"sweep.stop_frame_errors=80"}, true), "");
  EXPECT_EQ(refusal({"sweep.stop_frame_errors=80", "scheme.qpsk.stop_frame_errors=90"}, true), "");
  EXPECT_EQ(refusal({}, true), "");  // removed: infinite
  EXPECT_EQ(refusal({"sweep.stop_frame_errors=50", "sweep.target_fer=1e-3",
                     "scheme.q16.target_fer=1e-2"},
                    true),
            "");
  EXPECT_EQ(refusal({"sweep.stop_frame_errors=40"}, true),
            "cannot resume from r.ckpt: stop_frame_errors of scheme qpsk decreased from 50 to 40; "
            "a resume may only raise it (finished points may hold more frame errors than the new "
            "target)");
  EXPECT_EQ(refusal({"scheme.q16.stop_frame_errors=10"}, true),
            "cannot resume from r.ckpt: stop_frame_errors of scheme q16 decreased from 50 to 10; "
            "a resume may only raise it (finished points may hold more frame errors than the new "
            "target)");
  EXPECT_EQ(refusal({"sweep.stop_frame_errors=500"}, false),
            "cannot resume from r.ckpt: stop_frame_errors of scheme qpsk decreased from (none) to "
            "500; a resume may only raise it (finished points may hold more frame errors than the "
            "new target)");
  // stop_bit_errors = 0 (no bit-error target) is a raise to infinity.
  EXPECT_EQ(refusal({"sweep.stop_bit_errors=0", "sweep.stop_frame_errors=50"}, true), "");
}

TEST(CheckResumable, RecordedSchemeMissingFromConfigIsRefused) {
  const Checkpoint c = RecordedFor(Config(), 2);
  auto cfg = ParseRunConfig(
      "[sweep]\nebno_db = 0 to 4 by 1\nstop_bit_errors = 100\nstop_bits = 1000000\nseed = 7\n"
      "[scheme.qpsk]\nmodulation = qpsk\nframe_bits = 960\n",
      "test.ini", {});
  ASSERT_TRUE(cfg.ok());
  EXPECT_EQ(CheckResumable(c, cfg.value(), "r.ckpt").message(),
            "cannot resume from r.ckpt: scheme 'q16' is recorded in the checkpoint but missing "
            "from the configuration");
}

}  // namespace
}  // namespace capgap

namespace capgap {
namespace {

// A checkpoint written before the rename of the stopping keys (version 1,
// kept in the fuzz corpus as an earlier build wrote it) is read: its stop
// words and stored configuration come back in today's spelling, and a config
// written with the new names resumes from it.
TEST(CheckpointV1, OldCheckpointIsReadWithTheNewNames) {
  const std::string path = std::string(CAPGAP_SOURCE_DIR) + "/tests/fuzz/corpus/checkpoint/small_plain.ckpt";
  std::ifstream in(path, std::ios::binary);
  ASSERT_TRUE(in.good()) << path;
  std::stringstream raw;
  raw << in.rdbuf();
  // A fuzz input's first byte is the harness's mode (tests/fuzz/fuzz_checkpoint.cc);
  // the checkpoint file follows it byte for byte.
  ASSERT_FALSE(raw.str().empty());
  const std::string bytes = raw.str().substr(1);
  ASSERT_EQ(bytes.rfind("capgap-checkpoint 1\n", 0), 0u);
  auto c = ParseCheckpoint(bytes, path);
  ASSERT_TRUE(c.ok()) << c.status().message();
  ASSERT_EQ(c.value().schemes.size(), 1u);
  ASSERT_EQ(c.value().schemes[0].points.size(), 2u);
  EXPECT_EQ(c.value().schemes[0].points[0].stop_reason, StopReason::kStopBitErrors);
  const std::string& text = c.value().config_text;
  EXPECT_NE(text.find("\nebno_db = 0 to 4 by 4\n"), std::string::npos) << text;
  EXPECT_NE(text.find("\nstop_bit_errors = 10\n"), std::string::npos) << text;
  EXPECT_NE(text.find("\nstop_bits = 20000\n"), std::string::npos) << text;
  EXPECT_EQ(text.find("target_errors"), std::string::npos) << text;
  EXPECT_EQ(text.find("max_bits"), std::string::npos) << text;

  const char kNew[] =
      "[sweep]\nebno_db = 0 to 4 by 4\nstop_bit_errors = 10\nstop_bits = 20000\nseed = 1\n"
      "[scheme.q]\nmodulation = qpsk\nframe_bits = 96\ndemapper = maxlog\n";
  auto cfg = ParseRunConfig(kNew, "new.ini", {});
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  EXPECT_TRUE(CheckResumable(c.value(), cfg.value(), "old.ckpt").ok());
  // Lowering the renamed key is refused under its new name.
  auto lower = ParseRunConfig(kNew, "new.ini", {"sweep.stop_bit_errors=5"});
  ASSERT_TRUE(lower.ok());
  const Status s = CheckResumable(c.value(), lower.value(), "old.ckpt");
  ASSERT_FALSE(s.ok());
  EXPECT_NE(s.message().find("sweep.stop_bit_errors decreased from 10 to 5"), std::string::npos)
      << s.message();
  // Written again, it is a version 2 file with the new words.
  const std::string again = SerializeCheckpoint(c.value());
  EXPECT_EQ(again.rfind("capgap-checkpoint 2\n", 0), 0u);
  EXPECT_NE(again.find(" stop=stop_bit_errors "), std::string::npos);
}

TEST(CheckpointV1, UpgradeRewritesOnlyTheRenamedKeysAndRanges) {
  EXPECT_EQ(UpgradeV1ConfigText("[sweep]\nebno_db = -2:0.5:3\ntarget_errors = 7\nmax_bits = 9\n"
                                "\n[scheme.a]\nebno_db = 1,2\nframe_bits = 8\n"
                                "[scheme.b]\nebno_db = 0.5:0.25:3\n"),
            "[sweep]\nebno_db = -2 to 3 by 0.5\nstop_bit_errors = 7\nstop_bits = 9\n"
            "\n[scheme.a]\nebno_db = 1,2\nframe_bits = 8\n"
            "[scheme.b]\nebno_db = 0.5 to 3 by 0.25\n");
  // Both forms give the same points, so recorded points keep their values.
  EXPECT_EQ(ParseDbList("0.5 to 3 by 0.25", "x").value().size(), 11u);
}

// A version 2 file must carry the new names: old ones in its stored
// configuration are not rewritten, and resuming from it names the rename.
TEST(CheckpointV1, OldNamesInAVersion2FileAreRefusedOnResume) {
  Checkpoint c;
  c.seed = 1;
  c.config_text = "[sweep]\nebno_db = 1\ntarget_errors = 10\nseed = 1\n[scheme.q]\nmodulation = qpsk\n";
  auto parsed = ParseCheckpoint(SerializeCheckpoint(c), "v2.ckpt");
  ASSERT_TRUE(parsed.ok()) << parsed.status().message();
  auto cfg = ParseRunConfig("[sweep]\nebno_db = 1\nseed = 1\n[scheme.q]\nmodulation = qpsk\n", "n.ini", {});
  ASSERT_TRUE(cfg.ok());
  const Status s = CheckResumable(parsed.value(), cfg.value(), "v2.ckpt");
  ASSERT_FALSE(s.ok());
  EXPECT_NE(s.message().find("was renamed: write 'sweep.stop_bit_errors'"), std::string::npos)
      << s.message();
}

}  // namespace
}  // namespace capgap
