// What AnalyseScheme adds for the figures: the noise-free eye of a shaped
// scheme, the constellation at the demapper input, and the constrained-
// capacity curve on the power-bandwidth plane.
#include "sim/chain/scheme_result.h"

#include <gtest/gtest.h>

#include <cmath>

#include "analysis/capacity.h"
#include "blocks/channel/awgn_channel.h"
#include "sim/engine/engine.h"

namespace capgap {
namespace {

SchemeConfig Qpsk(PulseShape shaping) {
  SchemeConfig s;
  s.name = "views";
  s.modulation = ParseModulation("qpsk").value();
  s.demapper = DemapMethod::kMaxLog;
  s.frame_bits = 960;
  s.shaping = shaping;
  s.rolloff = 0.35;
  s.span = 16;
  s.samples_per_symbol = 4;
  return s;
}

SweepConfig Sweep() {
  SweepConfig sweep;
  sweep.ebno_db = {4, 6, 8};
  sweep.stop_bit_errors = 300;
  sweep.stop_bits = 4000000;
  sweep.ber_floor = 0;
  sweep.target_ber = 1e-3;
  sweep.seed = 3;
  return sweep;
}

SchemeResult Analyse(const SchemeConfig& scheme) {
  auto chain = Chain::Create(scheme, 3);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  EngineOptions eo;
  eo.threads = 1;
  const SweepConfig sweep = Sweep();
  return AnalyseScheme(chain.value(), sweep, RunSweep(chain.value(), sweep, eo));
}

// RRC transmit and matched filter cascade to a raised cosine, which is zero
// at every nonzero multiple of T (Nyquist criterion; Proakis & Salehi,
// Digital Communications, 5th ed., ch. 9): at the ideal instant the eye is
// closed to +-1/sqrt(2) up to the truncation ISI of a span-16 pair (-51 dB,
// tests/blocks/shaping/fir_filter_test.cc), while half a symbol away the
// neighbours' tails spread it widely.
TEST(SchemeResultViews, RrcEyeIsOpenAtTheIdealInstantOnly) {
  const SchemeResult r = Analyse(Qpsk(PulseShape::kRootRaisedCosine));
  const SignalViews& v = r.signal;
  ASSERT_TRUE(v.present);
  ASSERT_GT(v.eye_traces, 100);
  const std::size_t width = v.eye_time.size();
  ASSERT_EQ(width % 2, 1u);
  ASSERT_EQ(v.eye.size(), static_cast<std::size_t>(v.eye_traces) * width);
  const std::size_t centre = width / 2, half = width / 4;
  EXPECT_DOUBLE_EQ(v.eye_time[centre], 0.0);
  EXPECT_NEAR(v.eye_time[centre - half], -0.5, 1e-12);
  double worst = 0, spread = 0;
  for (int t = 0; t < v.eye_traces; ++t) {
    const double* row = &v.eye[static_cast<std::size_t>(t) * width];
    worst = std::max(worst, std::abs(std::abs(row[centre]) - 1.0 / std::sqrt(2.0)));
    spread = std::max(spread, std::abs(row[centre - half]));
  }
  EXPECT_LT(worst, 0.01);
  EXPECT_GT(spread, 0.8);  // some trace at t = -T/2 far from the +-0.707 levels
}

// An RC transmit pulse followed by an RC "matched" filter is not Nyquist: the
// eye at the ideal instant is no longer closed to two levels.
TEST(SchemeResultViews, RcTwiceShowsIntersymbolInterference) {
  const SchemeResult r = Analyse(Qpsk(PulseShape::kRaisedCosine));
  const SignalViews& v = r.signal;
  ASSERT_GT(v.eye_traces, 100);
  const std::size_t width = v.eye_time.size(), centre = width / 2;
  double lo = 1e9, hi = 0;
  for (int t = 0; t < v.eye_traces; ++t) {
    const double a = std::abs(v.eye[static_cast<std::size_t>(t) * width + centre]);
    lo = std::min(lo, a);
    hi = std::max(hi, a);
  }
  EXPECT_GT(hi - lo, 0.05);
}

// Constellation at the demapper input: a noisy QPSK cloud whose mean squared
// distance to the nearest point estimates N0 (Es = 1, complex noise of
// variance N0, DEVELOPERS.md Conventions; matched filter of unit-energy taps passes N0).
// At 10 dB Eb/N0 (Es/N0 = 13 dB) wrong-nearest-point events have probability
// ~1e-10, so the estimate is unbiased; 2000 samples of an exponential
// variable give a standard error of N0/sqrt(2000) = 2.2 %: the band is +-4
// sigma (9 %), common practice.
TEST(SchemeResultViews, ConstellationNoiseMatchesN0) {
  for (PulseShape shaping : {PulseShape::kNone, PulseShape::kRootRaisedCosine}) {
    auto chain = Chain::Create(Qpsk(shaping), 3);
    ASSERT_TRUE(chain.ok());
    NoiseSpec spec;
    spec.ebno_db = 10;
    spec.bits_per_symbol = 2;
    spec.samples_per_symbol = chain.value().samples_per_symbol();
    const AwgnChannel channel(spec);
    const std::vector<cf32> y = chain.value().CaptureDemapperInput(channel, 2000);
    ASSERT_EQ(y.size(), 2000u);
    const double a = 1.0 / std::sqrt(2.0);
    double sum = 0;
    for (const cf32& z : y) {
      const double di = std::abs(z.real()) - a, dq = std::abs(z.imag()) - a;
      sum += di * di + dq * dq;
    }
    const double n0 = channel.n0();
    EXPECT_NEAR(sum / 2000.0 / n0, 1.0, 0.09) << ToString(shaping);
  }
}

// The operating point of the picture: Eb/N0 needed for target_ber when the
// curve crosses it.
TEST(SchemeResultViews, ConstellationIsDrawnAtTheOperatingPoint) {
  const SchemeResult r = Analyse(Qpsk(PulseShape::kNone));
  ASSERT_TRUE(std::isfinite(r.summary.ebno_at_target_db));
  EXPECT_DOUBLE_EQ(r.signal.constellation_ebno_db, r.summary.ebno_at_target_db);
  EXPECT_EQ(r.signal.eye_traces, 0);  // unshaped: no eye
  EXPECT_EQ(r.signal.constellation_i.size(), 2000u);
}

// Gray QPSK is two independent BPSK channels at half the Es/N0 each, so its
// constrained capacity at rho bits per symbol needs the Eb/N0 of binary input
// at rate rho/2 (common practice; an identity independent of the 2-D
// quadrature, which BinaryInputMinEbnoDb evaluates in 1-D).
TEST(SchemeResultViews, QpskConstrainedCurveEqualsBinaryInputAtHalfRate) {
  const SchemeResult r = Analyse(Qpsk(PulseShape::kNone));
  ASSERT_EQ(r.limits.constrained_curve_rho.size(), 24u);
  for (std::size_t i = 0; i < r.limits.constrained_curve_rho.size(); ++i) {
    const double rho = r.limits.constrained_curve_rho[i];
    EXPECT_NEAR(r.limits.constrained_curve_ebno_db[i], analysis::BinaryInputMinEbnoDb(rho / 2), 0.01)
        << "rho = " << rho;
  }
}

// The summary at target_fer takes the FER and its Clopper-Pearson bounds
// through the same crossing as target_ber: FER 1e-1 at 1 dB and 1e-3 at 2 dB
// cross 1e-2 at 1.5 dB by log-linear interpolation (arithmetic); the lower
// bound crosses first, the upper last; interrupted points are left out.
TEST(SchemeResultSummary, FerCrossingUsesTheFerAndItsInterval) {
  std::vector<PointResult> pts(3);
  const std::uint64_t frames = 100000;
  const std::uint64_t errors[] = {10000, 100, 5};
  for (std::size_t i = 0; i < 3; ++i) {
    pts[i].ebno_db = 1.0 + static_cast<double>(i);
    pts[i].counts.frames = frames;
    pts[i].counts.frame_errors = errors[i];
    pts[i].counts.bits = frames * 100;
    pts[i].counts.bit_errors = errors[i] * 3;
    pts[i].ber_ci = ClopperPearson(pts[i].counts.bit_errors, pts[i].counts.bits);
    pts[i].fer_ci = ClopperPearson(errors[i], frames);
  }
  const TargetCrossing fer = CrossTarget(pts, ErrorRate::kFer, 1e-2);
  EXPECT_NEAR(fer.ebno_db, 1.5, 1e-12);
  EXPECT_LT(fer.low_db, fer.ebno_db);
  EXPECT_GT(fer.high_db, fer.ebno_db);
  // 100 errors: about +-20 % at 95 % (common practice), i.e. +-0.08 decades
  // of FER; the curve falls 2 decades per dB, so roughly +-0.04 dB.
  EXPECT_GT(fer.high_db - fer.low_db, 0.02);
  EXPECT_LT(fer.high_db - fer.low_db, 0.12);
  // BER = 3 FER / 100 here: 3e-3 at 1 dB, 3e-5 at 2 dB, crossing 3e-4 at 1.5 dB.
  EXPECT_NEAR(CrossTarget(pts, ErrorRate::kBer, 3e-4).ebno_db, 1.5, 1e-12);
  pts[1].stop_reason = StopReason::kInterrupted;  // then 1e-1 at 1 dB to 5e-5 at 3 dB
  EXPECT_NEAR(CrossTarget(pts, ErrorRate::kFer, 1e-2).ebno_db,
              1.0 + 2.0 * 1.0 / (-1.0 - std::log10(5e-5)), 1e-12);
  EXPECT_TRUE(std::isnan(CrossTarget(pts, ErrorRate::kFer, 1e-6).ebno_db));
}

}  // namespace
}  // namespace capgap
