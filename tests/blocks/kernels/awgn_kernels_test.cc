// Tests of the Gaussian noise kernels (blocks/kernels/awgn_kernels.h).
//
// This file is compiled once per Highway target (hwy/foreach_target.h, like
// awgn_kernels.cc), so every target compiled into the library and supported by
// this CPU is checked against the scalar oracle awgn_reference.h on awkward
// lengths and misaligned starts, and on hand-picked edge words of the
// Box-Muller transform. The public entry points (dispatched target, forced
// scalar path) are checked for the stream mapping and advance, and the
// distribution of the dispatched target is tested statistically (moments,
// Kolmogorov-Smirnov against the normal CDF of Boost.Math, tail frequencies),
// with Boost.Random's normal_distribution as a yardstick.
#include <algorithm>
#include <cmath>
#include <complex>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <limits>
#include <span>
#include <string>
#include <utility>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/awgn_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/awgn_kernels-inl.h"
// clang-format on

// ---------------------------------------------------------------------------
// Per-target entry points (compiled for every target).
HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
void KernelUnderTest(float* x, std::size_t n, float sigma, bool add, PhiloxKey key,
                     const PhiloxCounter& counter) {
  NormalKernel(x, n, sigma, add, key, counter);
}

std::size_t BatchSamplesUnderTest() { return NoiseBatchSamples(); }

std::int64_t TargetUnderTest() { return NoiseKernelCompiledTarget(); }

