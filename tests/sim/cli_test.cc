// The capgap binary as a user meets it: bad input gives one clear line and a
// non-zero exit with nothing left behind; --threads 1 and --threads 2 write
// identical counts; theory --csv is machine-readable; summary reads a file.
#include <sys/wait.h>
#include <unistd.h>

#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <string>

#include <gtest/gtest.h>

#include "sim/io/curves_file.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

struct Output {
  int status;
  std::string text;  // stdout and stderr
};

Output Capgap(const std::string& args) {
  const std::string cmd = std::string(CAPGAP_BINARY_DIR) + "/capgap " + args + " 2>&1";
  FILE* p = popen(cmd.c_str(), "r");
  Output out{-1, ""};
  if (!p) return out;
  char buf[4096];
  while (std::fgets(buf, sizeof buf, p)) out.text += buf;
  const int raw = pclose(p);
  out.status = WIFEXITED(raw) ? WEXITSTATUS(raw) : -1;
  return out;
}

std::string Config(const std::string& name) {
  return std::string(CAPGAP_SOURCE_DIR) + "/configs/" + name;
}

fs::path TempDir() {
  fs::path dir = fs::temp_directory_path() / ("capgap_cli_test_" + std::to_string(::getpid()));
  fs::create_directories(dir);
  return dir;
}

TEST(Cli, BadConfigValueGivesOneLineAndNoFile) {
  const fs::path out = TempDir() / "bad.h5";
  const Output o = Capgap("run " + Config("ci_tiny.ini") + " -o " + out.string() +
                          " --quiet --set sweep.stop_bit_errors=-5");
  EXPECT_EQ(o.status, 1);
  EXPECT_EQ(o.text, "capgap: " + Config("ci_tiny.ini") +
                        ": sweep.stop_bit_errors = '-5': must be an integer >= 0 (0: no bit-error target)\n");
  EXPECT_FALSE(fs::exists(out));
}

TEST(Cli, UnknownModulationListsValidWords) {
  const Output o = Capgap("theory --modulation 12qam --ebno-db 0 to 2 by 1");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--modulation = '12qam'"), std::string::npos) << o.text;
  EXPECT_NE(o.text.find("256qam"), std::string::npos) << o.text;
}

TEST(Cli, MalformedRangeAndUnknownCommandAreUsageErrors) {
  EXPECT_EQ(Capgap("theory --modulation qpsk --ebno-db 0:1").status, 2);
  const Output colon = Capgap("theory --modulation qpsk --ebno-db 0:0.5:2");
  EXPECT_EQ(colon.status, 2);
  EXPECT_NE(colon.text.find("--ebno-db = '0:0.5:2': the START:STEP:STOP form is no longer "
                            "accepted; write a range as FROM to TO by STEP (inclusive), here '0 "
                            "to 2 by 0.5'"),
            std::string::npos)
      << colon.text;
  const Output o = Capgap("simulate x");
  EXPECT_EQ(o.status, 2);
  EXPECT_EQ(o.text, "capgap: unknown command 'simulate'; commands: run, theory, summary (capgap --help)\n");
  EXPECT_EQ(Capgap("run").status, 2);
}

TEST(Cli, UnreadableFilesAreReported) {
  const Output o = Capgap("run /nonexistent/x.ini --quiet");
  EXPECT_EQ(o.status, 1);
  EXPECT_EQ(o.text, "capgap: /nonexistent/x.ini: cannot open config file\n");
  const Output s = Capgap("summary " + Config("ci_tiny.ini"));
  EXPECT_EQ(s.status, 1);
  EXPECT_NE(s.text.find("not an HDF5 file"), std::string::npos) << s.text;
}

TEST(Cli, HelpWorksOnEveryCommand) {
  for (const char* cmd : {"--help", "run --help", "theory --help", "summary --help"}) {
    const Output o = Capgap(cmd);
    EXPECT_EQ(o.status, 0) << cmd;
    EXPECT_NE(o.text.find("capgap"), std::string::npos) << cmd;
  }
}

