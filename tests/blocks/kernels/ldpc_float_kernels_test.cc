// Every compiled Highway target of the float LDPC lane kernel
// (blocks/kernels/ldpc_float_kernels.h) against its one-frame scalar oracles,
// bit for bit: decisions, iteration counts and convergence flags of every
// frame, for normalised and offset min-sum (oracle: the float min-sum
// reference of ldpc_reference.h) and float32 sum-product (oracle:
// ldpc_spa_reference.h), both schedules, with and without early stop, frame
// counts 1, B-1, B, B+1 and 3B+5 (B = the target's lanes), on a regular (3,6)
// code and an irregular code of odd length with variable degrees 2 to 8 and
// rows of degree 1 to 9. Frames: the all-zero codeword through BPSK/AWGN at
// mixed Eb/N0, pure noise, words with extreme values (+-1e30, +-3e38,
// signed zeros), all-erased words (every LLR +0 or -0) and saturated
// codewords. Per target too: every message and posterior of a check pass
// bit for bit against the oracles' row updates (rows of degree 1..12 and
// 20); the vector exp2 and log2 against the scalar
// twins on awkward lengths with misaligned starts (targets with a native
// fused multiply-add, the ones that run sum-product). Compiled with
// -ffp-contract=off, like the kernel.
#include <algorithm>
#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <random>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/ldpc_float_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/ldpc_float_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
bool DecodeUnderTest(const LdpcFloatKernelArgs& args, const float* llrs, std::size_t frames,
                     Bit* decided, LdpcFrameResult* results, void* ws) {
  return LdpcDecodeFloatLanesKernel(args, llrs, frames, decided, results, ws);
}
std::size_t LanesUnderTest(LdpcFloatRule rule) { return LdpcFloatKernelLanes(rule); }
std::int64_t TargetUnderTest() { return HWY_TARGET; }
// which = 0: exp2, 1: log2 of x[0..len) into out (whole vectors, then the
// tail through a padded vector). False on HWY_SCALAR and on targets without
// a native fused multiply-add (they leave sum-product to the oracle).
bool MathUnderTest(int which, const float* x, std::size_t len, float* out) {
#if HWY_TARGET == HWY_SCALAR || !HWY_NATIVE_FMA
  (void)which, (void)x, (void)len, (void)out;
  return false;
#else
  const hn::ScalableTag<float> d;
  const std::size_t lanes = hn::Lanes(d);
  const auto apply = [&](hn::Vec<decltype(d)> v) {
    return which == 0 ? ldpc_float_detail::Exp2(d, v) : ldpc_float_detail::Log2(d, v);
  };
  std::size_t i = 0;
  for (; i + lanes <= len; i += lanes) hn::StoreU(apply(hn::LoadU(d, x + i)), d, out + i);
  if (i < len) {
    HWY_ALIGN float buf[HWY_MAX_BYTES / 4];
    for (std::size_t j = 0; j < lanes; ++j) buf[j] = i + j < len ? x[i + j] : (which == 0 ? 0.0f : 1.0f);
    hn::Store(apply(hn::Load(d, buf)), d, buf);
    for (std::size_t j = 0; i + j < len; ++j) out[i + j] = buf[j];
  }
  return true;
#endif
}
// One check pass (every row of a.graph, a.rule, a.layered) on given
// lane-interleaved posteriors and messages (n and E rows of `lanes` floats),
// written back in place. False if the target does not run the rule.
bool CheckPassUnderTest(const LdpcFloatKernelArgs& a, float* p_rows, float* c_rows) {
#if HWY_TARGET == HWY_SCALAR
  (void)a, (void)p_rows, (void)c_rows;
  return false;
#else
  if (LdpcFloatKernelLanes(a.rule) == 0) return false;
  const hn::ScalableTag<float> d;
  const std::size_t lanes = hn::Lanes(d);
  std::vector<std::uint8_t> ws(LdpcFloatWorkspaceBytes(a, lanes));
  const ldpc_float_detail::Buffers b = ldpc_float_detail::Carve(a.graph, lanes, ws.data());
  const auto n = static_cast<std::size_t>(a.graph.n);
  const auto edges = static_cast<std::size_t>(a.graph.edges);
  std::copy(p_rows, p_rows + n * lanes, b.p);
  std::copy(c_rows, c_rows + edges * lanes, b.c);
  const auto ctx = ldpc_float_detail::MakeContext(d, a, b);
  if (a.layered) {
    ldpc_float_detail::CheckPass<true>(d, ctx);
  } else {
    ldpc_float_detail::CheckPass<false>(d, ctx);
  }
  std::copy(b.p, b.p + n * lanes, p_rows);
  std::copy(b.c, b.c + edges * lanes, c_rows);
  return true;
#endif
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
#include "blocks/kernels/ldpc_spa_reference.h"
#include "hwy/tests/hwy_gtest.h"
#include "tests/blocks/fec/ldpc_test_codes.h"

namespace capgap {
namespace {

HWY_EXPORT(DecodeUnderTest);
HWY_EXPORT(LanesUnderTest);
HWY_EXPORT(TargetUnderTest);
HWY_EXPORT(MathUnderTest);
HWY_EXPORT(CheckPassUnderTest);

// The library picks its target once, on first use: make that happen before
// any test below mocks the CPU's target list.
const char* const kLibraryTarget = LdpcFloatKernelTarget(LdpcFloatRule::kSumProduct32);

using testing_codes::RegularRows;

// Irregular rows of odd length n: variable degrees cycle through 2, 3, 4, 8
// on random checks; plus a degree-1 check on variable 0 and a check holding
// 9 variables.
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

// `count` frames of n LLRs: the all-zero codeword over BPSK/AWGN (rate 1/2
// bookkeeping, LLR = 4 y / N0) at Eb/N0 cycling through 0, 1, 2, 3, 5 dB;
// frame f % 7 == 3 pure noise; f % 11 == 5 sprinkled with extremes and
// signed zeros; f % 13 == 6 all +0, f % 13 == 7 all -0 (erased); f % 17 == 8
// every LLR +3e38 (a saturated codeword), f % 17 == 9 every LLR -1e30.
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
        const float special[8] = {1e30f, -1e30f, 0.0f, -0.0f, 3e38f, -3e38f, 1e-30f, -1e-30f};
        if (rng() % 3 == 0) x[i] = special[rng() % 8];
      }
      if (f % 13 == 6) x[i] = 0.0f;
      if (f % 13 == 7) x[i] = -0.0f;
      if (f % 17 == 8) x[i] = 3e38f;
      if (f % 17 == 9) x[i] = -1e30f;
    }
  }
  return llr;
}

