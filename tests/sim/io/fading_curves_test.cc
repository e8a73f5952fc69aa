// The curves file of a fading scheme: the /<scheme>/channel group, the
// fading theory beside the AWGN curve, the ergodic and outage limits and the
// summary gaps are written and read back under their documented names, while
// an AWGN scheme of the same file keeps exactly its former datasets. The
// points are fabricated (their counts do not matter here): the test covers
// analysis and output, not the channel simulation.
#include <H5Cpp.h>
#include <gtest/gtest.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <set>
#include <string>
#include <vector>

#include "analysis/fading_theory.h"
#include "analysis/uncoded_theory.h"
#include "sim/chain/scheme_result.h"
#include "sim/engine/stats.h"
#include "sim/io/curves_file.h"
#include "sim/io/summary_table.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

SchemeConfig Qpsk(const std::string& name) {
  SchemeConfig s;
  s.name = name;
  s.modulation = ParseModulation("qpsk").value();
  s.demapper = DemapMethod::kMaxLog;
  s.frame_bits = 960;
  return s;
}

SweepConfig Sweep() {
  SweepConfig sweep;
  sweep.ebno_db = {0, 5, 10, 15, 20};
  sweep.target_ber = 1e-2;
  sweep.seed = 5;
  return sweep;
}

// Five points whose BER and FER fall through 1e-2 and 1e-1.
std::vector<PointResult> Points() {
  const std::vector<std::uint64_t> bit_errors = {150000, 40000, 6000, 900, 120};
  const std::vector<std::uint64_t> frame_errors = {900, 500, 100, 20, 4};
  std::vector<PointResult> points;
  for (std::size_t i = 0; i < 5; ++i) {
    PointResult p;
    p.ebno_db = 5.0 * static_cast<double>(i);
    p.esno_db = p.ebno_db + 10.0 * std::log10(2.0);
    p.counts.bits = 960000;
    p.counts.bit_errors = bit_errors[i];
    p.counts.frames = 1000;
    p.counts.frame_errors = frame_errors[i];
    p.ber_ci = ClopperPearson(p.counts.bit_errors, p.counts.bits);
    p.fer_ci = ClopperPearson(p.counts.frame_errors, p.counts.frames);
    points.push_back(p);
  }
  return points;
}

SchemeResult Analyse(const SchemeConfig& scheme) {
  auto chain = Chain::Create(scheme, 5);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  return AnalyseScheme(chain.value(), Sweep(), Points());
}

std::set<std::string> Children(const H5::Group& g) {
  std::set<std::string> names;
  for (hsize_t i = 0; i < g.getNumObjs(); ++i) names.insert(g.getObjnameByIdx(i));
  return names;
}

std::set<std::string> AttrNames(const H5::H5Object& obj) {
  std::set<std::string> names;
  for (int i = 0; i < obj.getNumAttrs(); ++i)
    names.insert(obj.openAttribute(static_cast<unsigned>(i)).getName());
  return names;
}

std::string ReadStr(const H5::H5Object& obj, const char* name) {
  H5::Attribute a = obj.openAttribute(name);
  std::string v;
  a.read(a.getStrType(), v);
  return v;
}

double ReadNum(const H5::H5Object& obj, const char* name) {
  double v = 0;
  obj.openAttribute(name).read(H5::PredType::NATIVE_DOUBLE, &v);
  return v;
}

std::vector<double> ReadSeries(const H5::Group& g, const char* name) {
  H5::DataSet ds = g.openDataSet(name);
  hsize_t dims[1] = {0};
  ds.getSpace().getSimpleExtentDims(dims);
  std::vector<double> v(dims[0]);
  ds.read(v.data(), H5::PredType::NATIVE_DOUBLE);
  return v;
}

