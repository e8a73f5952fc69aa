// Every compiled Highway target of the fixed-point min-sum LDPC kernel
// (blocks/kernels/ldpc_kernels.h) against the one-frame scalar oracle of
// ldpc_reference.h, bit for bit: decisions, iteration counts and convergence
// flags of every frame, for int8 and int16 lanes, both schedules, both
// min-sum rules, with and without early stop, frame counts 1, B-1, B, B+1 and
// 3B+5 (B = the target's lanes), on a regular (3,6) code and an irregular
// code of odd length with variable degrees 2 to 8 and rows of degree 1 to 9.
// Frames are the all-zero codeword through BPSK/AWGN at mixed Eb/N0 (some
// converge at once, some late, some never) plus pure-noise words and words of
// extreme and tie values. Also per target: the LLR quantiser and the byte
// transpose against scalar code on awkward sizes. The decoder-level tests
// (tests/blocks/fec/ldpc_decoder_test.cc) only reach the target the CPU
// dispatches to; this file reaches all it can execute.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/ldpc_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/ldpc_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
bool DecodeUnderTest(const LdpcFixedArgs& args, const float* llrs, std::size_t frames, Bit* decided,
                     LdpcFrameResult* results, void* ws) {
  return LdpcDecodeFixedKernel(args, llrs, frames, decided, results, ws);
}
std::size_t LanesUnderTest(LdpcLane lane) { return LdpcFixedKernelLanes(lane); }
std::int64_t TargetUnderTest() { return HWY_TARGET; }
// False on HWY_SCALAR (no vector helpers there).
// int16 results in q16 when q16 != nullptr, else int8 in q8.
bool QuantiseUnderTest(const float* x, std::size_t n, float scale, int clip, std::int8_t* q8,
                       std::int16_t* q16) {
#if HWY_TARGET == HWY_SCALAR
  (void)x, (void)n, (void)scale, (void)clip, (void)q8, (void)q16;
  return false;
#else
  if (q16 != nullptr) {
    ldpc_detail::Quantise(x, n, scale, clip, q16);
  } else {
    ldpc_detail::Quantise(x, n, scale, clip, q8);
  }
  return true;
#endif
}
template <typename T>
bool TransposeT(const T* in, std::size_t in_stride, std::size_t rows, std::size_t cols, T* out,
                std::size_t out_stride) {
#if HWY_TARGET == HWY_SCALAR
  (void)in, (void)in_stride, (void)rows, (void)cols, (void)out, (void)out_stride;
  return false;
#else
  ldpc_detail::TransposeTiles(in, in_stride, rows, cols, out, out_stride);
  return true;
#endif
}
bool Transpose8UnderTest(const std::int8_t* in, std::size_t in_stride, std::size_t rows,
                         std::size_t cols, std::int8_t* out, std::size_t out_stride) {
  return TransposeT(in, in_stride, rows, cols, out, out_stride);
}
bool Transpose16UnderTest(const std::int16_t* in, std::size_t in_stride, std::size_t rows,
                          std::size_t cols, std::int16_t* out, std::size_t out_stride) {
  return TransposeT(in, in_stride, rows, cols, out, out_stride);
}
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/fec/ldpc_code.h"
#include "blocks/fec/ldpc_decoder.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/ldpc_reference.h"
#include "tests/blocks/fec/ldpc_test_codes.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(DecodeUnderTest);
HWY_EXPORT(LanesUnderTest);
HWY_EXPORT(TargetUnderTest);
HWY_EXPORT(QuantiseUnderTest);
HWY_EXPORT(Transpose8UnderTest);
HWY_EXPORT(Transpose16UnderTest);

// The library picks its target once, on first use: make that happen before
// any test below mocks the CPU's target list.
const char* const kLibraryTarget = LdpcKernelTarget();

using testing_codes::RegularRows;


