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
std::size_t LanesUnderTest() { return hwy::HWY_NAMESPACE::Lanes(hwy::HWY_NAMESPACE::ScalableTag<float>()); }
}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/kernels/fading_kernels.h"
#include "blocks/kernels/fading_reference.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(MultiplyUnderTest);
HWY_EXPORT(EqualiseUnderTest);
HWY_EXPORT(MrcUnderTest);
HWY_EXPORT(LanesUnderTest);

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