TEST(FadingCurves, NewNamesAppearAndAwgnSchemeKeepsItsDatasets) {
  SchemeConfig fading = Qpsk("fad");
  fading.channel.law = FadingLaw::kRayleigh;
  fading.channel.time = FadingTime::kBlock;
  fading.channel.coherence_symbols = 480;
  fading.channel.branches = 2;
  const SchemeResult rf = Analyse(fading);
  const SchemeResult ra = Analyse(Qpsk("awgn"));

  const fs::path dir =
      fs::temp_directory_path() / ("capgap_fading_curves_" + std::to_string(::getpid()));
  fs::create_directories(dir);
  const std::string path = (dir / "run.h5").string();
  RunMetadata meta;
  meta.command_line = "sim_io_fading_curves_test (fabricated points)";
  meta.config_text =
      "[sweep]\nebno_db = 0 to 20 by 5\ntarget_ber = 1e-2\nseed = 5\n[scheme.fad]\nmodulation = qpsk\n"
      "[scheme.awgn]\nmodulation = qpsk\n";
  meta.threads = 1;
  meta.seed = 5;
  meta.kernel_target = "none (points fabricated)";
  meta.demap_kernel_target = "none (points fabricated)";
  meta.created_utc = UtcNow();
  ASSERT_TRUE(WriteCurvesFile(path, meta, {rf, ra}).ok());

  {
    H5::H5File file(path, H5F_ACC_RDONLY);
    // The channel group: every channel key, perfect channel state, per-branch Eb/N0.
    const H5::Group ch = file.openGroup("/fad/channel");
    const std::set<std::string> keys = {
        "channel", "rician_k_db", "nakagami_m", "fading",        "coherence_symbols",
        "doppler", "branches",    "combining",  "channel_state", "ebno_basis"};
    EXPECT_EQ(AttrNames(ch), keys);
    EXPECT_EQ(ReadStr(ch, "channel"), "rayleigh");
    EXPECT_EQ(ReadStr(ch, "fading"), "block");
    EXPECT_EQ(ReadStr(ch, "combining"), "mrc");
    EXPECT_EQ(ReadStr(ch, "channel_state"), "perfect");
    EXPECT_NE(ReadStr(ch, "ebno_basis").find("per receive branch"), std::string::npos);

    // Theory on the scheme's own channel, the AWGN curve beside it.
    const H5::Group th = file.openGroup("/fad/theory");
    EXPECT_EQ(Children(th),
              (std::set<std::string>{"ebno_db", "ber_uncoded", "ser_uncoded", "ber_uncoded_awgn"}));
    const std::vector<double> x = ReadSeries(th, "ebno_db");
    const std::vector<double> ber = ReadSeries(th, "ber_uncoded");
    const std::vector<double> awgn = ReadSeries(th, "ber_uncoded_awgn");
    ASSERT_GT(x.size(), 100u);
    const std::size_t i = x.size() / 2;
    EXPECT_EQ(ber[i], analysis::FadingBer(fading.modulation, fading.channel, x[i]));
    EXPECT_EQ(awgn[i], analysis::UncodedBer(fading.modulation, x[i]));
    EXPECT_GT(ber[i], 10.0 * awgn[i]);  // fading costs (common practice)

    // Limits: ergodic attributes; block fading adds the outage datasets.
    const H5::Group lim = file.openGroup("/fad/limits");
    for (const char* a :
         {"ergodic_shannon_ebno_db", "ergodic_constrained_ebno_db", "ergodic_bicm_ebno_db"}) {
      EXPECT_TRUE(lim.attrExists(a)) << a;
    }
    EXPECT_EQ(ReadNum(lim, "ergodic_shannon_ebno_db"),
              analysis::ErgodicShannonMinEbnoDb(fading.channel, 2.0));
    // Uncoded QPSK: rho = m, the constrained limits are infinite.
    EXPECT_TRUE(std::isinf(ReadNum(lim, "ergodic_constrained_ebno_db")));
    const std::vector<double> out_x = ReadSeries(lim, "outage_ebno_db");
    const std::vector<double> out_g = ReadSeries(lim, "outage_probability_gaussian");
    const std::vector<double> out_c = ReadSeries(lim, "outage_probability_constrained");
    ASSERT_EQ(out_x.size(), out_g.size());
    ASSERT_EQ(out_x.size(), out_c.size());
    EXPECT_EQ(out_g[i], analysis::OutageProbabilityGaussian(fading.channel, 2.0, out_x[i]));
    EXPECT_EQ(out_c[i], 1.0);  // rho = m: the constellation never carries it
    const H5::Group sum = file.openGroup("/fad/summary");
    EXPECT_TRUE(sum.attrExists("gap_to_ergodic_db"));
    EXPECT_TRUE(sum.attrExists("gap_to_outage_db"));
    EXPECT_TRUE(std::isnan(ReadNum(sum, "gap_to_outage_db")));  // no target FER yet

    // The AWGN scheme: former datasets only, AWGN theory unchanged.
    const H5::Group ath = file.openGroup("/awgn/theory");
    EXPECT_EQ(Children(ath), (std::set<std::string>{"ebno_db", "ber_uncoded", "ser_uncoded"}));
    const std::vector<double> ax = ReadSeries(ath, "ebno_db");
    const std::vector<double> aber = ReadSeries(ath, "ber_uncoded");
    for (std::size_t k = 0; k < ax.size(); k += 37) {
      EXPECT_EQ(aber[k], analysis::UncodedBer(Qpsk("q").modulation, ax[k]));
    }
    const H5::Group alim = file.openGroup("/awgn/limits");
    EXPECT_EQ(Children(alim),
              (std::set<std::string>{"constrained_curve_rho", "constrained_curve_ebno_db"}));
    EXPECT_FALSE(alim.attrExists("ergodic_shannon_ebno_db"));
    EXPECT_FALSE(file.openGroup("/awgn/summary").attrExists("gap_to_ergodic_db"));
    EXPECT_EQ(ReadStr(file.openGroup("/awgn/channel"), "channel"), "awgn");
  }

  // Read back through the validating reader and the summary table.
  const Result<StoredRun> run = ReadCurvesFile(path);
  ASSERT_TRUE(run.ok()) << run.status().message();
  ASSERT_EQ(run.value().schemes.size(), 2u);
  const StoredScheme& sf = run.value().schemes[0];
  EXPECT_TRUE(sf.has_channel);
  EXPECT_TRUE(sf.has_ergodic);
  EXPECT_TRUE(sf.has_outage);
  EXPECT_EQ(sf.channel, "rayleigh");
  EXPECT_EQ(sf.branches, 2);
  EXPECT_EQ(sf.summary.gap_to_ergodic_db, rf.summary.gap_to_ergodic_db);
  EXPECT_FALSE(run.value().schemes[1].has_ergodic);
  const std::string table = FormatSummaryTable(run.value());
  EXPECT_NE(table.find("fading scheme"), std::string::npos);
  EXPECT_NE(table.find("rayleigh, block, 2x mrc"), std::string::npos);
  // tests/python/check_fading_file.py asks for the file to check its layout
  // and plot it.
  if (const char* keep = std::getenv("CAPGAP_FADING_CURVES_OUT"); keep != nullptr) {
    fs::copy_file(path, keep, fs::copy_options::overwrite_existing);
  }
  fs::remove_all(dir);
}

