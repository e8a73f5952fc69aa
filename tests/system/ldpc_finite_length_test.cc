// No code beats the converse: every LDPC scheme shipped in configs/ is
// simulated at the Eb/N0 where the meta-converse for its own (n, k) allows a
// FER of 1e-3 (Polyanskiy, Poor & Verdu, IEEE Trans. Inf. Theory 56(5), 2010;
// analysis/finite_length.h), and its simulated FER must not lie
// significantly below that bound, nor (in practice, for a practical decoder)
// below the normal approximation at the same Eb/N0.
//
// Statistics: each point runs to 200 frame errors (stop_frame_errors) or
// 2e6 frames; the check uses the one-sided 99.9 % Clopper-Pearson bounds
// (C. J. Clopper, E. S. Pearson, Biometrika 26(4), 1934): the upper bound
// must reach the converse's FER, the upper bound must reach the NA's.
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <string>
#include <vector>

#include "analysis/finite_length.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

namespace fs = std::filesystem;

struct Shipped {
  std::string config;
  SchemeConfig scheme;
};

std::vector<Shipped> ShippedLdpcSchemes() {
  std::vector<Shipped> out;
  std::vector<fs::path> files;
  for (const auto& e : fs::directory_iterator(fs::path(CAPGAP_SOURCE_DIR) / "configs")) {
    if (e.is_regular_file() && e.path().extension() == ".ini") files.push_back(e.path());
  }
  std::sort(files.begin(), files.end());
  for (const fs::path& f : files) {
    auto cfg = LoadRunConfig(f.string(), {});
    EXPECT_TRUE(cfg.ok()) << cfg.status().message();
    if (!cfg.ok()) continue;
    for (const SchemeConfig& s : cfg.value().schemes) {
      if (s.code == "ldpc") out.push_back({f.filename().string(), s});
    }
  }
  return out;
}

TEST(LdpcFiniteLength, NoShippedCodeBeatsTheConverseOrTheNormalApproximation) {
  const std::vector<Shipped> schemes = ShippedLdpcSchemes();
  ASSERT_GE(schemes.size(), 4u);  // three LDPC configs, the short one and the demo's
  const double target = 1e-3;
  for (const Shipped& sh : schemes) {
    SCOPED_TRACE(sh.config + " [" + sh.scheme.name + "]");
    auto chain = Chain::Create(sh.scheme, 7);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    const Chain& c = chain.value();
    analysis::FiniteLengthBlock block;
    block.coded_bits = static_cast<int>(c.code().coded_bits());
    block.info_bits = static_cast<int>(c.code().info_bits());
    block.points.assign(c.mapper().points().begin(), c.mapper().points().end());
    analysis::FiniteLengthOptions o;
    o.rcu = false;  // not used here
    const analysis::FiniteLengthLimits lim = analysis::AnalyseFiniteLength(block, {}, target, o);
    ASSERT_TRUE(lim.present) << lim.absent_reason;
    ASSERT_TRUE(std::isfinite(lim.converse_ebno_db));
    const double x = lim.converse_ebno_db;
    // The bounds at x, evaluated afresh on a one-point grid (converse to
    // about 3 % for binary input).
    o.at_target = false;
    o.rcu_samples_curve = 8000;
    const analysis::FiniteLengthLimits at_x =
        analysis::AnalyseFiniteLength(block, std::vector<double>{x}, target, o);
    const double converse_fer = at_x.fer_converse[0];
    const double na_fer = at_x.fer_normal_approximation[0];
    // x is where the converse allows 1e-3 (Monte Carlo for binary input:
    // a few per cent).
    EXPECT_NEAR(converse_fer, target, 0.15 * target);

    SweepConfig sweep;
    sweep.ebno_db = {x};
    sweep.stop_bit_errors = 0;
    sweep.stop_frame_errors = 200;
    sweep.stop_bits = 2000000ull * c.code().info_bits();
    sweep.seed = 7;
    EngineOptions eo;
    eo.threads = 2;
    const PointResult r = RunPoint(c, sweep, 0, x, eo);
    const Interval ci = ClopperPearson(r.counts.frame_errors, r.counts.frames, 0.998);
    std::printf("%s [%s] (n, k) = (%d, %d): converse 1e-3 at %.3f dB; there NA FER %.3g, "
                "simulated FER %.3g [%.3g, %.3g] (%llu frames)\n",
                sh.config.c_str(), sh.scheme.name.c_str(), block.coded_bits, block.info_bits, x,
                na_fer, r.fer(), ci.low, ci.high,
                static_cast<unsigned long long>(r.counts.frames));
    EXPECT_GE(ci.high, converse_fer) << "FER " << r.fer() << " in " << r.counts.frames
                                     << " frames at " << x << " dB";
    EXPECT_GE(ci.high, na_fer) << "FER " << r.fer() << " at " << x << " dB";
    EXPECT_GE(r.counts.frame_errors, 200u);
  }
}

}  // namespace
}  // namespace capgap