// Irregular rows of odd length n: variable degrees cycle through 2, 3, 4, 8
// checks drawn at random; plus a degree-1 check on variable 0 and a check
// holding 9 variables.
std::vector<std::vector<int>> IrregularRows(int n, int m, std::uint32_t seed) {
  std::mt19937 rng(seed);
  std::vector<std::vector<int>> rows(static_cast<std::size_t>(m));
  const int degrees[4] = {2, 3, 4, 8};
  for (int v = 0; v < n; ++v) {
    const int dv = degrees[v % 4];
    std::vector<int> chosen;
    while (static_cast<int>(chosen.size()) < dv) {
      const int c = static_cast<int>(rng() % static_cast<std::uint32_t>(m - 2));
      if (std::find(chosen.begin(), chosen.end(), c) == chosen.end()) chosen.push_back(c);
    }
    for (int c : chosen) rows[static_cast<std::size_t>(c)].push_back(v);
  }
  rows[static_cast<std::size_t>(m - 2)] = {0};
  rows[static_cast<std::size_t>(m - 1)] = {1, 5, 9, 13, 17, 21, 25, 29, 33};
  return rows;
}


float Normal(std::mt19937_64& rng) {
  // Box-Muller from two uniforms in (0, 1).
  const double u1 = (static_cast<double>(rng() >> 11) + 0.5) * 0x1p-53;
  const double u2 = (static_cast<double>(rng() >> 11) + 0.5) * 0x1p-53;
  return static_cast<float>(std::sqrt(-2.0 * std::log(u1)) * std::cos(6.283185307179586 * u2));
}

// `count` frames of n LLRs: all-zero codeword over BPSK/AWGN (rate 1/2
// bookkeeping, LLR = 4 y / N0) at Eb/N0 cycling through 0, 1, 2, 3, 5 dB;
// every 7th frame pure noise (random signs), every 11th frame extreme and tie
// values (+-1e30, +-0, +-1/8 and +-3/8, which sit on the quantiser's
// rounding boundaries at 4 steps per LLR unit, and +-1/32 for 16 steps).
std::vector<float> MakeFrames(int n, std::size_t count, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::vector<float> llr(count * static_cast<std::size_t>(n));
  const double ebno_db[5] = {0.0, 1.0, 2.0, 3.0, 5.0};
  for (std::size_t f = 0; f < count; ++f) {
    float* x = llr.data() + f * static_cast<std::size_t>(n);
    const double n0 = 1.0 / (0.5 * std::pow(10.0, ebno_db[f % 5] / 10.0));
    const float sigma = static_cast<float>(std::sqrt(n0 / 2.0));
    for (int i = 0; i < n; ++i) {
      float y = 1.0f + sigma * Normal(rng);
      if (f % 7 == 3) y = Normal(rng);
      x[i] = static_cast<float>(4.0 * y / n0);
      if (f % 11 == 5) {
        const float special[10] = {1e30f,   -1e30f, 0.0f,    -0.0f,    0.125f,
                                   -0.125f, 0.375f, -0.375f, 0.03125f, -0.03125f};
        if (rng() % 3 == 0) x[i] = special[rng() % 10];
      }
    }
  }
  return llr;
}

struct Outcome {
  std::vector<Bit> decided;
  std::vector<int> iterations;
  std::vector<std::uint8_t> converged;
};

// Decodes `count` frames with one kernel call on the target under test
// (outputs poisoned first; workspace misaligned by one byte, which the kernel
// must absorb; a workspace passed in is reused as it was left by earlier
// calls). False if the target has no kernel.
bool KernelOutcome(const LdpcFixedArgs& a, const std::vector<float>& llr, std::size_t count,
                   std::size_t lanes, Outcome& o, std::vector<std::uint8_t>* reuse = nullptr) {
  const auto n = static_cast<std::size_t>(a.graph.n);
  std::vector<std::uint8_t> own;
  std::vector<std::uint8_t>& ws = reuse != nullptr ? *reuse : own;
  ws.resize(LdpcFixedWorkspaceBytes(a, lanes) + 1);
  std::vector<LdpcFrameResult> results(count, LdpcFrameResult{-1, true});
  o.decided.assign(count * n, 7);
  if (!HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(a, llr.data(), count, o.decided.data(), results.data(),
                                             ws.data() + 1)) {
    return false;
  }
  o.iterations.resize(count);
  o.converged.resize(count);
  for (std::size_t f = 0; f < count; ++f) {
    o.iterations[f] = results[f].iterations;
    o.converged[f] = results[f].converged ? 1 : 0;
  }
  return true;
}

