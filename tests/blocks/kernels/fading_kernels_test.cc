// Fading kernels on every compiled target against the scalar oracle
// (fading_reference.h), bit for bit, on lengths 1, 3, 7, N-1, N, N+1 (N the
// target's float lanes) and a large odd size, with misaligned starts, and
// nothing written outside the outputs.
#include <cstddef>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/fading_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
#include "hwy/highway.h"
#include "blocks/kernels/fading_kernels-inl.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
void MultiplyUnderTest(const float* h, const float* x, float* out, std::size_t n) {
  FadingMultiplyGainKernel(h, x, out, n);
}
void EqualiseUnderTest(const float* h, float* r, float n0, float* n0_out, std::size_t n) {
  FadingEqualiseOneKernel(h, r, n0, n0_out, n);
}
void MrcUnderTest(const float* h, const float* r, std::size_t n, std::size_t branches, float n0,
                  float* z, float* n0_out) {
  FadingCombineMrcKernel(h, r, n, branches, n0, z, n0_out);
}
// Fused 16-QAM count and the composed path's noise step (AddComplexNoise's
// per-target operation on given normals); the Highway scalar target has
// neither (returns false / the all-ones sentinel).
bool AddNoiseUnderTest(float* x, const float* z, std::size_t n, float sigma) {
#if HWY_TARGET == HWY_SCALAR
  (void)x, (void)z, (void)n, (void)sigma;
  return false;
#else
  const hn::ScalableTag<float> df;
  const std::size_t lanes = hn::Lanes(df);
  const auto vs = hn::Set(df, sigma);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    hn::StoreU(awgn_detail::NoisySample(vs, hn::LoadU(df, z + i), hn::LoadU(df, x + i)), df, x + i);
  }
  HWY_ALIGN float xb[hn::MaxLanes(hn::ScalableTag<float>())] = {};
  HWY_ALIGN float zb[hn::MaxLanes(hn::ScalableTag<float>())] = {};
  for (std::size_t k = 0; i + k < n; ++k) xb[k] = x[i + k], zb[k] = z[i + k];
  hn::Store(awgn_detail::NoisySample(vs, hn::Load(df, zb), hn::Load(df, xb)), df, xb);
  for (std::size_t k = 0; i + k < n; ++k) x[i + k] = xb[k];
  return true;
#endif
}
std::uint64_t Qam16UnderTest(const Bit* bits, const float* g, const float* z, std::size_t n,
                             float a, float b, float sigma, float n0, const Qam16Decider& d) {
#if HWY_TARGET == HWY_SCALAR
  (void)bits, (void)g, (void)z, (void)n, (void)a, (void)b, (void)sigma, (void)n0, (void)d;
  return ~std::uint64_t{0};
#else
  return FadingQam16ErrorsKernel(bits, g, z, n, a, b, sigma, n0, d);
#endif
}
std::size_t LanesUnderTest() { return hwy::HWY_NAMESPACE::Lanes(hwy::HWY_NAMESPACE::ScalableTag<float>()); }
}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/kernels/fading_kernels.h"
#include "blocks/kernels/fading_reference.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(MultiplyUnderTest);
HWY_EXPORT(EqualiseUnderTest);
HWY_EXPORT(MrcUnderTest);
HWY_EXPORT(LanesUnderTest);
HWY_EXPORT(AddNoiseUnderTest);
HWY_EXPORT(Qam16UnderTest);

constexpr float kGuard = -12345.5f;

bool SameBits(const float* a, const float* b, std::size_t n, std::size_t* at) {
  for (std::size_t i = 0; i < n; ++i) {
    if (std::memcmp(a + i, b + i, sizeof(float)) != 0) {
      *at = i;
      return false;
    }
  }
  return true;
}

std::vector<float> Random(std::size_t count, std::mt19937& rng, bool tiny) {
  std::normal_distribution<float> z(0.0f, 1.0f);
  std::vector<float> v(count);
  for (std::size_t i = 0; i < count; ++i) v[i] = tiny && i % 5 == 0 ? 1e-20f * z(rng) : z(rng);
  return v;
}

class FadingKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(FadingKernelPerTarget);