struct Outcome {
  std::vector<Bit> decided;
  std::vector<int> iterations;
  std::vector<std::uint8_t> converged;
};

// One kernel call on the target under test (outputs poisoned first;
// workspace misaligned by one byte; a workspace passed in is reused as the
// earlier calls left it). False if the target has no kernel.
bool KernelOutcome(const LdpcFloatKernelArgs& a, const std::vector<float>& llr, std::size_t count,
                   std::size_t lanes, Outcome& o, std::vector<std::uint8_t>* reuse = nullptr) {
  const auto n = static_cast<std::size_t>(a.graph.n);
  std::vector<std::uint8_t> own;
  std::vector<std::uint8_t>& ws = reuse != nullptr ? *reuse : own;
  ws.resize(LdpcFloatWorkspaceBytes(a, lanes) + 1);
  std::vector<LdpcFrameResult> results(count, LdpcFrameResult{-1, true});
  o.decided.assign(count * n, 7);
  if (!HWY_DYNAMIC_DISPATCH(DecodeUnderTest)(a, llr.data(), count, o.decided.data(),
                                             results.data(), ws.data() + 1)) {
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

// The oracle, frame by frame: the float min-sum reference or the float32
// sum-product reference.
Outcome ReferenceOutcome(const LdpcFloatKernelArgs& a, const std::vector<float>& llr,
                         std::size_t count) {
  const LdpcGraph& g = a.graph;
  const auto n = static_cast<std::size_t>(g.n);
  Outcome o;
  o.decided.assign(count * n, 7);
  o.iterations.assign(count, -1);
  o.converged.assign(count, 7);
  std::vector<float> fws(std::max(reference::LdpcSpaFrameWorkspaceFloats(g),
                                  reference::LdpcFloatFrameWorkspaceFloats(g)));
  std::vector<double> dws(reference::LdpcFloatFrameWorkspaceDoubles(g));
  reference::LdpcFloatArgs ms;
  ms.graph = g;
  ms.rule = a.rule == LdpcFloatRule::kMinSumOffset ? LdpcCheckRule::kMinSumOffset
                                                   : LdpcCheckRule::kMinSumNormalized;
  ms.layered = a.layered;
  ms.max_iterations = a.max_iterations;
  ms.early_stop = a.early_stop;
  ms.normalization = a.normalization;
  ms.offset = a.offset;
  for (std::size_t f = 0; f < count; ++f) {
    bool conv = false;
    if (a.rule == LdpcFloatRule::kSumProduct32) {
      reference::LdpcDecodeSpaFrame(a, llr.data() + f * n, o.decided.data() + f * n,
                                    &o.iterations[f], &conv, fws.data());
    } else {
      reference::LdpcDecodeFloatFrame(ms, llr.data() + f * n, o.decided.data() + f * n, nullptr,
                                      &o.iterations[f], &conv, fws.data(), dws.data());
    }
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

// Variant bits: 0 layered, 1 early stop; rule by `rule`; min-sum factor
// 0.8 (not a power-of-two fraction) and offset 0.5.
LdpcFloatKernelArgs ArgsFor(const LdpcCode& code, LdpcFloatRule rule, int variant) {
  LdpcFloatKernelArgs a;
  a.graph = LdpcGraphOf(code);
  a.rule = rule;
  a.layered = (variant & 1) != 0;
  a.early_stop = (variant & 2) != 0;
  a.max_iterations = a.early_stop ? 25 : 12;
  a.normalization = 0.8f;
  a.offset = 0.5f;
  return a;
}

class LdpcFloatKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(LdpcFloatKernelPerTarget);

TEST_P(LdpcFloatKernelPerTarget, DispatchReachesTheTargetUnderTest) {
  EXPECT_EQ(HWY_DYNAMIC_DISPATCH(TargetUnderTest)(), GetParam());
}

TEST_P(LdpcFloatKernelPerTarget, DecodeMatchesReferenceBitForBit) {
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)(LdpcFloatRule::kMinSumNormalized);
  if (lanes == 0) GTEST_SKIP() << "target leaves the kernel to the oracle";
  ASSERT_GE(lanes, 2u);
  const std::size_t pool = 3 * lanes + 5;  // the big odd count
  int frames_converged_late = 0, frames_failed = 0;
  for (const LdpcCode* code : {&TestCodes().regular, &TestCodes().irregular}) {
    const auto n = static_cast<std::size_t>(code->length());
    const std::vector<float> llr = MakeFrames(code->length(), pool, 99u + n);
    for (LdpcFloatRule rule : {LdpcFloatRule::kMinSumNormalized, LdpcFloatRule::kMinSumOffset,
                               LdpcFloatRule::kSumProduct32}) {
      const std::size_t rule_lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)(rule);
      if (rule_lanes == 0) {
        // No native FMA: the oracle runs instead, and the kernel refuses.
        ASSERT_EQ(rule, LdpcFloatRule::kSumProduct32);
        Outcome got;
        EXPECT_FALSE(KernelOutcome(ArgsFor(*code, rule, 3), llr, 1, lanes, got));
        continue;
      }
      ASSERT_EQ(rule_lanes, lanes);
      for (int variant = 0; variant < 4; ++variant) {
        const LdpcFloatKernelArgs a = ArgsFor(*code, rule, variant);
        const Outcome want = ReferenceOutcome(a, llr, pool);
        for (std::size_t f = 0; f < pool; ++f) {
          if (want.iterations[f] >= 3 && want.converged[f]) ++frames_converged_late;
          if (!want.converged[f]) ++frames_failed;
        }
        std::vector<std::uint8_t> ws;  // shared by the calls below
        for (std::size_t count : {std::size_t{1}, lanes - 1, lanes, lanes + 1, pool}) {
          SCOPED_TRACE(testing::Message() << "n=" << n << " rule=" << static_cast<int>(rule)
                                          << " variant=" << variant << " frames=" << count);
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

// Every message and posterior of one check pass, bit for bit, per lane
// against the oracles' row updates (ldpc_spa_reference.h LdpcSpaRow,
// ldpc_reference.h LdpcFloatRow): rows of every degree 1..12 (the unrolled
// 3..8 and the generic path) and 20, posteriors and messages drawn per lane
// (magnitudes from 1e-3 to 60 bits, some beyond the clip, signed zeros, ties
// of |t| for min-sum). Decisions alone can miss a single rounding (one
// reordered product changed no decision on AVX2 in
// DecodeMatchesReferenceBitForBit); this compares the floats.
TEST_P(LdpcFloatKernelPerTarget, CheckPassMatchesReferenceRowsBitForBit) {
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesUnderTest)(LdpcFloatRule::kMinSumNormalized);
  if (lanes == 0) GTEST_SKIP() << "target leaves the kernel to the oracle";
  // Rows: degrees 1..12 and 20 over 60 variables, variables spread.
  std::vector<std::vector<int>> rows;
  int next = 0;
  for (int deg : {1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 20, 6, 3}) {
    std::vector<int> row;
    for (int k = 0; k < deg; ++k) row.push_back((next + 7 * k) % 60);
    std::sort(row.begin(), row.end());
    row.erase(std::unique(row.begin(), row.end()), row.end());
    rows.push_back(row);
    next += 11;
  }
  const LdpcCode code = LdpcCode::FromRows(60, rows).value();
  const auto n = static_cast<std::size_t>(code.length());
  const auto edges = static_cast<std::size_t>(code.edges());
  std::mt19937_64 rng(21u);
  std::vector<float> p(n * lanes), c(edges * lanes);
  const auto draw = [&](bool ties) {
    const int pick = static_cast<int>(rng() % 16);
    if (pick == 0) return 0.0f;
    if (pick == 1) return -0.0f;
    if (ties && pick < 5) return (rng() & 1) ? 1.5f : -1.5f;
    const float mag = std::exp2(static_cast<float>(rng() % 16000) / 1000.0f - 10.0f);
    return (rng() & 1) ? mag : -mag;  // 1e-3 .. 64
  };
  for (LdpcFloatRule rule : {LdpcFloatRule::kMinSumNormalized, LdpcFloatRule::kMinSumOffset,
                             LdpcFloatRule::kSumProduct32}) {
    for (bool layered : {false, true}) {
      SCOPED_TRACE(testing::Message() << "rule=" << static_cast<int>(rule) << " layered=" << layered);
      LdpcFloatKernelArgs a = ArgsFor(code, rule, layered ? 1 : 0);
      const bool ties = rule != LdpcFloatRule::kSumProduct32;
      for (float& x : p) x = draw(ties);
      for (float& x : c) x = draw(ties) * 0.5f;
      std::vector<float> gp = p, gc = c;
      if (!HWY_DYNAMIC_DISPATCH(CheckPassUnderTest)(a, gp.data(), gc.data())) {
        ASSERT_EQ(rule, LdpcFloatRule::kSumProduct32);
        continue;
      }
      reference::LdpcFloatArgs ms;
      ms.graph = a.graph;
      ms.rule = rule == LdpcFloatRule::kMinSumOffset ? LdpcCheckRule::kMinSumOffset
                                                     : LdpcCheckRule::kMinSumNormalized;
      ms.layered = layered;
      ms.normalization = a.normalization;
      ms.offset = a.offset;
      std::vector<float> scratch(4 * static_cast<std::size_t>(a.graph.max_row_degree));
      std::vector<double> dscratch(3 * static_cast<std::size_t>(a.graph.max_row_degree));
      for (std::size_t l = 0; l < lanes; ++l) {
        std::vector<float> lp(n), lc(edges);
        for (std::size_t v = 0; v < n; ++v) lp[v] = p[v * lanes + l];
        for (std::size_t e = 0; e < edges; ++e) lc[e] = c[e * lanes + l];
        for (int r = 0; r < a.graph.m; ++r) {
          if (rule == LdpcFloatRule::kSumProduct32) {
            reference::LdpcSpaRow(a, r, lp.data(), lc.data(), scratch.data());
          } else {
            reference::LdpcFloatRow(ms, r, lp.data(), lc.data(), scratch.data(), dscratch.data(),
                                    dscratch.data(), dscratch.data());
          }
        }
        for (std::size_t e = 0; e < edges; ++e) {
          ASSERT_EQ(std::bit_cast<std::uint32_t>(gc[e * lanes + l]), std::bit_cast<std::uint32_t>(lc[e]))
              << "lane " << l << " edge " << e << ": " << gc[e * lanes + l] << " vs " << lc[e];
        }
        for (std::size_t v = 0; v < n; ++v) {
          ASSERT_EQ(std::bit_cast<std::uint32_t>(gp[v * lanes + l]), std::bit_cast<std::uint32_t>(lp[v]))
              << "lane " << l << " variable " << v;
        }
      }
    }
  }
}

// Inputs of exp2: the whole range [-43, 0] on a grid, every half-integer
// (where the rounding to n ties) and its neighbours, both ends, -0.
std::vector<float> Exp2Inputs() {
  std::vector<float> x;
  for (int k = 0; k <= 86; ++k) {
    const float h = -0.5f * static_cast<float>(k);
    x.push_back(h);
    if (k > 0) x.push_back(std::nextafter(h, 0.0f));
    if (k < 86) x.push_back(std::nextafter(h, -100.0f));
  }
  for (int k = 0; k < 4300; ++k) x.push_back(-0.01f * static_cast<float>(k) - 0.0003f);
  x.push_back(-0.0f);
  return x;
}

// Inputs of log2: r in [1, 2^60] on a geometric grid, the split points
// 2^k sqrt(1/2) and their neighbours, powers of two, 1 and its successor.
std::vector<float> Log2Inputs() {
  std::vector<float> x;
  for (int k = 0; k <= 6000; ++k) x.push_back(std::exp2(0.01f * static_cast<float>(k)));
  for (int k = 1; k <= 60; ++k) {
    const float split = std::bit_cast<float>(kLdpcSpaLog2Split + (static_cast<std::uint32_t>(k) << 23));
    x.push_back(split);
    x.push_back(std::nextafter(split, 0.0f));
    x.push_back(std::nextafter(split, 1e30f));
    x.push_back(std::exp2(static_cast<float>(k)));
  }
  x.push_back(1.0f);
  x.push_back(std::nextafter(1.0f, 2.0f));
  return x;
}

TEST_P(LdpcFloatKernelPerTarget, VectorExp2AndLog2MatchScalarTwinsOnAwkwardLengths) {
  for (int which : {0, 1}) {
    const std::vector<float> all = which == 0 ? Exp2Inputs() : Log2Inputs();
    std::vector<std::size_t> lengths = {1, 3, 7, 15, 16, 17, all.size() - 1, all.size()};
    for (std::size_t len : lengths) {
      for (std::size_t skip : {std::size_t{0}, std::size_t{1}}) {
        if (len + skip > all.size()) continue;
        const float* in = all.data() + skip;  // misaligned start when skip = 1
        std::vector<float> out(len + 1, -7.0f);
        if (!HWY_DYNAMIC_DISPATCH(MathUnderTest)(which, in, len, out.data() + skip)) GTEST_SKIP();
        for (std::size_t i = 0; i < len; ++i) {
          const float want =
              which == 0 ? reference::LdpcSpaExp2(in[i]) : reference::LdpcSpaLog2(in[i]);
          ASSERT_EQ(std::bit_cast<std::uint32_t>(out[i + skip]), std::bit_cast<std::uint32_t>(want))
              << (which == 0 ? "exp2(" : "log2(") << in[i] << ") len " << len;
        }
      }
    }
  }
}

// The scalar twins against libm over their whole ranges: the error bounds
// stated in ldpc_spa_reference.h (relative 1e-5 for exp2, absolute 1e-5 bits
// for log2), and the properties the decoder relies on (exp2 in [2^-43, 1];
// log2 >= +0, log2(1) = +0).
TEST(LdpcSpaReference, Exp2AndLog2MeetTheirStatedErrorBounds) {
  double worst_exp = 0, worst_log = 0;
  for (float y : Exp2Inputs()) {
    const float got = reference::LdpcSpaExp2(y);
    const double want = std::exp2(static_cast<double>(y));
    worst_exp = std::max(worst_exp, std::fabs(got / want - 1.0));
    EXPECT_GE(got, std::exp2(-43.0f) * (1 - 1e-5f));
    EXPECT_LE(got, 1.0f);
  }
  for (float r : Log2Inputs()) {
    const float got = reference::LdpcSpaLog2(r);
    worst_log = std::max(worst_log, std::fabs(got - std::log2(static_cast<double>(r))));
    EXPECT_FALSE(std::signbit(got)) << r;
  }
  EXPECT_EQ(std::bit_cast<std::uint32_t>(reference::LdpcSpaLog2(1.0f)), 0u);
  EXPECT_EQ(reference::LdpcSpaExp2(0.0f), 1.0f);
  EXPECT_LT(worst_exp, 1e-5);
  EXPECT_LT(worst_log, 1e-5);
}

// One check of degree 3 against the tanh rule in double (Gallager 1963, the
// rule the header cites): the message to each edge is 2 atanh of the product
// of the others' tanh(t / 2), in bits here.
TEST(LdpcSpaReference, RowMatchesTheTanhRule) {
  const LdpcCode code = LdpcCode::FromRows(3, {{0, 1, 2}}).value();
  LdpcFloatKernelArgs a;
  a.graph = LdpcGraphOf(code);
  a.rule = LdpcFloatRule::kSumProduct32;
  a.layered = false;
  const float bits_in[3][3] = {{1.5f, -2.25f, 0.75f}, {10.0f, 12.0f, -0.01f}, {0.0f, 3.0f, 40.0f}};
  for (const auto& in : bits_in) {
    float p[3] = {in[0], in[1], in[2]};
    float c[3] = {0, 0, 0};
    float scratch[12];
    reference::LdpcSpaRow(a, 0, p, c, scratch);
    for (int k = 0; k < 3; ++k) {
      double prod = 1;
      for (int j = 0; j < 3; ++j) {
        if (j != k) prod *= std::tanh(static_cast<double>(in[j]) * std::log(2.0) / 2);
      }
      const double want = 2 * std::atanh(prod) / std::log(2.0);
      EXPECT_NEAR(c[k], want, 2e-5 + 1e-6 * std::fabs(want)) << in[0] << " " << in[1] << " " << in[2];
    }
  }
}

// The public entry: dispatched and forced-scalar paths give the oracle's
// results, and the lane counts are consistent.
TEST(LdpcFloatKernel, PublicEntryMatchesReferenceDispatchedAndForcedScalar) {
  const LdpcCode& code = TestCodes().irregular;
  const auto n = static_cast<std::size_t>(code.length());
  for (LdpcFloatRule rule : {LdpcFloatRule::kMinSumNormalized, LdpcFloatRule::kSumProduct32}) {
    const std::size_t lanes = LdpcFloatMaxLanes(rule);
    EXPECT_GE(lanes, 1u);
    const std::size_t count = 2 * lanes + 1;
    const std::vector<float> llr = MakeFrames(code.length(), count, 4u);
    const LdpcFloatKernelArgs a = ArgsFor(code, rule, 3);
    const Outcome want = ReferenceOutcome(a, llr, count);
    std::vector<std::uint8_t> ws(LdpcFloatWorkspaceBytes(a, lanes) + 3);
    for (bool force : {false, true}) {
      const bool prev = ForceScalarKernels(force);
      EXPECT_EQ(LdpcFloatLanes(rule), force ? 1u : lanes);
      if (force) {
        EXPECT_STREQ(LdpcFloatKernelTarget(rule), "SCALAR");
      }
      std::vector<Bit> decided(count * n, 7);
      std::vector<LdpcFrameResult> results(count, LdpcFrameResult{-1, true});
      LdpcDecodeFloatLanes(a, llr.data(), count, decided.data(), results.data(), ws.data() + 3);
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
