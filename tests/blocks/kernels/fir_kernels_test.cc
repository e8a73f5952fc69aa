// Tests of the direct FIR kernels (blocks/kernels/fir_kernels.h).
//
// This file is compiled once per Highway target (hwy/foreach_target.h, like
// fir_kernels.cc), so every target compiled into the library and supported by
// this CPU is checked against the double-accumulating oracle fir_reference.h
// for both kernels, for factors S = 1..16 (including S that neither divides
// nor is a multiple of the vector width) and tap counts from 1 to 161, on
// lengths 1, 3, 7, N - 1, N, N + 1, 2N + 1 and a large odd one (N = one block
// of the kernel's 8 accumulators), with misaligned input and output starts.
// The read contract is checked on the way: the history and lookahead the plan
// declares are filled with random finite values (they must not change any
// output), everything beyond them with NaN (any read of it that reached an
// output would show), and the output is NaN-poisoned with guard elements past
// its end (no write may land there). Calls cut at uneven points must give the
// bit-identical samples of one call. The public entry points are checked for
// the forced-scalar route (bit-exact reference) and the target name.
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstring>
#include <limits>
#include <span>
#include <string>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/fir_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/fir_kernels-inl.h"
// clang-format on

// ---------------------------------------------------------------------------
// Per-target entry points (compiled for every target).
HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
void InterpolateUnderTest(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n,
                          cf32* out) {
  FirInterpolateKernel(plan, x, n, out);
}
void BuildTableUnderTest(FirDecimatorPlan& plan) { FirBuildDecimatorTableKernel(plan); }
void DecimateUnderTest(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out,
                       cf32* out) {
  FirDecimateKernel(plan, in, n_out, out);
}
std::size_t FloatsUnderTest() { return FirKernelFloats(); }
std::int64_t TargetUnderTest() { return HWY_TARGET; }
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/core/rng_stream.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/fir_kernels.h"
#include "blocks/kernels/fir_reference.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(InterpolateUnderTest);
HWY_EXPORT(BuildTableUnderTest);
HWY_EXPORT(DecimateUnderTest);
HWY_EXPORT(FloatsUnderTest);
HWY_EXPORT(TargetUnderTest);

// The library picks its target once, on first use. Make that happen at
// start-up, before any test below mocks the CPU's target list.
const char* const kLibraryTarget = FirKernelTarget();

constexpr float kEps = std::numeric_limits<float>::epsilon();
// Allowed |kernel - oracle| in float epsilons times sum |h| |x| of the
// output. Float summation of K terms is bounded by ~K eps sum|terms| in the
// worst case and is ~eps sum|terms| / sqrt(K) x O(1) for random signs; the
// largest ratio seen over all cases and targets of this file is printed by
// the tests: 1.60 (interpolator) and 1.25 (decimator) on this machine, over
// the AVX3, AVX2, SSE4 and SSSE3 targets (SCALAR runs the oracle itself).
constexpr double kUlpTolerance = 4.0;
constexpr std::size_t kGuard = 64;  // NaN elements beyond history / lookahead / output

float Nan() { return std::numeric_limits<float>::quiet_NaN(); }

// Uniform values in [-1, 1) from a Philox stream: taps or samples.
std::vector<float> Uniform(std::size_t n, std::uint32_t unit) {
  RngStream rng(DeriveKey(31, "fir_kernels_test"), 0, unit, Substream::kBits);
  std::vector<float> v(n);
  for (float& x : v) x = static_cast<float>(static_cast<double>(rng.NextU64() >> 11) * 0x1p-52 - 1.0);
  return v;
}

std::vector<cf32> UniformComplex(std::size_t n, std::uint32_t unit) {
  const std::vector<float> f = Uniform(2 * n, unit);
  std::vector<cf32> v(n);
  for (std::size_t i = 0; i < n; ++i) v[i] = cf32(f[2 * i], f[2 * i + 1]);
  return v;
}

// [NaN guard | history | data | lookahead | NaN guard], finite random inside;
// `offset` extra leading elements misalign the data start.
struct Line {
  std::vector<cf32> buffer;
  std::size_t start = 0;  // index of data element 0
  const cf32* data() const { return buffer.data() + start; }
};