TEST_P(FadingKernelPerTarget, MatchesOracleBitForBit) {
  std::mt19937 rng(20261205u);
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)();
  const std::size_t sizes[] = {1, 3, 7, lanes - 1 + (lanes == 1), lanes, lanes + 1, 1001};
  for (const std::size_t n : sizes) {
    for (const std::size_t off : {0u, 1u, 3u}) {
      for (const std::size_t branches : {1u, 2u, 3u}) {
        const std::string label = "n=" + std::to_string(n) + " off=" + std::to_string(off) +
                                  " L=" + std::to_string(branches);
        // Gains include tiny values (deep fades, the 1e-30 floor).
        const std::vector<float> h0 = Random(2 * n * branches, rng, true);
        const std::vector<float> x0 = Random(2 * n * branches, rng, false);
        std::vector<float> h(off + h0.size()), x(off + x0.size());
        std::copy(h0.begin(), h0.end(), h.begin() + static_cast<std::ptrdiff_t>(off));
        std::copy(x0.begin(), x0.end(), x.begin() + static_cast<std::ptrdiff_t>(off));
        std::size_t at = 0;
        // Multiply (not in place).
        std::vector<float> got(off + 2 * n + 1, kGuard), want(2 * n, kGuard);
        HWY_DYNAMIC_DISPATCH(MultiplyUnderTest)(h.data() + off, x.data() + off, got.data() + off, n);
        reference::MultiplyGain(h.data() + off, x.data() + off, want.data(), n);
        EXPECT_TRUE(SameBits(got.data() + off, want.data(), 2 * n, &at)) << label << " at " << at;
        EXPECT_EQ(got[off + 2 * n], kGuard) << label;
        // Equalise (in place).
        std::vector<float> r_got = x, r_want(x0.begin(), x0.begin() + static_cast<std::ptrdiff_t>(2 * n));
        std::vector<float> n0_got(off + n + 1, kGuard), n0_want(n, kGuard);
        HWY_DYNAMIC_DISPATCH(EqualiseUnderTest)(h.data() + off, r_got.data() + off, 0.3f,
                                                n0_got.data() + off, n);
        reference::EqualiseOne(h.data() + off, r_want.data(), 0.3f, n0_want.data(), n);
        EXPECT_TRUE(SameBits(r_got.data() + off, r_want.data(), 2 * n, &at)) << label << " at " << at;
        EXPECT_TRUE(SameBits(n0_got.data() + off, n0_want.data(), n, &at)) << label << " at " << at;
        EXPECT_EQ(n0_got[off + n], kGuard) << label;
        // MRC.
        std::vector<float> z_got(off + 2 * n + 1, kGuard), z_want(2 * n, kGuard);
        std::vector<float> m_got(off + n + 1, kGuard), m_want(n, kGuard);
        HWY_DYNAMIC_DISPATCH(MrcUnderTest)(h.data() + off, x.data() + off, n, branches, 0.7f,
                                           z_got.data() + off, m_got.data() + off);
        reference::CombineMrc(h.data() + off, x.data() + off, n, branches, 0.7f, z_want.data(),
                              m_want.data());
        EXPECT_TRUE(SameBits(z_got.data() + off, z_want.data(), 2 * n, &at)) << label << " at " << at;
        EXPECT_TRUE(SameBits(m_got.data() + off, m_want.data(), n, &at)) << label << " at " << at;
        EXPECT_EQ(z_got[off + 2 * n], kGuard) << label;
        EXPECT_EQ(m_got[off + n], kGuard) << label;
        for (std::size_t i = 0; i < off; ++i) EXPECT_EQ(z_got[i], kGuard) << label;
      }
    }
  }
}

