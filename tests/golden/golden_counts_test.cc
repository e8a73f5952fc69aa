// Golden counts (tests/golden/golden_counts.h): every golden run, with 1, 2
// and 3 worker threads, writes exactly the recorded counts of every point.
//
// Recording (only when a count is meant to change, with the reason in the
// commit): CAPGAP_GOLDEN_RECORD=1 ./build/tests/golden_golden_counts_test
// --gtest_filter='Golden.Record' rewrites tests/golden/golden_counts.txt from
// one-thread runs of the current binary.
#include "tests/golden/golden_counts.h"

#include <unistd.h>

#include <cstdlib>
#include <fstream>
#include <map>
#include <string>
#include <vector>

#include <gtest/gtest.h>

namespace capgap::golden {
namespace {

fs::path TempDir(const std::string& name) {
  std::string leaf = "capgap_golden_";
  leaf += std::to_string(::getpid());
  leaf += '_';
  leaf += name;
  fs::path dir = fs::temp_directory_path() / leaf;
  fs::remove_all(dir);
  fs::create_directories(dir);
  return dir;
}

std::string SafeName(std::string s) {
  for (char& c : s) {
    if (c == '/' || c == '.') c = '_';
  }
  return s;
}

// The golden points grouped by run.
std::map<std::string, std::vector<PointCounts>> GoldenByRun() {
  std::string error;
  const std::vector<PointCounts> all = ReadGolden(&error);
  EXPECT_TRUE(error.empty()) << error;
  std::map<std::string, std::vector<PointCounts>> by_run;
  for (const PointCounts& p : all) by_run[p.run].push_back(p);
  return by_run;
}

void ExpectSame(const std::vector<PointCounts>& got, const std::vector<PointCounts>& want,
                const std::string& what) {
  ASSERT_EQ(got.size(), want.size()) << what << ": number of points";
  for (std::size_t i = 0; i < got.size(); ++i) {
    EXPECT_EQ(Format(got[i]), Format(want[i])) << what;
  }
}

TEST(Golden, EveryRunIsInTheGoldenFile) {
  const auto by_run = GoldenByRun();
  for (const std::string& run : GoldenRuns()) {
    EXPECT_TRUE(by_run.count(run)) << run << " has no golden counts: record them";
    if (by_run.count(run)) {
      EXPECT_FALSE(by_run.at(run).empty()) << run;
    }
  }
}

class GoldenRun : public ::testing::TestWithParam<std::string> {};

TEST_P(GoldenRun, CountsAreBitIdenticalFor1To3Threads) {
  const std::string run = GetParam();
  const auto by_run = GoldenByRun();
  ASSERT_TRUE(by_run.count(run)) << run << " has no golden counts";
  const fs::path dir = TempDir(SafeName(run));
  for (int threads : {1, 2, 3}) {
    std::string leaf = "t";
    leaf += std::to_string(threads);
    leaf += ".h5";
    const fs::path out = dir / leaf;
    std::string log;
    ASSERT_EQ(RunGolden("", run, out, {"--threads", std::to_string(threads)}, &log), 0) << log;
    std::string what = run;
    what += " with ";
    what += std::to_string(threads);
    what += " threads";
    ExpectSame(ReadFileCounts(out.string(), run), by_run.at(run), what);
  }
  fs::remove_all(dir);
}

INSTANTIATE_TEST_SUITE_P(All, GoldenRun, ::testing::ValuesIn(GoldenRuns()),
                         [](const ::testing::TestParamInfo<std::string>& info) {
                           std::string s = SafeName(info.param);
                           for (char& c : s) {
                             if (c == '-') c = '_';
                           }
                           return s;
                         });

// Rewrites the golden file; skipped unless CAPGAP_GOLDEN_RECORD is set.
TEST(Golden, Record) {
  if (!std::getenv("CAPGAP_GOLDEN_RECORD")) GTEST_SKIP() << "set CAPGAP_GOLDEN_RECORD=1 to record";
  const fs::path dir = TempDir("record");
  std::ofstream out(GoldenFile());
  out << "# Golden counts: see tests/golden/golden_counts.h. Recorded with one thread.\n"
      << "# RUN SCHEME POINT EBNO_DB BITS BIT_ERRORS FRAMES FRAME_ERRORS IT_MEAN IT_MAX "
         "UNDETECTED\n";
  for (const std::string& run : GoldenRuns()) {
    const fs::path h5 = dir / (SafeName(run) + ".h5");
    std::string log;
    ASSERT_EQ(RunGolden("", run, h5, {"--threads", "1"}, &log), 0) << log;
    for (const PointCounts& p : ReadFileCounts(h5.string(), run)) out << Format(p) << "\n";
  }
  fs::remove_all(dir);
}

}  // namespace
}  // namespace capgap::golden