Outcome ReferenceOutcome(const LdpcFixedArgs& a, const std::vector<float>& llr, std::size_t count) {
  const auto n = static_cast<std::size_t>(a.graph.n);
  Outcome o;
  o.decided.assign(count * n, 7);
  o.iterations.assign(count, -1);
  o.converged.assign(count, 7);
  std::vector<std::int16_t> ws(reference::LdpcFixedFrameWorkspaceBytes(a) / 2 + 1);
  for (std::size_t f = 0; f < count; ++f) {
    bool conv = false;
    reference::LdpcDecodeFixedFrame(a, llr.data() + f * n, o.decided.data() + f * n,
                                    &o.iterations[f], &conv, ws.data());
    o.converged[f] = conv ? 1 : 0;
  }
  return o;
}

struct Codes {
  LdpcCode regular;
  LdpcCode irregular;
};

const Codes& TestCodes() {
  static const Codes codes = [] {
    Codes c{LdpcCode::FromRows(504, RegularRows(504, 3, 6, 11u)).value(),
            LdpcCode::FromRows(203, IrregularRows(203, 110, 12u)).value()};
    return c;
  }();
  return codes;
}

class LdpcKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(LdpcKernelPerTarget);

TEST_P(LdpcKernelPerTarget, DispatchReachesTheTargetUnderTest) {
  EXPECT_EQ(HWY_DYNAMIC_DISPATCH(TargetUnderTest)(), GetParam());
}

// The kernel's arguments as the decoder sets them (ldpc_decoder.h): int8 at
// 4 steps per LLR, channel clip 31; int16 at 16 steps, channel clip 1023;
// the largest message clip the range rule allows.
// Variants 0..7: bit 0 layered, bit 1 offset, bit 2 early stop, alpha 0.75;
// 8..11: normalised, early stop, flooding/layered by bit 0, with alpha =
// 0.8 (205/256, the widening multiply), 0.5 (shift, k = 1), 1 and 0.875
// (shift, k = 3): every way ScaleMagnitude evaluates M.
LdpcFixedArgs ArgsFor(const LdpcCode& code, LdpcLane lane, int variant) {
  LdpcFixedArgs a;
  a.graph = LdpcGraphOf(code);
  a.lane = lane;
  a.layered = (variant & 1) != 0;
  a.offset = (variant & 2) != 0;
  a.early_stop = (variant & 4) != 0;
  a.max_iterations = a.early_stop ? 25 : 12;
  const bool int8 = lane == LdpcLane::kInt8;
  a.llr_scale = int8 ? 4.0f : 16.0f;
  a.channel_clip = int8 ? 31 : 1023;
  a.message_clip = LdpcMessageClipFor(lane, a.graph.max_col_degree, a.channel_clip);
  a.norm_mul = 192;           // 0.75
  a.offset_q = int8 ? 2 : 8;  // 0.5 LLR
  if (variant >= 8) {
    const int muls[4] = {205, 128, 256, 224};
    a.norm_mul = muls[variant - 8];
    a.offset = false;
    a.early_stop = true;
    a.max_iterations = 25;
  }
  return a;
}

