// Tests of the receiver impairments: validation messages, the carrier phase
// and frequency rotation against exp(j (phi0 + 2 pi f n / S)) computed
// directly, its continuity across frames, and what a phase offset does to the
// matched-filter output of a noise-free RRC link.
#include "blocks/shaping/impairments.h"

#include <gtest/gtest.h>

#include <cmath>
#include <complex>
#include <numbers>
#include <vector>

#include "blocks/shaping/fir_filter.h"

namespace capgap {
namespace {

using cd = std::complex<double>;
constexpr double kPi = std::numbers::pi;

TEST(ValidateImpairmentSpec, DefaultsAreOffAndMessagesNameTheRule) {
  ImpairmentSpec s;
  EXPECT_TRUE(ValidateImpairmentSpec(s).ok());
  s.timing_offset_symbols = 0.75;
  EXPECT_EQ(ValidateImpairmentSpec(s).message(),
            "impairments: timing_offset_symbols = 0.75: must be in [-0.5, 0.5]");
  s = ImpairmentSpec{};
  s.phase_offset_deg = NAN;
  EXPECT_EQ(ValidateImpairmentSpec(s).message(), "impairments: phase_offset_deg = nan: must be finite");
  s = ImpairmentSpec{};
  s.frequency_offset_cycles_per_symbol = -0.6;
  EXPECT_EQ(ValidateImpairmentSpec(s).message(),
            "impairments: frequency_offset_cycles_per_symbol = -0.6: must be in [-0.5, 0.5]");
  EXPECT_TRUE(CarrierOffset::Create(0.0, 0.0, 8).value().is_identity());
}

// Rotation over a stream cut into awkward frames equals the closed form at
// every sample (double-precision reference; float output, tolerance 2e-6 on
// unit-magnitude samples after 10^5 samples of recurrence).
TEST(CarrierOffset, RotatesByPhaseAndFrequencyContinuouslyAcrossFrames) {
  const double phi_deg = 30.0, f = 0.013;
  const int s = 4;
  const CarrierOffset c = CarrierOffset::Create(phi_deg, f, s).value();
  CarrierOffset::State state;
  const std::size_t total = 100000;
  std::vector<cf32> x(total, cf32(1.0f, 0.0f));
  const std::size_t frames[] = {1, 7, 4096, 333, 10000};
  std::size_t pos = 0, i = 0;
  while (pos < total) {
    const std::size_t n = std::min(frames[i++ % 5], total - pos);
    c.Apply(std::span(x).subspan(pos, n), state);
    pos += n;
  }
  double max_err = 0.0;
  for (std::size_t n = 0; n < total; ++n) {
    const double phase = phi_deg * kPi / 180.0 + 2.0 * kPi * f * static_cast<double>(n) / s;
    max_err = std::max(max_err, std::abs(cd(x[n]) - std::polar(1.0, phase)));
  }
  EXPECT_LT(max_err, 2e-6);
}

// A pure phase offset phi rotates every noise-free matched-filter output by
// exp(j phi): z_k = x_{k-D} e^{j phi} up to the link's truncation ISI (< -50 dB
// for span 16, a = 0.35; fir_filter_test.cc).
TEST(CarrierOffset, PhaseOffsetRotatesTheMatchedFilterOutput) {
  const PulseSpec spec{PulseShape::kRootRaisedCosine, 0.35, 16, 8};
  const Transmitter tx = Transmitter::Create(spec).value();
  const Receiver rx = Receiver::Create(spec).value();
  const CarrierOffset c = CarrierOffset::Create(45.0, 0.0, 8).value();
  FirWorkspace tws = tx.MakeWorkspace(), rws = rx.MakeWorkspace();
  CarrierOffset::State cs;
  std::vector<cf32> x(1000);
  for (std::size_t k = 0; k < x.size(); ++k) {
    x[k] = cf32((k * 7 % 3 == 0) ? 0.7071f : -0.7071f, (k * 5 % 7 < 3) ? 0.7071f : -0.7071f);
  }
  std::vector<cf32> samples(x.size() * 8), z(x.size());
  tx.Shape(x, samples, tws);
  c.Apply(samples, cs);
  rx.Receive(samples, z, rws);
  const cd rot = std::polar(1.0, kPi / 4.0);
  double max_err = 0.0;
  for (std::size_t k = 32; k < x.size(); ++k) {
    max_err = std::max(max_err, std::abs(cd(z[k]) - cd(x[k - 16]) * rot));
  }
  EXPECT_LT(max_err, 1e-2);
  // And without the rotation compensation the error is large (test can fail).
  EXPECT_GT(std::abs(cd(z[100]) - cd(x[84])), 0.5);
}

}  // namespace
}  // namespace capgap
