// INI reader: sections and keys in file order with line numbers, exact
// refusals (repeated sections and keys, keys outside a section, bad
// headers), and the file reader's refusal of directories, FIFOs, devices and
// oversized files without hanging or reading them whole.
#include "sim/config/ini_reader.h"

#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "sim/config/config.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

std::string ErrorOf(const std::string& text) {
  auto r = ParseIni(text, "t.ini");
  return r.ok() ? "OK" : r.status().message();
}

// A fresh directory per test case, removed at the end.
class TempDir {
 public:
  TempDir() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    path_ = fs::temp_directory_path() /
            ("capgap_ini_test_" + std::to_string(::getpid()) + "_" + info->name());
    fs::remove_all(path_);
    fs::create_directories(path_);
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path_, ec);
  }
  const fs::path& path() const { return path_; }

 private:
  fs::path path_;
};

TEST(ParseIni, KeepsSectionsKeysValuesAndLinesInFileOrder) {
  auto r = ParseIni(
      "# head\n[sweep]\nebno_db = 0 to 4 by 1  # comment\n\n[scheme.a]\n  modulation=qpsk\n"
      "empty =\n",
      "t.ini");
  ASSERT_TRUE(r.ok()) << r.status().message();
  const auto& s = r.value();
  ASSERT_EQ(s.size(), 2u);
  EXPECT_EQ(s[0].name, "sweep");
  EXPECT_EQ(s[0].line, 2);
  ASSERT_EQ(s[0].entries.size(), 1u);
  EXPECT_EQ(s[0].entries[0].key, "ebno_db");
  EXPECT_EQ(s[0].entries[0].value, "0 to 4 by 1");
  EXPECT_EQ(s[0].entries[0].line, 3);
  EXPECT_EQ(s[1].name, "scheme.a");
  ASSERT_EQ(s[1].entries.size(), 2u);
  EXPECT_EQ(s[1].entries[0].key, "modulation");
  EXPECT_EQ(s[1].entries[0].value, "qpsk");
  EXPECT_EQ(s[1].entries[0].line, 6);
  EXPECT_EQ(s[1].entries[1].value, "");
}

TEST(ParseIni, AcceptsCrLfLineEnds) {
  auto r = ParseIni("[sweep]\r\nseed = 3\r\n", "t.ini");
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value()[0].entries[0].value, "3");
}

TEST(ParseIni, RefusesARepeatedSectionNamingBothLines) {
  EXPECT_EQ(ErrorOf("[sweep]\nseed = 1\n[scheme.q]\nmodulation = qpsk\n[sweep]\nthreads = 2\n"),
            "t.ini: section [sweep] given twice (lines 1 and 5)");
  EXPECT_EQ(ErrorOf("[scheme.q]\nmodulation = qpsk\n\n[scheme.q]\nframe_bits = 8\n"),
            "t.ini: section [scheme.q] given twice (lines 1 and 4)");
}

TEST(ParseIni, RefusesARepeatedKey) {
  EXPECT_EQ(ErrorOf("[sweep]\nseed = 1\nseed = 2\n"), "t.ini: key 'sweep.seed' given twice");
}

TEST(ParseIni, RefusesKeysOutsideASectionAndBadLines) {
  EXPECT_EQ(ErrorOf("seed = 1\n[sweep]\n"),
            "t.ini:1: key 'seed' is outside a section; sections: [sweep], [scheme.NAME]");
  EXPECT_EQ(ErrorOf("[sweep]\nseed 1\n"),
            "t.ini:2: expected KEY = VALUE or [SECTION], got 'seed 1'");
  EXPECT_EQ(ErrorOf("[sweep\n"), "t.ini:1: section header '[sweep' does not end with ']'");
  EXPECT_EQ(ErrorOf("[]\n"),
            "t.ini:1: bad section name ''; expected letters, digits, '_', '-' and '.' between the "
            "brackets, e.g. [scheme.qpsk]");
  EXPECT_EQ(ErrorOf("[scheme. q]\n"),
            "t.ini:1: bad section name 'scheme. q'; expected letters, digits, '_', '-' and '.' "
            "between the brackets, e.g. [scheme.qpsk]");
  EXPECT_EQ(ErrorOf("[sweep]\na.b = 1\n"),
            "t.ini:2: bad key name 'a.b'; keys are letters, digits, '_' and '-'");
  EXPECT_EQ(ErrorOf("[sweep]\n= 1\n"),
            "t.ini:2: bad key name ''; keys are letters, digits, '_' and '-'");
}