// Box-Muller of the given words (count a multiple of Lanes(float) is not
// required: the tail is padded). Returns false on the one-lane SCALAR target,
// which has no vector Box-Muller (it calls the oracle).
bool BoxMullerOfWords(const std::uint32_t* w0, const std::uint32_t* w1, const std::uint32_t* w2,
                      std::size_t count, float* z0, float* z1) {
#if HWY_TARGET == HWY_SCALAR
  (void)w0, (void)w1, (void)w2, (void)count, (void)z0, (void)z1;
  return false;
#else
  namespace hn = hwy::HWY_NAMESPACE;
  const hn::ScalableTag<float> df;
  const hn::RebindToUnsigned<decltype(df)> du;
  const std::size_t lanes = hn::Lanes(df);
  HWY_ALIGN std::uint32_t a[hn::MaxLanes(du)], b[hn::MaxLanes(du)], c[hn::MaxLanes(du)];
  HWY_ALIGN float o0[hn::MaxLanes(df)], o1[hn::MaxLanes(df)];
  for (std::size_t i = 0; i < count; i += lanes) {
    for (std::size_t k = 0; k < lanes; ++k) {
      const std::size_t j = std::min(i + k, count - 1);
      a[k] = w0[j];
      b[k] = w1[j];
      c[k] = w2[j];
    }
    const auto r = hn::Sqrt(awgn_detail::RadiusSquared(df, hn::Load(du, a), hn::Load(du, b)));
    hn::Vec<decltype(df)> cos_t, sin_t;
    awgn_detail::CosSinTurn(df, hn::Load(du, c), cos_t, sin_t);
    hn::Store(hn::Mul(r, cos_t), df, o0);
    hn::Store(hn::Mul(r, sin_t), df, o1);
    for (std::size_t k = 0; k < lanes && i + k < count; ++k) {
      z0[i + k] = o0[k];
      z1[i + k] = o1[k];
    }
  }
  return true;
#endif
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include <boost/math/distributions/normal.hpp>
#include <boost/math/special_functions/erf.hpp>
#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/awgn_reference.h"
#include "hwy/aligned_allocator.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(KernelUnderTest);
HWY_EXPORT(BatchSamplesUnderTest);
HWY_EXPORT(TargetUnderTest);
HWY_EXPORT(BoxMullerOfWords);

// The library picks its target once, on first use. Make that happen at
// start-up, before any test below mocks the CPU's target list.
const char* const kLibraryTarget = NoiseKernelTarget();

constexpr float kEps = std::numeric_limits<float>::epsilon();
// Allowed deviation from the double reference, in float epsilons relative to
// the magnitude (largest seen on 4M samples: 2.85).
constexpr float kUlpTolerance = 6.0f;

RngStream StreamAt(std::uint32_t block_index) {
  RngStream s(DeriveKey(20240601u, "awgn_kernels_test"), /*point_index=*/4u,
              /*unit_index=*/77u, Substream::kNoise);
  s.Advance(block_index);
  return s;
}

float Poison() { return std::numeric_limits<float>::quiet_NaN(); }

// ---------------------------------------------------------------------------
// Every compiled target against the reference.
class AwgnKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(AwgnKernelPerTarget);

TEST_P(AwgnKernelPerTarget, DispatchReachesTheTargetUnderTest) {
  EXPECT_EQ(HWY_DYNAMIC_DISPATCH(TargetUnderTest)(), GetParam());
}

TEST_P(AwgnKernelPerTarget, MatchesReferenceOnAwkwardLengthsAndMisalignedStarts) {
  const std::size_t big_n = HWY_DYNAMIC_DISPATCH(BatchSamplesUnderTest)();
  ASSERT_GE(big_n, 4u);
  const std::vector<std::size_t> lengths = {
      1, 2, 3, 7, big_n - 1, big_n, big_n + 1, 2 * big_n - 1, 2 * big_n + 1, 3 * big_n + 5, 100001};
  constexpr std::size_t kGuard = 16;  // 64 bytes: offset 0 is 64-byte aligned
  auto buffer = hwy::AllocateAligned<float>(100001 + 3 + 2 * kGuard + 64);
  // Start at block 5 and just below 2^32 so that the block index wraps
  // inside a call (it must wrap exactly like RngStream's does).
  for (std::uint32_t start : {5u, 0xFFFFFFFFu - 9u}) {
    for (bool add : {false, true}) {
      for (std::size_t n : lengths) {
        for (std::size_t offset = 0; offset < 4; ++offset) {
          SCOPED_TRACE(testing::Message() << "n=" << n << " offset=" << offset << " start=" << start
                                          << " add=" << add);
          float* x = buffer.get() + kGuard + offset;
          std::fill(buffer.get(), x + n + kGuard, Poison());
          std::vector<float> want(n), before(n);
          const float sigma = 0.75f;
          for (std::size_t i = 0; i < n; ++i) {
            before[i] =
                add ? static_cast<float>(std::sin(0.37 * static_cast<double>(i))) : Poison();
            x[i] = want[i] = before[i];
          }
          RngStream ref = StreamAt(start);
          if (add) {
            reference::AddRealNoise(want, sigma, ref);
          } else {
            reference::FillStandardNormal(want, ref);
          }
          const RngStream s = StreamAt(start);
          HWY_DYNAMIC_DISPATCH(KernelUnderTest)(x, n, sigma, add, s.key(), s.counter());
          std::size_t bad = 0;
          for (std::size_t i = 0; i < n && bad < 5; ++i) {
            // Add mode: x + sigma z has both terms rounded, so the scale is
            // |x| + |sigma z|.
            const float scale =
                add ? std::fabs(before[i]) + std::fabs(want[i] - before[i]) : std::fabs(want[i]);
            if (!(std::fabs(x[i] - want[i]) <= kUlpTolerance * kEps * scale)) {
              ADD_FAILURE() << "sample " << i << ": got " << x[i] << " want " << want[i];
              ++bad;
            }
          }
          for (std::size_t g = 0; g < kGuard + offset; ++g) {
            EXPECT_TRUE(std::isnan(buffer[g])) << "wrote before the span";
          }
          for (std::size_t g = 0; g < kGuard; ++g) {
            EXPECT_TRUE(std::isnan(x[n + g])) << "wrote past the span";
          }
        }
      }
    }
  }
}

// Words at the edges of the transform's ranges: u1 -> 2^-64 (largest radius),
// u1 -> 1 (radius ~2^-32, where rounding u1 itself would lose everything),
// both sides of u1 = 1/2 (where the complement takes over), of u1 = sqrt(2)/4
// (an exponent step of the log reduction below 1/2) and of u1 = sqrt(2)/2
// (where 1 - u1 crosses 1 - sqrt(2)/2 and the reduction switches case), and w2
// on both sides of every octant boundary (the quadrant split).
TEST_P(AwgnKernelPerTarget, EdgeWordsMatchReference) {
  const std::pair<std::uint32_t, std::uint32_t> radius_words[] = {{0u, 0u},
                                                                  {0u, 1u},
                                                                  {0u, 0xFFFFFFFFu},
                                                                  {1u, 0u},
                                                                  {0x00FFFFFFu, 0xFFFFFFFFu},
                                                                  {0x5A827999u, 0u},
                                                                  {0x5A82799Au, 0u},
                                                                  {0x7FFFFFFFu, 0xFFFFFFFFu},
                                                                  {0x80000000u, 0u},
                                                                  {0xB504F333u, 0u},
                                                                  {0xB504F334u, 0u},
                                                                  {0xFFFFFFF0u, 0u},
                                                                  {0xFFFFFFFFu, 0u},
                                                                  {0xFFFFFFFFu, 0xFFFFFF00u},
                                                                  {0xFFFFFFFFu, 0xFFFFFFFEu},
                                                                  {0xFFFFFFFFu, 0xFFFFFFFFu}};
  std::vector<std::uint32_t> angle_words = {0u, 1u, 0xFFFFFFFFu, 0xFFFFFFFEu};
  for (std::uint32_t k = 1; k < 8; ++k) {  // octant boundaries k 2^29
    angle_words.push_back(k * (1u << 29) - 1u);
    angle_words.push_back(k * (1u << 29));
  }
  std::vector<std::uint32_t> w0, w1, w2;
  for (const auto& [hi, lo] : radius_words) {
    for (std::uint32_t a : angle_words) {
      w1.push_back(hi);
      w0.push_back(lo);
      w2.push_back(a);
    }
  }
  const std::size_t count = w0.size();
  std::vector<float> z0(count), z1(count);
  if (!HWY_DYNAMIC_DISPATCH(BoxMullerOfWords)(w0.data(), w1.data(), w2.data(), count, z0.data(),
                                              z1.data())) {
    GTEST_SKIP() << "one-lane target: its kernel is the reference itself";
  }
  for (std::size_t i = 0; i < count; ++i) {
    double r0 = 0.0, r1 = 0.0;
    reference::NormalPair({w0[i], w1[i], w2[i], 0u}, r0, r1);
    EXPECT_LE(std::fabs(z0[i] - r0), kUlpTolerance * kEps * std::fabs(r0))
        << std::hex << "w1=" << w1[i] << " w0=" << w0[i] << " w2=" << w2[i];
    EXPECT_LE(std::fabs(z1[i] - r1), kUlpTolerance * kEps * std::fabs(r1))
        << std::hex << "w1=" << w1[i] << " w0=" << w0[i] << " w2=" << w2[i];
  }
}

// ---------------------------------------------------------------------------
// The scalar oracle itself.

// -2 ln u1 at the ends of its range (arithmetic): u1 = 2^-65 gives 130 ln 2;
// u1 = 1 - 2^-65 gives 2^-64 (1 + 2^-66 + ...); u1 = 1/2 + 2^-65 (x = 2^63)
// gives 2 ln 2 - 2^-63 (to first order).
TEST(AwgnReference, RadiusAtRangeEndsIsExact) {
  EXPECT_NEAR(reference::MinusTwoLnU1({0u, 0u, 0u, 0u}), 130.0 * std::log(2.0), 1e-13);
  EXPECT_NEAR(reference::MinusTwoLnU1({0xFFFFFFFFu, 0xFFFFFFFFu, 0u, 0u}) / 0x1p-64, 1.0, 1e-15);
  EXPECT_NEAR(reference::MinusTwoLnU1({0u, 0x80000000u, 0u, 0u}), 2.0 * std::log(2.0) - 0x1p-63,
              1e-15);
}

// The quadrant split of the reference agrees with the textbook formula
// 2 pi u2 -> cos, sin in double, whose absolute error is ~1e-15.
TEST(AwgnReference, QuadrantSplitMatchesNaiveFormula) {
  RngStream s = StreamAt(0);
  for (int i = 0; i < 20000; ++i) {
    const PhiloxBlock b = s.NextBlock();
    double a0 = 0.0, a1 = 0.0, n0 = 0.0, n1 = 0.0;
    reference::NormalPair(b, a0, a1);
    reference::NaiveNormalPair(b, n0, n1);
    ASSERT_NEAR(a0, n0, 1e-13);
    ASSERT_NEAR(a1, n1, 1e-13);
  }
}

TEST(AwgnReference, OddLengthDropsTheLastSineAndAdvancesCeilHalf) {
  std::vector<float> seven(7), eight(8);
  RngStream a = StreamAt(3), b = StreamAt(3);
  reference::FillStandardNormal(seven, a);
  reference::FillStandardNormal(eight, b);
  EXPECT_EQ(a.block_index(), 3u + 4u);
  EXPECT_EQ(b.block_index(), 3u + 4u);
  for (std::size_t i = 0; i < 7; ++i) EXPECT_EQ(seven[i], eight[i]);
}

// ---------------------------------------------------------------------------
// Public entry points.

TEST(AwgnKernels, DispatchedTargetIsTheBestCompiledAndSupportedOne) {
#ifdef CAPGAP_FORCE_SCALAR
  EXPECT_STREQ(kLibraryTarget, "SCALAR");  // the library compiled no SIMD code
#else
  const std::vector<std::int64_t> targets = hwy::SupportedAndGeneratedTargets();
  ASSERT_FALSE(targets.empty());
  EXPECT_EQ(std::string(kLibraryTarget), hwy::TargetName(targets.front()));
#endif
  EXPECT_EQ(std::string(NoiseKernelTarget()), kLibraryTarget);
}

TEST(AwgnKernels, StreamAdvancesByCeilHalfForRealAndOnePerComplexSample) {
  for (std::size_t n : {0u, 1u, 2u, 7u, 64u, 65u, 1001u}) {
    std::vector<float> real(n);
    std::vector<cf32> cplx(n);
    RngStream a = StreamAt(10), b = StreamAt(10), c = StreamAt(10);
    FillStandardNormal(real, a);
    AddRealNoise(real, 0.5f, b);
    AddComplexNoise(cplx, 0.5f, c);
    EXPECT_EQ(a.block_index(), 10u + (n + 1) / 2) << n;
    EXPECT_EQ(b.block_index(), 10u + (n + 1) / 2) << n;
    EXPECT_EQ(c.block_index(), 10u + n) << n;
  }
}

TEST(AwgnKernels, ConsecutiveCallsContinueTheStream) {
  std::vector<float> whole(13), first(7), second(5);
  RngStream s_whole = StreamAt(0), s_parts = StreamAt(0);
  FillStandardNormal(whole, s_whole);
  FillStandardNormal(first, s_parts);   // blocks 0..3, the sine of block 3 dropped
  FillStandardNormal(second, s_parts);  // blocks 4..6
  for (std::size_t i = 0; i < 7; ++i) EXPECT_EQ(first[i], whole[i]);
  for (std::size_t i = 0; i < 5; ++i) EXPECT_EQ(second[i], whole[8 + i]);
}

TEST(AwgnKernels, PublicEntryPointsMatchReference) {
  for (std::size_t n : {1u, 5u, 63u, 64u, 65u, 4097u}) {
    std::vector<float> fill(n), fill_ref(n), add(n), add_ref(n);
    std::vector<cf32> cplx(n), cplx_ref(n);
    for (std::size_t i = 0; i < n; ++i) {
      add[i] = add_ref[i] = static_cast<float>(i % 3) - 1.0f;
      cplx[i] = cplx_ref[i] = cf32(static_cast<float>(i % 2), -1.0f);
    }
    RngStream s1 = StreamAt(1), r1 = StreamAt(1);
    FillStandardNormal(fill, s1);
    reference::FillStandardNormal(fill_ref, r1);
    RngStream s2 = StreamAt(2), r2 = StreamAt(2);
    AddRealNoise(add, 0.3f, s2);
    reference::AddRealNoise(add_ref, 0.3f, r2);
    RngStream s3 = StreamAt(3), r3 = StreamAt(3);
    AddComplexNoise(cplx, 0.3f, s3);
    reference::AddComplexNoise(cplx_ref, 0.3f, r3);
    for (std::size_t i = 0; i < n; ++i) {
      EXPECT_NEAR(fill[i], fill_ref[i], kUlpTolerance * kEps * std::fabs(fill_ref[i]));
      // |x| <= 1 and |sigma z| < 3 here: scale the tolerance by 4.
      EXPECT_NEAR(add[i], add_ref[i], kUlpTolerance * kEps * 4.0f);
      EXPECT_NEAR(cplx[i].real(), cplx_ref[i].real(), kUlpTolerance * kEps * 4.0f);
      EXPECT_NEAR(cplx[i].imag(), cplx_ref[i].imag(), kUlpTolerance * kEps * 4.0f);
    }
  }
}

// Complex sample k takes block k: (re, im) = sigma (z_2k, z_2k+1). The
// comparison allows the two roundings of sigma z (2 eps relative): a wrong
// block or a swapped component is off by O(1).
TEST(AwgnKernels, ComplexSampleKTakesBlockKWithCosineRealAndSineImaginary) {
  constexpr std::size_t kN = 333;
  const float sigma = 0.625f;
  std::vector<cf32> cplx(kN, cf32(0.0f, 0.0f));
  std::vector<float> z(2 * kN);
  RngStream a = StreamAt(0), b = StreamAt(0);
  AddComplexNoise(cplx, sigma, a);
  FillStandardNormal(z, b);
  for (std::size_t k = 0; k < kN; ++k) {
    EXPECT_NEAR(cplx[k].real(), sigma * z[2 * k], 2 * kEps * std::fabs(sigma * z[2 * k])) << k;
    EXPECT_NEAR(cplx[k].imag(), sigma * z[2 * k + 1], 2 * kEps * std::fabs(sigma * z[2 * k + 1]))
        << k;
  }
}

TEST(AwgnKernels, ForceScalarRoutesToTheReferenceBitExactly) {
  const bool before = ForceScalarKernels(true);
  EXPECT_STREQ(NoiseKernelTarget(), "SCALAR");
  std::vector<float> got(1001), want(1001);
  RngStream s = StreamAt(42), r = StreamAt(42);
  FillStandardNormal(got, s);
  reference::FillStandardNormal(want, r);
  EXPECT_EQ(std::memcmp(got.data(), want.data(), got.size() * sizeof(float)), 0);
  EXPECT_EQ(s.block_index(), r.block_index());
  EXPECT_TRUE(ForceScalarKernels(before));  // returns the previous setting
#ifndef CAPGAP_FORCE_SCALAR
  EXPECT_STREQ(NoiseKernelTarget(), before ? "SCALAR" : kLibraryTarget);
#endif
}

// ---------------------------------------------------------------------------
// Statistics of the dispatched target (fixed seed; each band is stated with
// the probability that a correct generator falls outside it).

std::vector<float> DispatchedNormals(std::size_t n, std::uint32_t unit) {
  std::vector<float> z(n);
  RngStream s(DeriveKey(7u, "statistics"), 0u, unit, Substream::kNoise);
  FillStandardNormal(z, s);
  return z;
}

std::vector<float> BoostNormals(std::size_t n, std::uint32_t seed) {
  boost::random::mt19937 gen(seed);
  boost::random::normal_distribution<float> normal(0.0f, 1.0f);
  std::vector<float> z(n);
  for (float& v : z) v = normal(gen);
  return z;
}

// Limiting distribution of sqrt(n) D_n (Kolmogorov, 1933; series from
// memory): P(K > x) = 2 sum_{k >= 1} (-1)^(k-1) exp(-2 k^2 x^2).
double KolmogorovSurvival(double x) {
  if (x < 0.18) return 1.0;
  double sum = 0.0;
  for (int k = 1; k <= 100; ++k) {
    const double term = std::exp(-2.0 * k * k * x * x);
    sum += (k % 2 == 1) ? term : -term;
    if (term < 1e-18) break;
  }
  return std::clamp(2.0 * sum, 0.0, 1.0);
}

// p-value of the one-sample KS statistic against the standard normal CDF,
// with Stephens' finite-n correction sqrt(n) + 0.12 + 0.11 / sqrt(n)
// (M. A. Stephens, JRSS B 32, 1970; from memory).
double KsPValueAgainstNormal(std::vector<float> z) {
  std::sort(z.begin(), z.end());
  const boost::math::normal_distribution<double> normal(0.0, 1.0);
  const double n = static_cast<double>(z.size());
  double d = 0.0;
  for (std::size_t i = 0; i < z.size(); ++i) {
    const double f = boost::math::cdf(normal, static_cast<double>(z[i]));
    d = std::max({d, (static_cast<double>(i) + 1.0) / n - f, f - static_cast<double>(i) / n});
  }
  const double en = std::sqrt(n);
  return KolmogorovSurvival(d * (en + 0.12 + 0.11 / en));
}

double KsTwoSamplePValue(std::vector<float> a, std::vector<float> b) {
  std::sort(a.begin(), a.end());
  std::sort(b.begin(), b.end());
  const double na = static_cast<double>(a.size()), nb = static_cast<double>(b.size());
  std::size_t i = 0, j = 0;
  double d = 0.0;
  while (i < a.size() && j < b.size()) {
    const float v = std::min(a[i], b[j]);
    while (i < a.size() && a[i] == v) ++i;
    while (j < b.size() && b[j] == v) ++j;
    d = std::max(d, std::fabs(static_cast<double>(i) / na - static_cast<double>(j) / nb));
  }
  const double en = std::sqrt(na * nb / (na + nb));
  return KolmogorovSurvival(d * (en + 0.12 + 0.11 / en));
}

// Critical values of the Kolmogorov distribution (common practice, from
// memory; checked with scipy.special.kolmogorov): 1.3581 at 5 %, 1.6276 at
// 1 %, 1.9495 at 0.1 %.
TEST(KolmogorovSurvival, MatchesKnownCriticalValues) {
  EXPECT_NEAR(KolmogorovSurvival(1.3581), 0.05, 2e-5);
  EXPECT_NEAR(KolmogorovSurvival(1.6276), 0.01, 2e-5);
  EXPECT_NEAR(KolmogorovSurvival(1.9495), 0.001, 2e-6);
}

// n = 2^22 samples. Mean ~ N(0, 1/n), variance estimate ~ N(1, 2/n), fourth
// moment ~ N(3, 96/n) (E z^8 - (E z^4)^2 = 105 - 9); each band is +-4.5 sd,
// two-sided probability 7e-6 per check for a correct generator.
TEST(AwgnKernelsStatistics, MeanVarianceAndFourthMomentMatchStandardNormal) {
  const std::size_t n = std::size_t{1} << 22;
  const std::vector<float> z = DispatchedNormals(n, 1u);
  double m1 = 0.0, m2 = 0.0, m4 = 0.0;
  for (float v : z) {
    const double x = v, x2 = x * x;
    m1 += x;
    m2 += x2;
    m4 += x2 * x2;
  }
  const double dn = static_cast<double>(n);
  m1 /= dn;
  m2 /= dn;
  m4 /= dn;
  EXPECT_NEAR(m1, 0.0, 4.5 / std::sqrt(dn));
  EXPECT_NEAR(m2, 1.0, 4.5 * std::sqrt(2.0 / dn));
  EXPECT_NEAR(m4, 3.0, 4.5 * std::sqrt(96.0 / dn));
}

// The two normals of a block, and neighbouring blocks, are uncorrelated:
// sample correlation ~ N(0, 1/m) for m = 2^21 pairs; band +-4.5 sd.
TEST(AwgnKernelsStatistics, PairAndNeighbourSamplesAreUncorrelated) {
  const std::size_t n = std::size_t{1} << 22;
  const std::vector<float> z = DispatchedNormals(n, 2u);
  double within = 0.0, across = 0.0;
  for (std::size_t j = 0; j + 2 < n; j += 2) {
    within += static_cast<double>(z[j]) * z[j + 1];
    across += static_cast<double>(z[j + 1]) * z[j + 2];
  }
  const double m = static_cast<double>(n / 2);
  EXPECT_NEAR(within / m, 0.0, 4.5 / std::sqrt(m));
  EXPECT_NEAR(across / m, 0.0, 4.5 / std::sqrt(m));
}

// One-sample KS against the normal CDF, n = 2^20 each; rejected at the
// 0.1 % level (confidence 99.9 %). Boost.Random's mt19937 +
// normal_distribution must pass the same test, and the two samples must not be
// told apart by the two-sample KS test at the same level.
TEST(AwgnKernelsStatistics, KolmogorovSmirnovAcceptsNormalLikeBoostRandom) {
  const std::size_t n = std::size_t{1} << 20;
  const std::vector<float> ours = DispatchedNormals(n, 3u);
  const std::vector<float> boost_z = BoostNormals(n, 5489u);
  const double p_ours = KsPValueAgainstNormal(ours);
  const double p_boost = KsPValueAgainstNormal(boost_z);
  const double p_two = KsTwoSamplePValue(ours, boost_z);
  EXPECT_GT(p_ours, 1e-3);
  EXPECT_GT(p_boost, 1e-3);
  EXPECT_GT(p_two, 1e-3);
  RecordProperty("ks_p_ours", std::to_string(p_ours));
  RecordProperty("ks_p_boost", std::to_string(p_boost));
  RecordProperty("ks_p_two_sample", std::to_string(p_two));
}

// The same KS test has the power to see a 1 % error in sigma at n = 2^20:
// D ~ 0.01 phi(1) = 0.0024, sqrt(n) D ~ 2.5, p ~ 1e-5.
TEST(AwgnKernelsStatistics, KolmogorovSmirnovRejectsOnePercentScaleError) {
  std::vector<float> z = DispatchedNormals(std::size_t{1} << 20, 3u);
  for (float& v : z) v *= 1.01f;
  EXPECT_LT(KsPValueAgainstNormal(z), 1e-3);
}

// Tails: P(|z| > 4) = 6.334248e-5 and P(|z| > 5) = 5.733031e-7 (erfc(x /
// sqrt 2); from memory, checked with scipy.special.erfc). n = 2^27 samples:
// expected 8501.7 (sd 92.2) and 76.9 (sd 8.77); bands +-4.5 sd (binomial,
// normal approximation; for the 5-sigma count a Poisson(76.9) falls outside
// [37.5, 116.4] with probability ~2e-5). No sample may be NaN or exceed
// sqrt(-2 ln 2^-65) = 9.4926, the largest radius the mapping can produce.
TEST(AwgnKernelsStatistics, TailFrequenciesBeyondFourAndFiveSigma) {
  const double p4 = boost::math::erfc(4.0 / std::sqrt(2.0));
  const double p5 = boost::math::erfc(5.0 / std::sqrt(2.0));
  ASSERT_NEAR(p4, 6.334248e-5, 1e-10);
  ASSERT_NEAR(p5, 5.733031e-7, 1e-12);
  const std::size_t chunk = std::size_t{1} << 20;
  const std::size_t chunks = 128;  // 2^27 samples
  std::vector<float> z(chunk);
  RngStream s(DeriveKey(11u, "tails"), 0u, 0u, Substream::kNoise);
  std::uint64_t beyond4 = 0, beyond5 = 0, out_of_range = 0;
  for (std::size_t c = 0; c < chunks; ++c) {
    FillStandardNormal(z, s);
    for (float v : z) {
      const float a = std::fabs(v);
      beyond4 += a > 4.0f ? 1u : 0u;
      beyond5 += a > 5.0f ? 1u : 0u;
      out_of_range += (a < 9.4926f) ? 0u : 1u;  // NaN counts here too
    }
  }
  const double n = static_cast<double>(chunk * chunks);
  EXPECT_NEAR(static_cast<double>(beyond4), n * p4, 4.5 * std::sqrt(n * p4 * (1 - p4)));
  EXPECT_NEAR(static_cast<double>(beyond5), n * p5, 4.5 * std::sqrt(n * p5 * (1 - p5)));
  EXPECT_EQ(out_of_range, 0u);
}

// Circular complex noise: E|n|^2 = 2 sigma^2, and |n|^2 is exponential, so
// its mean over m = 2^20 samples has sd 2 sigma^2 / sqrt(m); band +-4.5 sd.
TEST(AwgnKernelsStatistics, ComplexNoisePowerIsTwoSigmaSquared) {
  const std::size_t m = std::size_t{1} << 20;
  const float sigma = 0.3f;
  std::vector<cf32> n(m, cf32(0.0f, 0.0f));
  RngStream s(DeriveKey(13u, "complex"), 0u, 0u, Substream::kNoise);
  AddComplexNoise(n, sigma, s);
  double power = 0.0, cross = 0.0;
  for (const cf32& v : n) {
    power += std::norm(std::complex<double>(v));
    cross += static_cast<double>(v.real()) * v.imag();
  }
  const double dm = static_cast<double>(m);
  const double want = 2.0 * sigma * sigma;
  EXPECT_NEAR(power / dm, want, 4.5 * want / std::sqrt(dm));
  // E[re im] = 0 with sd sigma^2 / sqrt(m).
  EXPECT_NEAR(cross / dm, 0.0, 4.5 * sigma * sigma / std::sqrt(dm));
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