// The outage gap once a target FER exists: simulated FER crossing minus the
// Gaussian-input outage Eb/N0 at that FER; NaN for fast fading.
TEST(FadingCurves, OutageGapAtATargetFer) {
  SchemeConfig block = Qpsk("fad");
  block.channel.law = FadingLaw::kRayleigh;
  block.channel.time = FadingTime::kBlock;
  block.channel.coherence_symbols = 480;
  const SchemeResult r = Analyse(block);
  EXPECT_TRUE(std::isnan(OutageGapDb(r, std::nan(""))));
  // FER 0.3 is crossed between 5 dB (0.5) and 10 dB (0.1); CrossingDb
  // interpolates log10(FER) linearly in dB (sim/engine/stats.h).
  const double gap = OutageGapDb(r, 0.3);
  const double outage = analysis::OutageEbnoDbAtProbability(
      block.channel, analysis::GaussianOutageThresholdEsnoDb(2.0), 2.0, 0.3);
  const double crossing = 5.0 + 5.0 * std::log(0.5 / 0.3) / std::log(0.5 / 0.1);
  EXPECT_NEAR(gap, crossing - outage, 1e-9);
  // Block Rayleigh, one branch, R = 2: (2^2 - 1) / (2 Eb/N0) = -ln(1 - p).
  EXPECT_NEAR(outage, 10.0 * std::log10(3.0 / (2.0 * -std::log1p(-0.3))), 1e-9);

  SchemeConfig fast = block;
  fast.channel.time = FadingTime::kFast;
  EXPECT_TRUE(std::isnan(OutageGapDb(Analyse(fast), 0.3)));
}

}  // namespace
}  // namespace capgap