// Two real runs compared side by side. A run with another seed and more
// errors lands within the intervals; swapping QPSK for 8-PSK moves the BER
// 1e-3 point by about 3.2 dB (uncoded Gray 8-PSK needs ~10.0 dB, QPSK 6.8 dB
// at BER 1e-3: Proakis & Salehi, 5th ed., ch. 4, curves; values from
// memory, the flag only needs them far apart), far outside the intervals
// of 100-error points (about +-0.15 dB here).
TEST(Cli, SummaryComparesFilesAndFlagsNonOverlappingIntervals) {
  const fs::path dir = TempDir();
  const std::string a = (dir / "a.h5").string(), b = (dir / "b.h5").string(),
                    c = (dir / "c.h5").string();
  const std::string run = "run " + Config("ci_tiny.ini") + " --quiet --threads 1 -o ";
  ASSERT_EQ(Capgap(run + a).status, 0);
  ASSERT_EQ(Capgap(run + b + " --seed 2 --set sweep.stop_bit_errors=400").status, 0);
  ASSERT_EQ(Capgap(run + c + " --set scheme.qpsk.modulation=8psk").status, 0);
  const auto line_of = [](const std::string& text, const std::string& start) {
    const auto at = text.find("\n" + start);
    return at == std::string::npos ? std::string()
                                   : text.substr(at + 1, text.find('\n', at + 1) - at - 1);
  };
  const Output same = Capgap("summary " + a + " " + b);
  ASSERT_EQ(same.status, 0) << same.text;
  EXPECT_NE(same.text.find("A = " + a), std::string::npos) << same.text;
  EXPECT_NE(line_of(same.text, "qpsk           B").find("within the intervals"), std::string::npos)
      << same.text;
  EXPECT_NE(same.text.find("0 difference(s) flagged"), std::string::npos) << same.text;
  const Output differ = Capgap("summary " + a + " " + c);
  ASSERT_EQ(differ.status, 0) << differ.text;
  const std::string qpsk_b = line_of(differ.text, "qpsk           B");
  EXPECT_NE(qpsk_b.find("DIFFERS (BER: intervals do not overlap)"), std::string::npos) << differ.text;
  EXPECT_NE(qpsk_b.find("+3."), std::string::npos) << differ.text;
  EXPECT_NE(line_of(differ.text, "qpsk_rrc       B").find("within the intervals"), std::string::npos)
      << differ.text;
  // A missing or damaged file is named with status 1.
  const Output missing = Capgap("summary " + a + " " + (dir / "none.h5").string());
  EXPECT_EQ(missing.status, 1);
  EXPECT_NE(missing.text.find("none.h5: cannot open curves file"), std::string::npos) << missing.text;
  fs::remove_all(dir);
}

TEST(Cli, OneAndTwoThreadsWriteIdenticalCounts) {
  const fs::path dir = TempDir();
  const std::string a = (dir / "t1.h5").string(), b = (dir / "t2.h5").string();
  ASSERT_EQ(Capgap("run " + Config("ci_tiny.ini") + " -o " + a + " --quiet --threads 1").status, 0);
  ASSERT_EQ(Capgap("run " + Config("ci_tiny.ini") + " -o " + b + " --quiet --threads 2").status, 0);
  auto ra = ReadCurvesFile(a);
  auto rb = ReadCurvesFile(b);
  ASSERT_TRUE(ra.ok()) << ra.status().message();
  ASSERT_TRUE(rb.ok()) << rb.status().message();
  ASSERT_EQ(ra.value().schemes.size(), 3u);
  EXPECT_EQ(ra.value().threads, 1);
  EXPECT_EQ(rb.value().threads, 2);
  EXPECT_EQ(ra.value().ranks, 1);  // one process (attribute "ranks")
  EXPECT_EQ(rb.value().ranks, 1);
  for (std::size_t i = 0; i < 3; ++i) {
    EXPECT_EQ(ra.value().schemes[i].bits, rb.value().schemes[i].bits);
    EXPECT_EQ(ra.value().schemes[i].bit_errors, rb.value().schemes[i].bit_errors);
    EXPECT_GT(ra.value().schemes[i].bit_errors.at(0), 0u);
  }
  const Output s = Capgap("summary " + a);
  EXPECT_EQ(s.status, 0);
  EXPECT_NE(s.text.find("qpsk"), std::string::npos) << s.text;
  // No temporary files left next to the outputs.
  int files = 0;
  for (const auto& e : fs::directory_iterator(dir)) files += e.path().extension() == ".h5";
  for (const auto& e : fs::directory_iterator(dir)) {
    EXPECT_EQ(e.path().string().find(".tmp-"), std::string::npos) << e.path();
  }
  EXPECT_GE(files, 2);
}

// BPSK Pb = Q(sqrt(2 Eb/N0)) = 1.2501e-2 at 4 dB (Proakis & Salehi, Digital
// Communications, 5th ed., ch. 4; evaluated with scipy.special.erfc).
TEST(Cli, TheoryCsvIsMachineReadable) {
  const Output o = Capgap("theory --modulation bpsk --ebno-db 0 to 4 by 2 --rate 0.5 --csv");
  ASSERT_EQ(o.status, 0) << o.text;
  EXPECT_NE(o.text.find("# info_bits_per_symbol = 0.5\n"), std::string::npos) << o.text;
  EXPECT_NE(o.text.find("# shannon_ebno_db = "), std::string::npos);
  EXPECT_NE(o.text.find("# constrained_ebno_db = "), std::string::npos);
  EXPECT_NE(o.text.find("\nebno_db,esno_db,ber,ser\n"), std::string::npos);
  const auto row = o.text.find("\n4,4,");
  ASSERT_NE(row, std::string::npos) << o.text;
  const double ber = std::strtod(o.text.c_str() + row + 5, nullptr);
  EXPECT_NEAR(ber, 1.2501e-2, 1e-6) << o.text;
}