Line MakeLine(std::size_t history, std::size_t n, std::size_t lookahead, std::size_t offset,
              std::uint32_t unit) {
  Line line;
  line.buffer.assign(offset + kGuard + history + n + lookahead + kGuard, cf32(Nan(), Nan()));
  line.start = offset + kGuard + history;
  const std::vector<cf32> v = UniformComplex(history + n + lookahead, unit);
  std::copy(v.begin(), v.end(), line.buffer.begin() + static_cast<std::ptrdiff_t>(offset + kGuard));
  return line;
}

// Output buffer: NaN everywhere, `offset` misaligns out[0], kGuard after.
struct Output {
  std::vector<cf32> buffer;
  std::size_t offset = 0;
  std::size_t n = 0;
  cf32* data() { return buffer.data() + offset; }
  std::span<const cf32> values() const { return std::span(buffer).subspan(offset, n); }
  bool GuardsIntact() const {
    for (std::size_t i = 0; i < buffer.size(); ++i) {
      if (i >= offset && i < offset + n) continue;
      if (!std::isnan(buffer[i].real()) || !std::isnan(buffer[i].imag())) return false;
    }
    return true;
  }
};

Output MakeOutput(std::size_t n, std::size_t offset) {
  Output o;
  o.buffer.assign(offset + n + kGuard, cf32(Nan(), Nan()));
  o.offset = offset;
  o.n = n;
  return o;
}

// sum |h| |x| of each output: the magnitude the tolerance scales with.
std::vector<double> InterpolatorMagnitudes(std::span<const float> h, std::size_t s, const cf32* x,
                                           std::size_t n) {
  std::vector<double> mag(n * s, 0.0);
  for (std::size_t d = 0; d < n; ++d) {
    for (std::size_t p = 0; p < s; ++p) {
      for (std::size_t m = p, i = 0; m < h.size(); m += s, ++i) {
        mag[d * s + p] += std::abs(static_cast<double>(h[m])) *
                          std::abs(std::complex<double>(*(x + d - static_cast<std::ptrdiff_t>(i))));
      }
    }
  }
  return mag;
}

std::vector<double> DecimatorMagnitudes(std::span<const float> g, std::size_t s, const cf32* in,
                                        std::size_t n_out) {
  std::vector<double> mag(n_out, 0.0);
  for (std::size_t k = 0; k < n_out; ++k) {
    for (std::size_t m = 0; m < g.size(); ++m) {
      mag[k] += std::abs(static_cast<double>(g[m])) *
                std::abs(std::complex<double>(in[static_cast<std::ptrdiff_t>(k * s) -
                                                 static_cast<std::ptrdiff_t>(m)]));
    }
  }
  return mag;
}

// Largest |got - want| / (eps * mag) (want finite, got finite, else infinity).
double WorstRatio(std::span<const cf32> got, std::span<const cf32> want,
                  const std::vector<double>& mag) {
  double worst = 0.0;
  for (std::size_t i = 0; i < got.size(); ++i) {
    if (!std::isfinite(got[i].real()) || !std::isfinite(got[i].imag())) {
      return std::numeric_limits<double>::infinity();
    }
    const double err = std::abs(std::complex<double>(got[i]) - std::complex<double>(want[i]));
    const double scale = static_cast<double>(kEps) * std::max(mag[i], 1e-30);
    worst = std::max(worst, err / scale);
  }
  return worst;
}

struct FilterCase {
  std::size_t taps;
  int factor;
};
// S dividing 16 floats' 8 samples or not, a multiple of it or not; L below,
// at and above multiples of S; the pulses of the chain (span 10: S=4 L=41).
const FilterCase kCases[] = {{1, 1},  {7, 1},   {1, 2},   {2, 2},  {21, 2},  {41, 4},  {40, 4},
                             {3, 4},  {43, 4},  {31, 3},  {26, 5}, {61, 6},  {81, 8},  {17, 8},
                             {161, 16}, {9, 16}, {50, 7}, {129, 4}, {73, 12}};

// Symbols (interpolator) or outputs (decimator) of one block of 8 vectors.
std::size_t BlockLength(std::size_t floats, std::size_t s, bool interpolator) {
  const std::size_t c = std::max<std::size_t>(floats / 2, 1);
  return interpolator ? std::max<std::size_t>(1, 8 * c / s) : 8 * c;
}

std::vector<std::size_t> Lengths(std::size_t big) {
  return {1, 3, 7, big - 1, big, big + 1, 2 * big + 1, 4099};
}

// ---------------------------------------------------------------------------
// Every compiled target against the reference.
class FirKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(FirKernelPerTarget);