TEST_P(LdpcKernelPerTarget, DecodeMatchesReferenceBitForBit) {
  int frames_converged_late = 0, frames_failed = 0;
  for (LdpcLane lane : {LdpcLane::kInt8, LdpcLane::kInt16}) {
    const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)(lane);
    if (lanes == 0) GTEST_SKIP() << "target leaves the kernel to the oracle";
    ASSERT_GE(lanes, 2u);
    const std::size_t pool = 3 * lanes + 5;  // the big odd count
    for (const LdpcCode* code : {&TestCodes().regular, &TestCodes().irregular}) {
      const auto n = static_cast<std::size_t>(code->length());
      const std::vector<float> llr = MakeFrames(code->length(), pool, 99u + n);
      for (int variant = 0; variant < 12; ++variant) {
        const LdpcFixedArgs a = ArgsFor(*code, lane, variant);
        ASSERT_GE(a.message_clip, 8);
        const Outcome want = ReferenceOutcome(a, llr, pool);
        for (std::size_t f = 0; f < pool; ++f) {
          if (want.iterations[f] >= 3 && want.converged[f]) ++frames_converged_late;
          if (!want.converged[f]) ++frames_failed;
        }
        std::vector<std::uint8_t> ws;  // shared by the calls below
        for (std::size_t count : {std::size_t{1}, lanes - 1, lanes, lanes + 1, pool}) {
          SCOPED_TRACE(testing::Message() << "lane=" << (lane == LdpcLane::kInt8 ? 8 : 16) << " n="
                                          << n << " variant=" << variant << " frames=" << count);
          Outcome got;
          ASSERT_TRUE(KernelOutcome(a, llr, count, lanes, got, &ws));
          for (std::size_t f = 0; f < count; ++f) {
            ASSERT_EQ(got.iterations[f], want.iterations[f]) << "frame " << f;
            ASSERT_EQ(got.converged[f], want.converged[f]) << "frame " << f;
            for (std::size_t v = 0; v < n; ++v) {
              ASSERT_EQ(got.decided[f * n + v], want.decided[f * n + v])
                  << "frame " << f << " bit " << v;
            }
          }
        }
      }
    }
  }
  // The comparison must have seen frames stop late and frames fail.
  EXPECT_GT(frames_converged_late, 40);
  EXPECT_GT(frames_failed, 40);
}

// Frames that converge and would leave their codeword if decoded on: found by
// a seeded random search over tiny codes (10 variables, 6 checks of degree
// 4, with 4-cycles) and LLRs on the quarter grid, one per lane type and
// schedule (normalised min-sum, the arguments of ArgsFor). On ordinary codes
// such frames are rare (none in 5000 converged frames of a (3,6) code of
// length 504), so without these probes a kernel that hands out a stopped
// frame's decisions late (or keeps decoding it) passes every other test (an
// earlier batch design of the kernel without its freeze did).
struct Probe {
  LdpcLane lane;
  bool layered;
  std::vector<std::vector<int>> rows;
  std::vector<float> llr;
};
std::vector<Probe> Probes() {
  return {
      {LdpcLane::kInt8,
       false,
       {{1, 2, 7, 9}, {0, 1, 4, 5}, {1, 3, 6, 8}, {3, 4, 6, 7}, {0, 1, 5, 7}, {0, 1, 2, 6}},
       {0.25f, -0.25f, 4.75f, -1.5f, -3.0f, 0.0f, 1.25f, -3.0f, 4.25f, -2.5f}},
      {LdpcLane::kInt8,
       true,
       {{1, 2, 4, 8}, {1, 4, 5, 7}, {1, 3, 4, 7}, {1, 2, 4, 8}, {0, 5, 7, 9}, {1, 2, 6, 8}},
       {3.75f, 3.0f, -0.25f, 0.5f, 2.0f, -1.5f, -1.25f, -0.25f, -0.75f, 0.25f}},
      {LdpcLane::kInt16,
       false,
       {{0, 4, 7, 8}, {0, 4, 7, 8}, {1, 2, 8, 9}, {1, 3, 4, 6}, {0, 4, 6, 7}, {0, 5, 7, 8}},
       {1.75f, -2.25f, 1.25f, 3.75f, -2.0f, 0.0f, -2.75f, -1.25f, -2.75f, 1.75f}},
      {LdpcLane::kInt16,
       true,
       {{2, 3, 6, 9}, {1, 3, 7, 9}, {1, 5, 6, 8}, {1, 4, 8, 9}, {0, 4, 5, 6}, {2, 3, 8, 9}},
       {1.25f, -3.0f, -2.25f, 3.0f, 4.0f, 0.25f, -0.5f, 3.5f, 4.5f, 1.0f}},
  };
}