TEST(ParseIni, EchoesAHugeBinaryLineShortenedAndEscaped) {
  const std::string line = std::string("\x01\xfe", 2) + std::string(10 * 1024 * 1024, 'z');
  const std::string msg = ErrorOf("[sweep]\n" + line + "\n");
  EXPECT_EQ(msg, "t.ini:2: expected KEY = VALUE or [SECTION], got '\\x01\\xFE" +
                     std::string(72, 'z') + "...' (10485762 bytes)");
  EXPECT_LT(msg.size(), 300u);
}

TEST(ReadConfigFile, ReadsARegularFile) {
  TempDir dir;
  const fs::path p = dir.path() / "a.ini";
  std::ofstream(p) << "[sweep]\nseed = 1\n";
  auto r = ReadConfigFile(p.string());
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value(), "[sweep]\nseed = 1\n");
}

TEST(ReadConfigFile, RefusesADirectory) {
  TempDir dir;
  EXPECT_EQ(ReadConfigFile(dir.path().string()).status().message(),
            dir.path().string() + ": is a directory, not a config file");
}

// The reader checks the type before opening, so neither case can block.
TEST(ReadConfigFile, RefusesAFifoAndADeviceWithoutBlocking) {
  TempDir dir;
  const fs::path fifo = dir.path() / "pipe.ini";
  ASSERT_EQ(::mkfifo(fifo.c_str(), 0600), 0);
  EXPECT_EQ(ReadConfigFile(fifo.string()).status().message(),
            fifo.string() + ": is not a regular file (a FIFO)");
  EXPECT_EQ(ReadConfigFile("/dev/zero").status().message(),
            "/dev/zero: is not a regular file (a character device)");
  // The same through the config loader.
  EXPECT_EQ(LoadRunConfig(fifo.string(), {}).status().message(),
            fifo.string() + ": is not a regular file (a FIFO)");
  EXPECT_EQ(LoadRunConfig("/dev/zero", {}).status().message(),
            "/dev/zero: is not a regular file (a character device)");
  EXPECT_EQ(LoadRunConfig(dir.path().string(), {}).status().message(),
            dir.path().string() + ": is a directory, not a config file");
}

TEST(ReadConfigFile, RefusesAFileOverTheLimitBeforeReadingIt) {
  TempDir dir;
  const fs::path p = dir.path() / "big.ini";
  {
    std::ofstream out(p, std::ios::binary);
    out << std::string(kMaxConfigFileBytes + 1, '#');
  }
  EXPECT_EQ(ReadConfigFile(p.string()).status().message(),
            p.string() + ": is 4194305 bytes; a config file may have at most 4194304 bytes");
  EXPECT_EQ(ReadConfigFile(p.string(), 10).status().message(),
            p.string() + ": is 4194305 bytes; a config file may have at most 10 bytes");
}

// /proc files report size 0 but have content: the read itself must stop at
// the limit (as for a file that grows while it is read).
TEST(ReadConfigFile, StopsReadingAtTheLimitWhenTheSizeWasWrong) {
  struct stat st {};
  ASSERT_EQ(::stat("/proc/self/maps", &st), 0);
  ASSERT_EQ(st.st_size, 0) << "test premise: /proc reports size 0";
  EXPECT_EQ(ReadConfigFile("/proc/self/maps", 16).status().message(),
            "/proc/self/maps: grew beyond 16 bytes while being read; a config file may have at "
            "most 16 bytes");
}

TEST(ReadConfigFile, MissingFileKeepsItsMessage) {
  EXPECT_EQ(ReadConfigFile("/nonexistent/dir/x.ini").status().message(),
            "/nonexistent/dir/x.ini: cannot open config file");
}

}  // namespace
}  // namespace capgap
