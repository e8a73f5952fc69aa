// Tests of the Welch PSD and the bandwidth measures: messages, frame-split
// invariance, the normalisation (RRC-shaped unit-energy symbols give the RC
// spectrum with peak 1), the 99 % occupied bandwidth of RRC signals against a
// numerical integral of the ideal raised-cosine spectrum, and the -3 dB
// bandwidth (exactly one symbol rate for any roll-off).
#include "blocks/shaping/spectrum.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <numbers>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/shaping/fir_filter.h"

namespace capgap {
namespace {

constexpr double kPi = std::numbers::pi;

// Ideal raised-cosine spectrum, T = 1 (Proakis & Salehi, Digital
// Communications, 5th ed., ch. 9): 1 for |f| <= (1-a)/2,
// (1/2)[1 + cos(pi/a (|f| - (1-a)/2))] up to (1+a)/2, 0 beyond. It is |H(f)|^2
// of the RRC pulse; its integral is p_RC(0) = 1.
double RcSpectrum(double f, double a) {
  const double af = std::abs(f);
  if (af <= 0.5 * (1.0 - a)) return 1.0;
  if (af > 0.5 * (1.0 + a)) return 0.0;
  return 0.5 * (1.0 + std::cos(kPi / a * (af - 0.5 * (1.0 - a))));
}

// Power in [-f, f] of the ideal spectrum: composite Simpson, 2000 intervals.
double InBandPower(double f, double a) {
  const int n = 2000;
  const double h = f / n;
  double s = RcSpectrum(0.0, a) + RcSpectrum(f, a);
  for (int i = 1; i < n; ++i) s += (i % 2 ? 4.0 : 2.0) * RcSpectrum(i * h, a);
  return 2.0 * s * h / 3.0;
}

// Ideal 99 % bandwidth: bisection on f for InBandPower(f) = 0.99 (the
// spectrum is symmetric, so 0.5 % lies beyond each edge); B = 2 f.
double IdealOccupiedBandwidth(double a, double fraction) {
  double lo = 0.0, hi = 0.5 * (1.0 + a);
  for (int it = 0; it < 60; ++it) {
    const double mid = 0.5 * (lo + hi);
    (InBandPower(mid, a) < fraction ? lo : hi) = mid;
  }
  return lo + hi;
}

std::vector<cf32> ShapedQpsk(double a, std::size_t symbols, int sps) {
  RngStream rng(DeriveKey(3, "spectrum_test"), 0, 0, Substream::kBits);
  std::vector<cf32> x(symbols);
  const float r = static_cast<float>(std::numbers::sqrt2 / 2.0);
  for (cf32& v : x) {
    const std::uint64_t u = rng.NextU64();
    v = cf32((u & 1) ? -r : r, (u & 2) ? -r : r);
  }
  const Transmitter tx = Transmitter::Create({PulseShape::kRootRaisedCosine, a, 32, sps}).value();
  FirWorkspace ws = tx.MakeWorkspace();
  std::vector<cf32> y(symbols * static_cast<std::size_t>(sps));
  tx.Shape(x, y, ws);
  // Drop the start-up transient of the zero history (32 symbols).
  y.erase(y.begin(), y.begin() + 32 * sps);
  return y;
}

TEST(WelchPsd, RejectsBadParametersWithExactMessages) {
  EXPECT_EQ(WelchPsd::Create(100, 8).status().message(),
            "spectrum: segment_length = 100: must be a power of 2 in 16..1048576");
  EXPECT_EQ(WelchPsd::Create(256, 0).status().message(),
            "spectrum: samples_per_symbol = 0: must be >= 1");
  const WelchPsd w = WelchPsd::Create(256, 8).value();
  WelchPsd::Workspace ws = w.MakeWorkspace();
  std::vector<cf32> few(100);
  w.Accumulate(few, ws);
  std::vector<double> psd(256);
  EXPECT_EQ(w.Finish(ws, psd).message(), "spectrum: no complete segment (need 256 samples)");
}

TEST(WelchPsd, FrameSplitGivesTheSameEstimate) {
  const std::vector<cf32> y = ShapedQpsk(0.35, 4000, 8);
  const WelchPsd w = WelchPsd::Create(512, 8).value();
  WelchPsd::Workspace one = w.MakeWorkspace(), many = w.MakeWorkspace();
  w.Accumulate(y, one);
  std::size_t pos = 0, i = 0;
  const std::size_t frames[] = {1, 255, 256, 257, 1000, 3};
  while (pos < y.size()) {
    const std::size_t n = std::min(frames[i++ % 6], y.size() - pos);
    w.Accumulate(std::span(y).subspan(pos, n), many);
    pos += n;
  }
  EXPECT_EQ(one.segments(), many.segments());
  EXPECT_EQ(one.segments(), (y.size() - 256) / 256);  // hop N/2
  std::vector<double> a(512), b(512);
  ASSERT_TRUE(w.Finish(one, a).ok());
  ASSERT_TRUE(w.Finish(many, b).ok());
  EXPECT_EQ(a, b);
}

// 99 % bandwidth of RRC-shaped QPSK (span 32, S = 8, 131 072 symbols, N = 512,
// bin 1/64 symbol rate, ~4100 segments) against the ideal value from the
// numerical integral above; tolerance 3 % (the Hann window smears the band
// edge by +-2 bins = +-0.03 and the truncated pulse leaks a little power).
// Also the -3 dB bandwidth: the RC spectrum equals half its peak at |f| =
// 1/(2T) for every roll-off (same source), so B_3dB = 1 symbol rate; 2 %.
// (The estimate's peak bin is biased up by its own scatter, ~2 sd of a bin
// estimate = ~3.4 % at 4100 segments; on the RC slope pi/(2a) that moves each
// edge inward by <= 0.006 for a = 0.5: inside the 2 %.)
// And the level: the flat part |f| < (1 - a)/2 is 1 (unit-energy pulse and
// symbols, Es = 1); its mean over ~20+ bins is within 3 %.
TEST(WelchPsd, RrcBandwidthsMatchTheIdealRaisedCosineSpectrum) {
  for (double a : {0.2, 0.35, 0.5}) {
    const int sps = 8, n = 512;
    const std::vector<cf32> y = ShapedQpsk(a, 131072, sps);
    const WelchPsd w = WelchPsd::Create(n, sps).value();
    WelchPsd::Workspace ws = w.MakeWorkspace();
    w.Accumulate(y, ws);
    std::vector<double> psd(static_cast<std::size_t>(n));
    ASSERT_TRUE(w.Finish(ws, psd).ok());

    const double ideal99 = IdealOccupiedBandwidth(a, 0.99);
    const double meas99 = OccupiedBandwidth(psd, w.bin_width(), 0.99);
    const double meas3 = HalfPowerBandwidth(psd, w.bin_width());
    double flat = 0.0;
    int flat_bins = 0;
    for (int k = 0; k < n; ++k) {
      if (std::abs(w.frequency(k)) < 0.5 * (1.0 - a) - 3.0 * w.bin_width()) {
        flat += psd[static_cast<std::size_t>(k)];
        ++flat_bins;
      }
    }
    flat /= flat_bins;
    std::printf("a=%.2f: 99%% BW measured %.4f ideal %.4f (%+.2f%%); -3 dB BW %.4f; flat level %.4f\n",
                a, meas99, ideal99, 100.0 * (meas99 / ideal99 - 1.0), meas3, flat);
    EXPECT_NEAR(meas99 / ideal99, 1.0, 0.03) << a;
    EXPECT_NEAR(meas3, 1.0, 0.02) << a;
    EXPECT_NEAR(flat, 1.0, 0.03) << a;
  }
}

// The ideal 99 % bandwidth itself is sensible: between 1 and 1 + a, growing
// with a (so the test above compares against a number that can be wrong).
TEST(WelchPsd, IdealOccupiedBandwidthIsBetweenNyquistAndFullRollOff) {
  double prev = 0.0;
  for (double a : {0.2, 0.35, 0.5}) {
    const double b = IdealOccupiedBandwidth(a, 0.99);
    EXPECT_GT(b, 1.0);
    EXPECT_LT(b, 1.0 + a);
    EXPECT_GT(b, prev);
    prev = b;
    EXPECT_NEAR(InBandPower(0.5 * (1.0 + a), a), 1.0, 1e-6);  // total power 1
  }
}

}  // namespace
}  // namespace capgap