// A stream of 3B + 5 frames: probes at frames 0, B - 1 and B + 2, every
// other frame one that does not converge, so the lanes keep iterating after
// each probe has stopped: each probe must come out with the decisions and
// count of its stopping iteration.
TEST_P(LdpcKernelPerTarget, StoppedFrameKeepsItsDecisionsWhileOthersGoOn) {
  for (const Probe& probe : Probes()) {
    const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)(probe.lane);
    if (lanes == 0) GTEST_SKIP() << "target leaves the kernel to the oracle";
    const LdpcCode code = LdpcCode::FromRows(10, probe.rows).value();
    const LdpcFixedArgs a = ArgsFor(code, probe.lane, (probe.layered ? 1 : 0) | 4);
    SCOPED_TRACE(testing::Message() << "lane=" << (probe.lane == LdpcLane::kInt8 ? 8 : 16)
                                    << " layered=" << probe.layered);
    // The probe is one: it stops early, and decoding on changes its decisions.
    const Outcome stopped = ReferenceOutcome(a, probe.llr, 1);
    ASSERT_TRUE(stopped.converged[0]);
    ASSERT_LT(stopped.iterations[0], a.max_iterations);
    LdpcFixedArgs on = a;
    on.early_stop = false;
    ASSERT_NE(ReferenceOutcome(on, probe.llr, 1).decided, stopped.decided);
    // A companion that never converges, by seeded search.
    std::mt19937_64 rng(17u);
    std::vector<float> companion(10);
    bool found = false;
    for (int tries = 0; tries < 10000 && !found; ++tries) {
      for (float& x : companion) x = static_cast<float>(static_cast<int>(rng() % 33u) - 16) / 4.0f;
      found = !ReferenceOutcome(a, companion, 1).converged[0];
    }
    ASSERT_TRUE(found);
    const std::size_t count = 3 * lanes + 5;
    const std::size_t probes[3] = {0, lanes - 1, lanes + 2};
    std::vector<float> llr(count * 10);
    for (std::size_t f = 0; f < count; ++f) {
      const bool is_probe = f == probes[0] || f == probes[1] || f == probes[2];
      const std::vector<float>& src = is_probe ? probe.llr : companion;
      std::copy(src.begin(), src.end(), llr.begin() + static_cast<std::ptrdiff_t>(f * 10));
    }
    Outcome got;
    ASSERT_TRUE(KernelOutcome(a, llr, count, lanes, got));
    for (std::size_t f = 0; f < count; ++f) {
      const bool is_probe = f == probes[0] || f == probes[1] || f == probes[2];
      if (is_probe) {
        EXPECT_EQ(got.iterations[f], stopped.iterations[0]) << "frame " << f;
        EXPECT_EQ(got.converged[f], 1) << "frame " << f;
        EXPECT_TRUE(std::equal(stopped.decided.begin(), stopped.decided.end(),
                               got.decided.begin() + static_cast<std::ptrdiff_t>(f * 10)))
            << "frame " << f;
      } else {
        EXPECT_EQ(got.iterations[f], a.max_iterations) << "frame " << f;
        EXPECT_EQ(got.converged[f], 0) << "frame " << f;
      }
    }
  }
}

TEST_P(LdpcKernelPerTarget, QuantiserMatchesReferenceOnAwkwardLengths) {
  std::mt19937_64 rng(5u);
  std::vector<float> x(1001);
  for (std::size_t i = 0; i < x.size(); ++i) {
    // Values on and next to every rounding boundary k/8 for |k| <= 600,
    // beyond both clips, and signed zeros.
    const float base = static_cast<float>(static_cast<int>(rng() % 1201u) - 600) / 8.0f;
    const int pick = static_cast<int>(rng() % 4);
    x[i] = pick == 0   ? base
           : pick == 1 ? std::nextafter(base, 1e9f)
           : pick == 2 ? std::nextafter(base, -1e9f)
                       : -0.0f;
  }
  for (float scale : {4.0f, 16.0f, 0.7f}) {
    for (int clip : {31, 127, 5, 1023}) {
      for (std::size_t len : {1u, 3u, 7u, 15u, 16u, 17u, 63u, 64u, 65u, 1001u}) {
        SCOPED_TRACE(testing::Message() << "len=" << len << " scale=" << scale << " clip=" << clip);
        const float* in = x.data() + (x.size() - len);
        std::vector<std::int16_t> got16(len + 1, 999);
        if (!HWY_DYNAMIC_DISPATCH(QuantiseUnderTest)(in, len, scale, clip, nullptr,
                                                     got16.data() + 1)) {
          GTEST_SKIP();
        }
        for (std::size_t i = 0; i < len; ++i) {
          ASSERT_EQ(got16[i + 1], reference::LdpcQuantiseOne(in[i], scale, clip))
              << "x = " << in[i];
        }
        EXPECT_EQ(got16[0], 999);
        if (clip > 127) continue;
        std::vector<std::int8_t> got8(len + 1, 99);
        HWY_DYNAMIC_DISPATCH(QuantiseUnderTest)(in, len, scale, clip, got8.data() + 1, nullptr);
        for (std::size_t i = 0; i < len; ++i) {
          ASSERT_EQ(got8[i + 1], reference::LdpcQuantiseOne(in[i], scale, clip)) << "x = " << in[i];
        }
        EXPECT_EQ(got8[0], 99);
      }
    }
  }
}