// The fused uncoded 16-QAM count over one-branch fading (FadingQam16Errors)
// on every vector target against the composed path on the same target: the
// gain a + b g, the target's MultiplyGain, its noise operation on the same
// normals, its EqualiseOne, then the demapper's hard slicer or max-log LLRs
// at N0 = 1 scaled by 1 / (N0 / g), decided as L < 0. Exact counts, lengths
// 1, 3, 7, N-1, N, N+1 (N = lanes), 1001, Rayleigh (a = 0) and Rician.
TEST_P(FadingKernelPerTarget, FusedQam16CountEqualsComposedPath) {
  std::mt19937 rng(777u);
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)();
  const Mapper mapper = Mapper::Create(ParseModulation("16qam").value()).value();
  std::uniform_int_distribution<int> bit(0, 1);
  for (const DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
    const Demapper dm = Demapper::Create(mapper, method).value();
    const Qam16Decider d = MakeQam16Decider(mapper.pam_levels().data(),
                                            dm.kernel_args().level_scale, 1.0f,
                                            method == DemapMethod::kMaxLog);
    for (const std::size_t n : {std::size_t{1}, std::size_t{3}, std::size_t{7},
                                lanes - 1 + (lanes == 1), lanes, lanes + 1, std::size_t{1001}}) {
      for (const float a : {0.0f, 0.8f}) {
        for (const float sigma : {0.05f, 0.5f}) {
          const float b = 0.6f, n0 = 2.0f * sigma * sigma;
          std::vector<Bit> bits(4 * n), decided(4 * n);
          for (Bit& x : bits) x = static_cast<Bit>(bit(rng));
          const std::vector<float> g = Random(2 * n, rng, true), z = Random(2 * n, rng, false);
          const std::uint64_t got =
              HWY_DYNAMIC_DISPATCH(Qam16UnderTest)(bits.data(), g.data(), z.data(), n, a, b,
                                                   sigma, n0, d);
          if (got == ~std::uint64_t{0}) GTEST_SKIP() << "Highway scalar target: no fused path";
          std::vector<cf32> x(n);
          mapper.Map(bits, x);
          std::vector<float> h(2 * n), y(2 * n), n0s(n), llrs(4 * n);
          for (std::size_t i = 0; i < n; ++i) {
            h[2 * i] = a + b * g[2 * i];
            h[2 * i + 1] = b * g[2 * i + 1];
          }
          HWY_DYNAMIC_DISPATCH(MultiplyUnderTest)(h.data(), reinterpret_cast<const float*>(x.data()),
                                                  y.data(), n);
          ASSERT_TRUE(HWY_DYNAMIC_DISPATCH(AddNoiseUnderTest)(y.data(), z.data(), 2 * n, sigma));
          HWY_DYNAMIC_DISPATCH(EqualiseUnderTest)(h.data(), y.data(), n0, n0s.data(), n);
          const std::span<const cf32> ys(reinterpret_cast<const cf32*>(y.data()), n);
          if (method == DemapMethod::kHard) {
            dm.HardDecide(ys, decided);
          } else {
            dm.Demap(ys, 1.0f, llrs);
            for (std::size_t s = 0; s < n; ++s) {
              const float inv = 1.0f / n0s[s];
              for (std::size_t k = 0; k < 4; ++k) llrs[4 * s + k] *= inv;
            }
            LlrToBits(llrs, decided);
          }
          std::uint64_t want = 0;
          for (std::size_t i = 0; i < 4 * n; ++i) want += bits[i] != decided[i] ? 1u : 0u;
          EXPECT_EQ(got, want) << "n " << n << " a " << a << " sigma " << sigma << " method "
                               << static_cast<int>(method);
        }
      }
    }
  }
}

// The oracle itself: MRC of one branch is the one-branch equaliser, and the
// combiner recovers x exactly scaled when r = h x (no noise): z = x up to
// rounding (a few ulps relative).
TEST(FadingReference, CombinerRecoversTheSymbolWithoutNoise) {
  const float h[] = {0.6f, -0.8f, 1.5f, 0.25f};
  const float x[] = {0.3162f, -0.9487f};
  float r[4], z[2], n0[1], z1[2] = {0, 0}, n01[1];
  reference::MultiplyGain(h, x, r, 1);
  reference::MultiplyGain(h + 2, x, r + 2, 1);
  // branch-major with n = 1: h = {branch 0, branch 1}
  reference::CombineMrc(h, r, 1, 2, 1.0f, z, n0);
  EXPECT_NEAR(z[0], x[0], 1e-6f);
  EXPECT_NEAR(z[1], x[1], 1e-6f);
  // g = 0.36 + 0.64 + 2.25 + 0.0625 = 3.3125 (arithmetic).
  EXPECT_NEAR(n0[0], 1.0f / 3.3125f, 1e-7f);
  float rr[2] = {r[0], r[1]};
  reference::EqualiseOne(h, rr, 2.0f, n01, 1);
  z1[0] = rr[0];
  z1[1] = rr[1];
  EXPECT_NEAR(z1[0], x[0], 1e-6f);
  EXPECT_NEAR(n01[0], 2.0f, 1e-6f);  // |h|^2 = 1
}

TEST(FadingKernels, TargetIsNamed) { EXPECT_NE(std::string(FadingKernelTarget()), ""); }

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