TEST_P(FirKernelPerTarget, DispatchReachesTheTargetUnderTest) {
  EXPECT_EQ(HWY_DYNAMIC_DISPATCH(TargetUnderTest)(), GetParam());
}

TEST_P(FirKernelPerTarget, InterpolatorMatchesReferenceOnAwkwardLengthsAndMisalignedStarts) {
  const std::size_t floats = HWY_DYNAMIC_DISPATCH(FloatsUnderTest)();
  double worst = 0.0;
  for (const FilterCase& c : kCases) {
    const std::vector<float> h = Uniform(c.taps, static_cast<std::uint32_t>(c.taps * 100) + static_cast<std::uint32_t>(c.factor));
    const FirInterpolatorPlan plan = MakeFirInterpolatorPlan(h, c.factor);
    const auto s = static_cast<std::size_t>(c.factor);
    for (std::size_t n : Lengths(BlockLength(floats, s, true))) {
      for (std::size_t offset : {0u, 1u, 3u}) {
        SCOPED_TRACE(testing::Message() << "L=" << c.taps << " S=" << s << " n=" << n
                                        << " offset=" << offset);
        const Line x = MakeLine(plan.history(), n, plan.lookahead(), offset,
                                static_cast<std::uint32_t>(n + offset));
        Output got = MakeOutput(n * s, (offset * 5) % 4);
        std::vector<cf32> want(n * s);
        HWY_DYNAMIC_DISPATCH(InterpolateUnderTest)(plan, x.data(), n, got.data());
        reference::FirInterpolate(h, c.factor, x.data(), n, want.data());
        const double r = WorstRatio(got.values(), want, InterpolatorMagnitudes(h, s, x.data(), n));
        worst = std::max(worst, r);
        ASSERT_LE(r, kUlpTolerance);
        ASSERT_TRUE(got.GuardsIntact());
      }
    }
  }
  std::printf("%s interpolator: worst |kernel - oracle| = %.3f eps sum|h||x|\n",
              hwy::TargetName(GetParam()), worst);
}

TEST_P(FirKernelPerTarget, DecimatorMatchesReferenceOnAwkwardLengthsAndMisalignedStarts) {
  const std::size_t floats = HWY_DYNAMIC_DISPATCH(FloatsUnderTest)();
  double worst = 0.0;
  for (const FilterCase& c : kCases) {
    const std::vector<float> g = Uniform(c.taps, static_cast<std::uint32_t>(c.taps * 100) + static_cast<std::uint32_t>(c.factor) + 7u);
    FirDecimatorPlan plan = MakeFirDecimatorPlan(g, c.factor);
    HWY_DYNAMIC_DISPATCH(BuildTableUnderTest)(plan);
    ASSERT_EQ(plan.vector_floats, floats);
    ASSERT_GE(plan.padded_taps, g.size());
    ASSERT_LE(plan.padded_taps - 1, plan.history());
    const auto s = static_cast<std::size_t>(c.factor);
    for (std::size_t n_out : Lengths(BlockLength(floats, s, false))) {
      for (std::size_t offset : {0u, 1u, 2u}) {
        SCOPED_TRACE(testing::Message() << "L=" << c.taps << " S=" << s << " n_out=" << n_out
                                        << " offset=" << offset);
        // The call consumes n_out S samples; the last output is at sample
        // (n_out - 1) S, the samples after it are input of the next call.
        const Line in = MakeLine(plan.history(), n_out * s, plan.lookahead(), offset,
                                 static_cast<std::uint32_t>(n_out + 17 * offset));
        Output got = MakeOutput(n_out, (offset * 3) % 4);
        std::vector<cf32> want(n_out);
        HWY_DYNAMIC_DISPATCH(DecimateUnderTest)(plan, in.data(), n_out, got.data());
        reference::FirDecimate(g, c.factor, in.data(), n_out, want.data());
        const double r = WorstRatio(got.values(), want, DecimatorMagnitudes(g, s, in.data(), n_out));
        worst = std::max(worst, r);
        ASSERT_LE(r, kUlpTolerance);
        ASSERT_TRUE(got.GuardsIntact());
      }
    }
  }
  std::printf("%s decimator: worst |kernel - oracle| = %.3f eps sum|g||x|\n",
              hwy::TargetName(GetParam()), worst);
}