template <typename T, typename Fn>
void CheckTranspose(Fn fn) {
  std::mt19937 rng(8u);
  for (std::size_t rows : {1u, 7u, 8u, 9u, 15u, 16u, 17u, 33u, 64u}) {
    for (std::size_t cols : {1u, 7u, 8u, 16u, 31u, 48u, 203u}) {
      const std::size_t in_stride = cols + 3, out_stride = rows + 5;
      std::vector<T> in(rows * in_stride);
      for (auto& b : in) b = static_cast<T>(rng());
      std::vector<T> out(cols * out_stride, T{0x55});
      if (!fn(in.data(), in_stride, rows, cols, out.data(), out_stride)) GTEST_SKIP();
      for (std::size_t j = 0; j < cols; ++j) {
        for (std::size_t i = 0; i < out_stride; ++i) {
          const T want = i < rows ? in[i * in_stride + j] : T{0x55};
          ASSERT_EQ(out[j * out_stride + i], want)
              << rows << "x" << cols << " at " << i << "," << j;
        }
      }
    }
  }
}

TEST_P(LdpcKernelPerTarget, TransposeMatchesScalarOnAwkwardSizes) {
  CheckTranspose<std::int8_t>(HWY_DYNAMIC_DISPATCH(Transpose8UnderTest));
  CheckTranspose<std::int16_t>(HWY_DYNAMIC_DISPATCH(Transpose16UnderTest));
}

// The public entry: dispatched and forced-scalar paths give the oracle's
// results, and the lane counts are consistent.
TEST(LdpcKernel, PublicEntryMatchesReferenceDispatchedAndForcedScalar) {
  const LdpcCode& code = TestCodes().irregular;
  const auto n = static_cast<std::size_t>(code.length());
  for (LdpcLane lane : {LdpcLane::kInt8, LdpcLane::kInt16}) {
    const LdpcFixedArgs a = ArgsFor(code, lane, 5);
    const std::size_t lanes = LdpcFixedMaxLanes(lane);
    EXPECT_GE(lanes, 1u);
    const std::size_t count = 2 * lanes + 1;
    const std::vector<float> llr = MakeFrames(code.length(), count, 4u);
    const Outcome want = ReferenceOutcome(a, llr, count);
    std::vector<std::uint8_t> ws(LdpcFixedWorkspaceBytes(a, lanes) + 3);
    for (bool force : {false, true}) {
      const bool prev = ForceScalarKernels(force);
      EXPECT_EQ(LdpcFixedLanes(lane), force ? 1u : lanes);
      if (force) {
        EXPECT_STREQ(LdpcKernelTarget(), "SCALAR");
      }
      std::vector<Bit> decided(count * n, 7);
      std::vector<LdpcFrameResult> results(count, LdpcFrameResult{-1, true});
      LdpcDecodeFixed(a, llr.data(), count, decided.data(), results.data(), ws.data() + 3);
      ForceScalarKernels(prev);
      EXPECT_EQ(decided, want.decided) << "force=" << force;
      for (std::size_t f = 0; f < count; ++f) {
        EXPECT_EQ(results[f].iterations, want.iterations[f]) << "force=" << force;
        EXPECT_EQ(results[f].converged ? 1 : 0, want.converged[f]) << "force=" << force;
      }
    }
  }
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
