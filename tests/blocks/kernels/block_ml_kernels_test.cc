// Every compiled Highway target of the exhaustive ML block decoder against
// the scalar oracle of block_ml_reference.h, exactly: the same codeword
// index for every frame. Awkward lengths n (1, 3, 7, ..., lane counts +-1,
// 256), every k from 1 to 16, several frames per call from misaligned
// starts, and ties (integer LLRs, all-zero LLRs, generators with repeated or
// zero rows, which repeat codewords so that equal metrics are certain). The
// decoder-level tests (tests/blocks/fec/block_ml_decoder_test.cc) only reach
// the target the running CPU dispatches to; this file reaches all of them
// that the CPU can execute.
#include <cstddef>
#include <cstdint>
#include <random>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/block_ml_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/block_ml_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
bool DecodeUnderTest(const BlockMlView& v, const float* llrs, std::size_t frames,
                     std::uint32_t* best, void* ws) {
  return BlockMlDecodeKernel(v, llrs, frames, best, ws);
}
std::size_t LanesUnderTest() { return BlockMlKernelLanes(); }
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/block_ml_reference.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(DecodeUnderTest);
HWY_EXPORT(LanesUnderTest);

constexpr std::size_t kW = kBlockMlWords;

// k random packed rows of n bits; `kind` 1 repeats row 0 in the last row,
// 2 makes the last row zero (both repeat codewords: exact metric ties).
std::vector<std::uint64_t> RandomRows(int n, int k, int kind, std::mt19937_64& rng) {
  std::vector<std::uint64_t> rows(static_cast<std::size_t>(k) * kW, 0);
  for (int t = 0; t < k; ++t) {
    for (int i = 0; i < n; ++i) {
      if (rng() & 1u) {
        rows[static_cast<std::size_t>(t) * kW + static_cast<std::size_t>(i >> 6)] |=
            std::uint64_t{1} << (i & 63);
      }
    }
  }
  const auto last = static_cast<std::size_t>(k - 1) * kW;
  for (std::size_t w = 0; w < kW; ++w) {
    if (kind == 1 && k > 1) rows[last + w] = rows[w];
    if (kind == 2) rows[last + w] = 0;
  }
  return rows;
}

// LLRs: kind 0 Gaussian, 1 small integers (ties), 2 all zero.
void FillLlrs(std::vector<float>& llr, int kind, std::mt19937_64& rng) {
  std::normal_distribution<float> g(0.0f, 3.0f);
  std::uniform_int_distribution<int> small(-2, 2);
  for (float& x : llr) {
    x = kind == 0 ? g(rng) : kind == 1 ? static_cast<float>(small(rng)) : 0.0f;
  }
}

class BlockMlKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(BlockMlKernelPerTarget);