// One call over [0, n) and calls over [0, a), [a, b), [b, n) read the same
// buffer: every sample must come out bit-identical, whatever vector, group or
// call it falls in (the property the streaming filters rely on).
TEST_P(FirKernelPerTarget, CallsCutAtUnevenPointsGiveTheSamplesOfOneCall) {
  for (const FilterCase& c : kCases) {
    const auto s = static_cast<std::size_t>(c.factor);
    const std::vector<float> h = Uniform(c.taps, static_cast<std::uint32_t>(c.taps + 5));
    const std::size_t n = 1001;
    SCOPED_TRACE(testing::Message() << "L=" << c.taps << " S=" << s);
    {
      const FirInterpolatorPlan plan = MakeFirInterpolatorPlan(h, c.factor);
      const Line x = MakeLine(plan.history(), n, plan.lookahead(), 0, 3);
      std::vector<cf32> whole(n * s), split(n * s);
      HWY_DYNAMIC_DISPATCH(InterpolateUnderTest)(plan, x.data(), n, whole.data());
      std::size_t pos = 0;
      for (std::size_t len : {1u, 13u, 2u, 129u, 7u, 500u}) {
        HWY_DYNAMIC_DISPATCH(InterpolateUnderTest)(plan, x.data() + pos, len, split.data() + pos * s);
        pos += len;
      }
      HWY_DYNAMIC_DISPATCH(InterpolateUnderTest)(plan, x.data() + pos, n - pos, split.data() + pos * s);
      EXPECT_EQ(whole, split);
    }
    {
      FirDecimatorPlan plan = MakeFirDecimatorPlan(h, c.factor);
      HWY_DYNAMIC_DISPATCH(BuildTableUnderTest)(plan);
      const Line in = MakeLine(plan.history(), n * s, plan.lookahead(), 0, 4);
      std::vector<cf32> whole(n), split(n);
      HWY_DYNAMIC_DISPATCH(DecimateUnderTest)(plan, in.data(), n, whole.data());
      std::size_t pos = 0;
      for (std::size_t len : {1u, 13u, 2u, 129u, 7u, 500u}) {
        HWY_DYNAMIC_DISPATCH(DecimateUnderTest)(plan, in.data() + pos * s, len, split.data() + pos);
        pos += len;
      }
      HWY_DYNAMIC_DISPATCH(DecimateUnderTest)(plan, in.data() + pos * s, n - pos, split.data() + pos);
      EXPECT_EQ(whole, split);
    }
  }
}

// ---------------------------------------------------------------------------
// Public entry points.

TEST(FirKernels, ForceScalarRoutesToTheReferenceBitExactly) {
  const std::vector<float> h = Uniform(41, 1);
  const FirInterpolatorPlan ip = MakeFirInterpolatorPlan(h, 4);
  const FirDecimatorPlan dp = MakeFirDecimatorPlan(h, 4);
  const std::size_t n = 999;
  const Line x = MakeLine(ip.history(), n, ip.lookahead(), 1, 8);
  const Line r = MakeLine(dp.history(), n * 4, dp.lookahead(), 1, 9);
  std::vector<cf32> y(n * 4), want_y(n * 4), z(n), want_z(n);
  const bool before = ForceScalarKernels(true);
  EXPECT_STREQ(FirKernelTarget(), "SCALAR");
  FirInterpolate(ip, x.data(), n, y.data());
  FirDecimate(dp, r.data(), n, z.data());
  reference::FirInterpolate(h, 4, x.data(), n, want_y.data());
  reference::FirDecimate(h, 4, r.data(), n, want_z.data());
  EXPECT_EQ(y, want_y);
  EXPECT_EQ(z, want_z);
  EXPECT_TRUE(ForceScalarKernels(before));  // returns the previous setting
  EXPECT_STREQ(FirKernelTarget(), kLibraryTarget);
}

// The dispatched target is the noise kernels' one (same choice rule), and
// the plan's table was built by it.
TEST(FirKernels, DispatchedTargetMatchesTheNoiseKernelsAndBuildsThePlan) {
  EXPECT_STREQ(kLibraryTarget, NoiseKernelTarget());
  const std::vector<float> h = Uniform(41, 2);
  const FirDecimatorPlan dp = MakeFirDecimatorPlan(h, 4);
  if (std::string(kLibraryTarget) != "SCALAR") {
    EXPECT_GT(dp.vector_floats, 0u);
    EXPECT_EQ(dp.table.size() % dp.vector_floats, 0u);
  }
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
