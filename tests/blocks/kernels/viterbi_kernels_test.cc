// Every compiled Highway target of the Viterbi add-compare-select kernel and
// LLR quantiser against the scalar oracle of viterbi_reference.h, bit for
// bit: path metrics after the call and every decision bit, for K = 5..9 (the
// SIMD range), n = 2..4 outputs, step counts around the renormalisation
// period and a long odd run, with random metrics, LLRs and sign tables. The
// decoder-level tests (tests/blocks/fec/viterbi_decoder_test.cc) only reach
// the target the running CPU dispatches to; this file reaches all of them
// that the CPU can execute.
#include <cstddef>
#include <cstdint>
#include <random>
#include <vector>

#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/viterbi_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
#include "hwy/highway.h"
#include "blocks/kernels/viterbi_kernels-inl.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
bool AcsUnderTest(const ViterbiAcsArgs& args, std::int16_t* metrics, const std::int16_t* q,
                  std::size_t steps, std::uint8_t* decisions) {
  return ViterbiAcsKernel(args, metrics, q, steps, decisions);
}
void QuantiseUnderTest(const float* x, std::size_t n, float scale, std::int16_t* q) {
  ViterbiQuantiseKernel(x, n, scale, q);
}
std::size_t LanesUnderTest(int k) { return ViterbiKernelLanes(k); }
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/kernels/viterbi_reference.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(AcsUnderTest);
HWY_EXPORT(QuantiseUnderTest);
HWY_EXPORT(LanesUnderTest);

class ViterbiKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(ViterbiKernelPerTarget);

TEST_P(ViterbiKernelPerTarget, AcsMatchesReferenceBitForBit) {
  std::mt19937 rng(20261202u);
  int covered = 0;
  for (int k = 5; k <= 9; ++k) {
    if (HWY_DYNAMIC_DISPATCH(LanesUnderTest)(k) == 0) continue;  // target leaves K to the oracle
    const std::size_t states = std::size_t{1} << (k - 1), h = states / 2;
    const std::size_t row_bytes = states / 8 > 0 ? states / 8 : 1;
    for (int n = 2; n <= 4; ++n) {
      std::vector<std::int16_t> signs(4 * static_cast<std::size_t>(n) * h);
      for (auto& s : signs) s = (rng() & 1u) ? 1 : -1;
      const ViterbiAcsArgs args{k, n, signs.data()};
      for (std::size_t steps : {1u, 3u, 4u, 5u, 7u, 8u, 9u, 1001u}) {
        std::vector<std::int16_t> q(steps * static_cast<std::size_t>(n));
        std::uniform_int_distribution<int> llr(-kViterbiMaxQ, kViterbiMaxQ);
        for (auto& v : q) v = static_cast<std::int16_t>(llr(rng));
        // Start metrics as a decoder sees them: a terminated start (state 0
        // at 0, the others at the start penalty) or a spread of values.
        std::vector<std::int16_t> m_simd(states), m_ref(states);
        const bool terminated = steps % 2 == 1;
        std::uniform_int_distribution<int> spread(-4000, 4000);
        for (std::size_t s = 0; s < states; ++s) {
          m_ref[s] = terminated ? (s == 0 ? 0 : kViterbiStartPenalty)
                                : static_cast<std::int16_t>(spread(rng));
          m_simd[s] = m_ref[s];
        }
        std::vector<std::uint8_t> d_simd(steps * row_bytes, 0xA5), d_ref(steps * row_bytes, 0x5A);
        ASSERT_TRUE(HWY_DYNAMIC_DISPATCH(AcsUnderTest)(args, m_simd.data(), q.data(), steps,
                                                       d_simd.data()));
        reference::ViterbiAcsInt16(args, m_ref.data(), q.data(), steps, d_ref.data());
        ASSERT_EQ(m_simd, m_ref) << "K=" << k << " n=" << n << " steps=" << steps;
        ASSERT_EQ(d_simd, d_ref) << "K=" << k << " n=" << n << " steps=" << steps;
        ++covered;
      }
    }
  }
  // A SIMD target must take at least K = 9 (256 states fill any vector).
  if (GetParam() != HWY_SCALAR) {
    EXPECT_GT(covered, 0) << hwy::TargetName(GetParam());
  }
}

TEST_P(ViterbiKernelPerTarget, QuantiserMatchesReferenceOnAwkwardLengths) {
  std::mt19937 rng(7u);
  std::normal_distribution<float> g(0.0f, 40.0f);
  for (std::size_t n : {1u, 3u, 7u, 15u, 16u, 17u, 31u, 33u, 1001u}) {
    std::vector<float> x(n + 1);
    for (auto& v : x) v = g(rng);
    // Halves and clamps exercise the rounding rule and the limits.
    x[0] = 2.5f;
    if (n > 2) x[2] = -1e6f;
    for (std::size_t offset : {0u, 1u}) {  // misaligned start
      const std::size_t len = n + 1 - offset;
      std::vector<std::int16_t> q(len, 0x7777), r(len, 0x1111);
      HWY_DYNAMIC_DISPATCH(QuantiseUnderTest)(x.data() + offset, len, 1.0f, q.data());
      reference::ViterbiQuantise(x.data() + offset, len, 1.0f, r.data());
      ASSERT_EQ(q, r) << "n=" << len << " offset=" << offset;
    }
  }
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
