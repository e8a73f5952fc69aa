// Golden counts under MPI (tests/golden/golden_counts.h): the golden runs
// started by mpirun with 2 and 3 ranks (one worker thread each, 3 ranks
// oversubscribing the 2 cores of CI) write exactly the recorded counts.
#include <unistd.h>

#include <cstdlib>
#include <map>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "tests/golden/golden_counts.h"

namespace capgap::golden {
namespace {

std::string Launcher(int np) {
  // OpenMPI refuses to run as root unless both variables are set (CI
  // containers run as root).
  ::setenv("OMPI_ALLOW_RUN_AS_ROOT", "1", 1);
  ::setenv("OMPI_ALLOW_RUN_AS_ROOT_CONFIRM", "1", 1);
  std::string s = CAPGAP_MPIEXEC;
  s += " --oversubscribe -np ";
  s += std::to_string(np);
  return s;
}

class GoldenMpi : public ::testing::TestWithParam<int> {};

TEST_P(GoldenMpi, CountsMatchTheGoldenFile) {
  const int np = GetParam();
  std::string error;
  std::map<std::string, std::vector<PointCounts>> by_run;
  for (const PointCounts& p : ReadGolden(&error)) by_run[p.run].push_back(p);
  ASSERT_TRUE(error.empty()) << error;
  std::string leaf = "capgap_golden_mpi_";
  leaf += std::to_string(::getpid());
  leaf += '_';
  leaf += std::to_string(np);
  const fs::path dir = fs::temp_directory_path() / leaf;
  fs::remove_all(dir);
  fs::create_directories(dir);
  // The extra schemes cover every block; two configs add the long units of
  // automatic unit sizing and a QC LDPC code.
  for (const std::string& run : {std::string("tests/golden/golden_extra.ini"),
                                std::string("configs/demo.ini"),
                                std::string("configs/qpsk_ldpc_qc_n2016_r1-2.ini")}) {
    ASSERT_TRUE(by_run.count(run)) << run;
    const fs::path out = dir / "out.h5";
    std::string log;
    ASSERT_EQ(RunGolden(Launcher(np), run, out, {"--threads", "1"}, &log), 0) << log;
    const std::vector<PointCounts> got = ReadFileCounts(out.string(), run);
    const std::vector<PointCounts>& want = by_run.at(run);
    ASSERT_EQ(got.size(), want.size()) << run;
    for (std::size_t i = 0; i < got.size(); ++i) {
      EXPECT_EQ(Format(got[i]), Format(want[i])) << run << " with " << np << " ranks";
    }
    fs::remove(out);
  }
  fs::remove_all(dir);
}

INSTANTIATE_TEST_SUITE_P(Ranks, GoldenMpi, ::testing::Values(2, 3));

}  // namespace
}  // namespace capgap::golden