TEST_P(BlockMlKernelPerTarget, DecisionsEqualReferenceForEveryKAndAwkwardN) {
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)();
  if (lanes == 0) GTEST_SKIP() << "no SIMD kernel on " << hwy::TargetName(GetParam());
  std::mt19937_64 rng(20260311u);
  const std::size_t L = lanes;
  const std::vector<int> lengths = {1,
                                    3,
                                    7,
                                    static_cast<int>(L) - 1,
                                    static_cast<int>(L),
                                    static_cast<int>(L) + 1,
                                    24,
                                    40,
                                    63,
                                    64,
                                    65,
                                    129,
                                    255,
                                    256};
  int checked = 0;
  for (int k = 1; k <= kBlockMlMaxInfoBits; ++k) {
    for (const int n : lengths) {
      if (n < k) continue;
      // Keep the oracle's work (frames n 2^k adds) moderate for large codes:
      // k >= 13 runs n = k, 17, 24, 40 and (k = 16) 256 only, and frames
      // shrink to one as n 2^k grows.
      if (k >= 13 && n != k && n != 17 && n != 24 && n != 40 && !(k == 16 && n == 256)) continue;
      const long work = static_cast<long>(n) << k;
      const std::size_t frames = work <= (1L << 17)
                                     ? std::size_t{9}
                                     : (work <= (1L << 20) ? std::size_t{3} : std::size_t{1});
      const int row_kind = (k + n) % 3;
      const std::vector<std::uint64_t> rows = RandomRows(n, k, row_kind, rng);
      const BlockMlTables tables = BlockMlTables::Build(n, k, rows.data(), lanes);
      const BlockMlView v = tables.view();
      const auto un = static_cast<std::size_t>(n);
      for (int llr_kind = 0; llr_kind < 3; ++llr_kind) {
        if (llr_kind == 2 && k > 10) continue;
        const std::size_t offset = static_cast<std::size_t>(llr_kind + k) % 4;  // misaligned
        std::vector<float> buf(frames * un + offset);
        FillLlrs(buf, llr_kind, rng);
        const float* llrs = buf.data() + offset;
        std::vector<std::uint32_t> got(frames, 0xDEADBEEFu), want(frames, 0xFEEDFACEu);
        std::vector<std::uint8_t> ws(BlockMlWorkspaceBytes(n, lanes) + 3);
        ASSERT_TRUE(
            HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(v, llrs, frames, got.data(), ws.data() + 3));
        reference::BlockMlDecode(v, llrs, frames, want.data());
        ASSERT_EQ(got, want) << "target " << hwy::TargetName(GetParam()) << " n=" << n << " k=" << k
                             << " rows " << row_kind << " llrs " << llr_kind;
        for (const std::uint32_t j : got) ASSERT_LT(j, std::uint32_t{1} << k);
        ++checked;
      }
    }
  }
  EXPECT_GT(checked, 300);
}

TEST_P(BlockMlKernelPerTarget, TiesGoToTheLowestIndex) {
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)();
  if (lanes == 0) GTEST_SKIP() << "no SIMD kernel on " << hwy::TargetName(GetParam());
  // Rows e_0, e_1, e_0 + e_1 of length 3 (plus a zero row for k = 4): no
  // codeword has bit 2, so with L = (0, 0, 5) all tie at 5; the lowest is
  // j = 0. With
  // L = (-1, 0, 0) the codewords with bit 0 set tie at 1: j = 1 (u_0 = 1)
  // is the lowest.
  for (int k : {3, 4}) {
    std::vector<std::uint64_t> rows(static_cast<std::size_t>(k) * kW, 0);
    rows[0] = 1u;       // 100
    rows[kW] = 2u;      // 010
    rows[2 * kW] = 3u;  // 110
    const BlockMlTables tables = BlockMlTables::Build(3, k, rows.data(), lanes);
    const std::vector<float> llrs = {0.0f, 0.0f, 5.0f, -1.0f, 0.0f, 0.0f};
    std::vector<std::uint32_t> got(2), want(2);
    std::vector<std::uint8_t> ws(BlockMlWorkspaceBytes(3, lanes));
    ASSERT_TRUE(HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(tables.view(), llrs.data(), 2, got.data(),
                                                      ws.data()));
    reference::BlockMlDecode(tables.view(), llrs.data(), 2, want.data());
    EXPECT_EQ(want, (std::vector<std::uint32_t>{0u, 1u}));
    EXPECT_EQ(got, want);
  }
}

TEST(BlockMlDispatch, ForcedScalarAndDispatchedGiveTheSameDecisions) {
  std::mt19937_64 rng(99u);
  const int n = 24, k = 12;
  const std::vector<std::uint64_t> rows = RandomRows(n, k, 0, rng);
  const BlockMlTables tables = BlockMlTables::Build(n, k, rows.data(), BlockMlMaxLanes());
  const std::size_t frames = 50;
  std::vector<float> llrs(frames * n);
  FillLlrs(llrs, 0, rng);
  std::vector<std::uint8_t> ws(BlockMlWorkspaceBytes(n, BlockMlMaxLanes()));
  std::vector<std::uint32_t> simd(frames), scalar(frames);
  BlockMlDecode(tables.view(), llrs.data(), frames, simd.data(), ws.data());
  const bool was = ForceScalarKernels(true);
  EXPECT_STREQ(BlockMlKernelTarget(tables.view().lanes), "SCALAR");
  BlockMlDecode(tables.view(), llrs.data(), frames, scalar.data(), ws.data());
  ForceScalarKernels(was);
  EXPECT_EQ(simd, scalar);
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