// The range may be one quoted argument or separate words: same table.
TEST(Cli, TheoryRangeQuotedOrAsWordsGivesTheSameTable) {
  const Output words = Capgap("theory --modulation bpsk --ebno-db 0 to 4 by 2 --csv");
  const Output quoted = Capgap("theory --modulation bpsk --ebno-db '0 to 4 by 2' --csv");
  const Output list = Capgap("theory --modulation bpsk --ebno-db 0,2,4 --csv");
  ASSERT_EQ(words.status, 0) << words.text;
  EXPECT_EQ(words.text, quoted.text);
  EXPECT_EQ(words.text, list.text);
  EXPECT_NE(words.text.find("\n4,4,"), std::string::npos) << words.text;
}

TEST(Cli, RenamedKeyInSetNamesTheNewKey) {
  const Output o = Capgap("run " + Config("ci_tiny.ini") + " --set sweep.max_bits=1000 -o /tmp/x.h5");
  EXPECT_EQ(o.status, 1) << o.text;
  EXPECT_NE(o.text.find("key '--set sweep.max_bits' was renamed: write 'sweep.stop_bits'"),
            std::string::npos)
      << o.text;
}

// Shannon-Hartley: B = 1 MHz at 20 dB gives 1e6 log2(101) = 6.658 Mbit/s (arithmetic).
TEST(Cli, TheoryShannonHartley) {
  const Output o = Capgap("theory --bandwidth 1e6 --snr-db 20");
  ASSERT_EQ(o.status, 0) << o.text;
  EXPECT_NE(o.text.find("6.65821e+06 bit/s"), std::string::npos) << o.text;
}

// One rule (README "Exit status"): a malformed or out-of-range command-line
// value is a usage error (2) naming the option, decided before any file is
// read or written; a path the file system refuses is 1. Both at once, with
// nothing left behind (no DIR.ckpt for -o DIR).
TEST(Cli, CommandLineValueErrorsAreUsageErrorsNamingTheOption) {
  const fs::path dir = TempDir() / "usage";
  fs::remove_all(dir);
  fs::create_directories(dir / "sub");
  const std::string run = "run " + Config("ci_tiny.ini") + " --quiet -o " + (dir / "x.h5").string();
  Output o = Capgap(run + " --threads -1");
  EXPECT_EQ(o.status, 2);
  EXPECT_EQ(o.text, "capgap: run: --threads = -1: must be an integer in [0, 4096] (0: all cores)\n");
  o = Capgap(run + " --threads 100000");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--threads = 100000"), std::string::npos) << o.text;
  o = Capgap(run + " --seed x1");
  EXPECT_EQ(o.status, 2);
  EXPECT_EQ(o.text, "capgap: run: --seed = 'x1': must be an integer in [0, 18446744073709551615]\n");
  o = Capgap(run + " --set sweep.seed");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--set 'sweep.seed': expected KEY=VALUE"), std::string::npos) << o.text;
  o = Capgap("run " + Config("ci_tiny.ini") + " --quiet -o ''");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("-o '': must name the output file"), std::string::npos) << o.text;
  o = Capgap("run " + Config("ci_tiny.ini") + " --quiet -o " + (dir / "sub").string() + "/");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("ends in '/'"), std::string::npos) << o.text;
  o = Capgap("run " + Config("ci_tiny.ini") + " --quiet -o " + (dir / "sub").string());
  EXPECT_EQ(o.status, 1);
  EXPECT_EQ(o.text, "capgap: run: -o '" + (dir / "sub").string() + "': is a directory; give a file "
                    "name, e.g. " + (dir / "sub").string() + "/curves.h5\n");
  EXPECT_FALSE(fs::exists(dir / "sub.ckpt"));
  EXPECT_TRUE(fs::is_empty(dir / "sub"));
  EXPECT_FALSE(fs::exists(dir / "x.h5"));
  EXPECT_FALSE(fs::exists(dir / "x.h5.ckpt"));
  fs::remove_all(dir);
}

TEST(Cli, TheoryRefusesNonFiniteOutOfRangeAndConflictingValues) {
  Output o = Capgap("theory --bandwidth 1e6 --snr-db nan");
  EXPECT_EQ(o.status, 2);
  EXPECT_EQ(o.text, "capgap: theory: --snr-db = nan: must be a number in [-100, 100] dB\n");
  o = Capgap("theory --bandwidth 1e6 --snr-db 1e308");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--snr-db = 1e+308"), std::string::npos) << o.text;
  o = Capgap("theory --modulation qpsk --ebno-db 0 to 2 by 1 --rate 1e-300");
  EXPECT_EQ(o.status, 2);
  EXPECT_EQ(o.text, "capgap: theory: --rate = 1e-300: must be a number in [1e-06, 1] (code rate)\n");
  o = Capgap("theory --bandwidth=-1 --snr-db 3");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--bandwidth = -1: must be a number in (0, 1e+15] Hz"), std::string::npos)
      << o.text;
  o = Capgap("theory --modulation qpsk --ebno-db 0 to 2 by 1 --bandwidth 1e6 --snr-db 3");
  EXPECT_EQ(o.status, 2);
  EXPECT_NE(o.text.find("--bandwidth/--snr-db"), std::string::npos) << o.text;
  EXPECT_NE(o.text.find("--modulation/--ebno-db"), std::string::npos) << o.text;
}

}  // namespace
}  // namespace capgap
