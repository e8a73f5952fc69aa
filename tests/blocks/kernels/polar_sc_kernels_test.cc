// SC polar decoding with frames across lanes, on every compiled target,
// against the scalar decoder (PolarScDecoder with fast nodes, itself tested
// equal to plain SC in polar_codec_test.cc): u_hat and x_hat (all N
// positions) identical bit for bit, for batch sizes 1, 3, W - 1, W, W + 1 and 37 (W the target's
// float lanes), on codes of every node mix (K from 1 to N, GA and beta
// orders, punctured and shortened), with random LLRs holding +-0, whole
// numbers (exact ties for the SPC fallback) and shortened positions at 1e20.
#include <cmath>
#include <cstddef>
#include <random>
#include <string>
#include <vector>

#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/polar_sc_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
#include "hwy/highway.h"
#include "blocks/kernels/polar_sc_kernels-inl.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
void DecodeUnderTest(const PolarScTree& tree, const float* llr, std::size_t frames,
                     const int* positions, std::size_t count, bool from_x, Bit* out,
                     float* scratch) {
  PolarScDecodeKernel(tree, llr, frames, positions, count, from_x, out, scratch);
}
std::size_t LanesUnderTest() { return PolarScLanesKernel(); }
}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/fec/polar_construction.h"
#include "blocks/fec/polar_decoder.h"
#include "blocks/kernels/dispatch.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(DecodeUnderTest);
HWY_EXPORT(LanesUnderTest);

class PolarScKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(PolarScKernelPerTarget);

TEST_P(PolarScKernelPerTarget, DecisionsEqualTheScalarDecoder) {
  std::mt19937 rng(20261205u);
  std::normal_distribution<float> noise(0.0f, 2.0f);
  const std::size_t w = HWY_DYNAMIC_DISPATCH(LanesUnderTest)();
  int checked = 0;
  for (int e : {8, 100, 256, 1000}) {
    for (int k : {1, e / 8, e / 2, 7 * e / 8, e - 1, e}) {
      for (PolarConstruction c : {PolarConstruction::kGa, PolarConstruction::kBeta}) {
        const auto code_or = ConstructPolarCode({e, k, c, 2.0, PolarRateMatching::kAuto});
        ASSERT_TRUE(code_or.ok()) << code_or.status().message();
        const PolarCode& code = code_or.value();
        const PolarScDecoder scalar(code, true);
        auto sws = scalar.MakeWorkspace();
        const auto n = static_cast<std::size_t>(code.mother_length);
        std::vector<float> scratch(4 * n * w + 1);
        for (std::size_t frames : {std::size_t{1}, std::size_t{3}, w - 1 + (w == 1), w, w + 1,
                                   std::size_t{37}}) {
          std::vector<float> llr(frames * n);
          for (std::size_t f = 0; f < frames; ++f) {
            for (std::size_t j = 0; j < n; ++j) {
              float l = 1.0f + noise(rng);
              if (f % 2) l = std::round(l);
              const unsigned r = rng() % 16;
              if (r == 0) l = 0.0f;
              if (r == 1) l = -0.0f;
              if (code.rate_matching == PolarRateMatching::kPuncture &&
                  j < static_cast<std::size_t>(code.first_transmitted())) {
                l = 0.0f;
              }
              if (code.rate_matching == PolarRateMatching::kShorten &&
                  j >= static_cast<std::size_t>(e)) {
                l = 1e20f;
              }
              llr[f * n + j] = l;
            }
          }
          std::vector<Bit> x(frames * n, 7), u(frames * n, 7), xs(n), us(n);
          std::vector<int> all(n);
          for (std::size_t j = 0; j < n; ++j) all[j] = static_cast<int>(j);
          HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(scalar.tree(), llr.data(), frames, all.data(), n,
                                                true, x.data(), scratch.data());
          HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(scalar.tree(), llr.data(), frames, all.data(), n,
                                                false, u.data(), scratch.data());
          for (std::size_t f = 0; f < frames; ++f) {
            scalar.Decode(std::span<const float>(llr).subspan(f * n, n), us, xs, sws);
            const std::string label = "E " + std::to_string(e) + " K " + std::to_string(k) +
                                      " " + std::string(ToString(c)) + " frames " + std::to_string(frames) +
                                      " frame " + std::to_string(f);
            ASSERT_TRUE(std::equal(xs.begin(), xs.end(), x.begin() + static_cast<long>(f * n)))
                << label;
            ASSERT_TRUE(std::equal(us.begin(), us.end(), u.begin() + static_cast<long>(f * n)))
                << label;
            ++checked;
          }
        }
      }
    }
  }
  EXPECT_GT(checked, 4 * 6 * 2 * 40);
}

// The public entry: the dispatched target (or, forced scalar, inactive).
TEST(PolarScKernel, EntryPointMatchesScalarDecoderAndReportsItsTarget) {
  if (!PolarScKernelActive()) GTEST_SKIP() << "scalar kernels forced";
  const auto code = ConstructPolarCode({1024, 512, PolarConstruction::kGa, 2.0,
                                        PolarRateMatching::kAuto}).value();
  const PolarScDecoder scalar(code, true);
  auto sws = scalar.MakeWorkspace();
  std::mt19937 rng(3);
  std::normal_distribution<float> noise(1.0f, 1.5f);
  const std::size_t frames = 20, n = 1024;
  std::vector<float> llr(frames * n), scratch(PolarScScratch(code.m));
  for (auto& l : llr) l = noise(rng);
  // The information positions only, from u (non-systematic message).
  const std::size_t k = code.info_positions.size();
  std::vector<Bit> msg(frames * k, 7), xs(n), us(n);
  PolarScDecodeFrames(scalar.tree(), llr.data(), frames, code.info_positions.data(), k, false,
                      msg.data(), scratch.data());
  for (std::size_t f = 0; f < frames; ++f) {
    scalar.Decode(std::span<const float>(llr).subspan(f * n, n), us, xs, sws);
    for (std::size_t j = 0; j < k; ++j) {
      ASSERT_EQ(msg[f * k + j], us[static_cast<std::size_t>(code.info_positions[j])]) << f;
    }
  }
  EXPECT_STRNE(PolarScKernelTarget(), kernel_dispatch::ScalarTargetName());
  EXPECT_GE(PolarScKernelLanes(), 1u);
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
