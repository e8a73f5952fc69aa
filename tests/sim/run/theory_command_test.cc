// RunTheory and RunSummary (sim/run/theory_command.h) in-process: values
// outside the documented ranges (non-finite, out of range) and conflicting
// option groups are usage errors (status 2) naming the option and the
// allowed range, with nothing printed on the output stream; the range ends
// themselves are accepted and give finite numbers.
#include "sim/run/theory_command.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <sstream>
#include <string>
#include <vector>

#include "sim/run/run.h"

namespace capgap {
namespace {

struct Outcome {
  int status;
  std::string out, err;
};

Outcome Theory(TheoryOptions o) {
  std::ostringstream out, err;
  o.out = &out;
  o.err = &err;
  const int status = RunTheory(o);
  return {status, out.str(), err.str()};
}

TheoryOptions Capacity(double bandwidth, double snr_db) {
  TheoryOptions o;
  o.bandwidth_hz = bandwidth;
  o.snr_db = snr_db;
  return o;
}

TheoryOptions Table(const std::string& modulation, const std::string& ebno, double rate) {
  TheoryOptions o;
  o.modulation = modulation;
  o.ebno_db = ebno;
  o.rate = rate;
  return o;
}

void ExpectUsage(const TheoryOptions& o, const std::string& message) {
  const Outcome r = Theory(o);
  EXPECT_EQ(r.status, kExitUsage) << message;
  EXPECT_EQ(r.err, "capgap: " + message + "\n");
  EXPECT_EQ(r.out, "");
}

constexpr double kNan = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

TEST(Theory, SnrOutsideItsRangeOrNotFiniteIsAUsageErrorNamingTheRange) {
  const std::string rule = ": must be a number in [-100, 100] dB";
  ExpectUsage(Capacity(1e6, kNan), "theory: --snr-db = nan" + rule);
  ExpectUsage(Capacity(1e6, 1e308), "theory: --snr-db = 1e+308" + rule);
  ExpectUsage(Capacity(1e6, -kInf), "theory: --snr-db = -inf" + rule);
  ExpectUsage(Capacity(1e6, 100.5), "theory: --snr-db = 100.5" + rule);
}

TEST(Theory, BandwidthNotPositiveOrNotFiniteIsAUsageError) {
  const std::string rule = ": must be a number in (0, 1e+15] Hz";
  ExpectUsage(Capacity(0, 20), "theory: --bandwidth = 0" + rule);
  ExpectUsage(Capacity(-5, 20), "theory: --bandwidth = -5" + rule);
  ExpectUsage(Capacity(kNan, 20), "theory: --bandwidth = nan" + rule);
  ExpectUsage(Capacity(kInf, 20), "theory: --bandwidth = inf" + rule);
  ExpectUsage(Capacity(1e16, 20), "theory: --bandwidth = 1e+16" + rule);
}

TEST(Theory, RateOutsideItsRangeIsAUsageError) {
  const std::string rule = ": must be a number in [1e-06, 1] (code rate)";
  ExpectUsage(Table("qpsk", "0 to 2 by 1", 1e-300), "theory: --rate = 1e-300" + rule);
  ExpectUsage(Table("qpsk", "0 to 2 by 1", 0), "theory: --rate = 0" + rule);
  ExpectUsage(Table("qpsk", "0 to 2 by 1", 1.5), "theory: --rate = 1.5" + rule);
  ExpectUsage(Table("qpsk", "0 to 2 by 1", kNan), "theory: --rate = nan" + rule);
}

TEST(Theory, EbnoPointsOutsideTheRangeOrNotNumbersAreUsageErrors) {
  ExpectUsage(Table("qpsk", "0 to 150 by 50", 1),
              "theory: --ebno-db = '0 to 150 by 50': point 150 dB is outside [-100, 100] dB");
  const Outcome r = Theory(Table("qpsk", "nan", 1));
  EXPECT_EQ(r.status, kExitUsage);
  EXPECT_NE(r.err.find("--ebno-db = 'nan'"), std::string::npos) << r.err;
}

TEST(Theory, ConflictingGroupsAreRefusedNamingBoth) {
  TheoryOptions o = Table("qpsk", "0 to 2 by 1", 0.5);
  o.snr_db = 3;
  const std::string message =
      "theory: --bandwidth/--snr-db (Shannon-Hartley capacity) and "
      "--modulation/--ebno-db/--rate/--csv (uncoded tables and limits) cannot be combined; give "
      "one group";
  ExpectUsage(o, message);
  TheoryOptions c = Capacity(1e6, 20);
  c.csv = true;
  ExpectUsage(c, message);
  TheoryOptions half;
  half.bandwidth_hz = 1e6;
  ExpectUsage(half, "theory: --bandwidth and --snr-db go together");
  ExpectUsage(TheoryOptions{},
              "theory: need --modulation and --ebno-db (or --bandwidth and --snr-db)");
}

// Shannon-Hartley: B = 1 MHz at 20 dB gives 1e6 log2(101) = 6.658 Mbit/s (arithmetic).
TEST(Theory, RangeEndsAreAcceptedAndGiveFiniteNumbers) {
  Outcome r = Theory(Capacity(1e6, 20));
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("6.65821e+06 bit/s"), std::string::npos) << r.out;
  for (const TheoryOptions& o : {Capacity(1e15, 100), Capacity(1e-300, -100)}) {
    r = Theory(o);
    EXPECT_EQ(r.status, 0) << r.err;
    EXPECT_EQ(r.err, "");
    EXPECT_EQ(r.out.find("inf"), std::string::npos) << r.out;
    EXPECT_EQ(r.out.find("nan"), std::string::npos) << r.out;
  }
  TheoryOptions t = Table("bpsk", "-100,100", 1e-6);
  t.csv = true;
  r = Theory(t);
  EXPECT_EQ(r.status, 0) << r.err;
  EXPECT_NE(r.out.find("# code_rate = 1e-06\n"), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("\n-100,"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("nan"), std::string::npos) << r.out;
}

TEST(Theory, GenericConstellationTableIsTheUnionBoundAndSaysSo) {
  // 16apsk comes from the constellation registry; its table is the union
  // bound over its points (analysis/constellation_bounds.h), labelled as such,
  // and it has finite limits once a code lowers rho.
  Outcome r = Theory(Table("16apsk", "12", 0.75));
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.rfind("16apsk, uncoded BER/SER on AWGN (union bound over the points)\n", 0), 0u)
      << r.out;
  EXPECT_EQ(r.out.find("nan"), std::string::npos) << r.out;
  EXPECT_EQ(r.out.find("inf dB"), std::string::npos) << r.out;
  r = Theory(Table("16qam", "12", 1.0));
  ASSERT_EQ(r.status, 0) << r.err;
  EXPECT_EQ(r.out.rfind("16qam, uncoded BER/SER on AWGN (exact, Gray labelling)\n", 0), 0u)
      << r.out;
  const Outcome bad = Theory(Table("16apskx", "12", 1.0));
  EXPECT_EQ(bad.status, kExitUsage);
  EXPECT_NE(bad.err.find("unknown modulation '16apskx'; valid: "), std::string::npos) << bad.err;
  EXPECT_NE(bad.err.find("16apsk (4+12 rings, ratio 2.85)"), std::string::npos) << bad.err;
}

TEST(Summary, UnreadableFileGives1WithTheReason) {
  std::ostringstream out, err;
  EXPECT_EQ(RunSummary(std::string(CAPGAP_SOURCE_DIR) + "/configs/ci_tiny.ini", out, err), 1);
  EXPECT_NE(err.str().find("not an HDF5 file"), std::string::npos) << err.str();
  EXPECT_EQ(out.str(), "");
}

}  // namespace
}  // namespace capgap
