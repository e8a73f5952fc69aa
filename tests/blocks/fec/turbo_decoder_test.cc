// Iterative turbo decoder, scalar reference (blocks/fec/turbo_decoder.h).
#include "blocks/fec/turbo_decoder.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <vector>

namespace capgap {
namespace {

TurboCode MakeCode(std::uint32_t k, const char* puncture = nullptr,
                   std::uint32_t f1 = 0, std::uint32_t f2 = 0) {
  auto rsc = RscCode::Create(013, 015);
  TurboInterleaverSpec spec;
  spec.qpp_f1 = f1;
  spec.qpp_f2 = f2;
  auto il = TurboInterleaver::Create(spec, k, PhiloxKey{});
  EXPECT_TRUE(il.ok()) << il.status().message();
  PuncturePattern p;
  if (puncture) p = ParsePuncturePattern(puncture).value();
  auto code = TurboCode::Create(rsc.value(), il.value(), p);
  EXPECT_TRUE(code.ok());
  return code.value();
}

std::vector<Bit> RandomBits(std::size_t n, std::uint32_t seed) {
  RngStream s(PhiloxKey{seed, 11}, 0, 0, Substream::kBits);
  std::vector<Bit> bits(n);
  for (auto& b : bits) b = static_cast<Bit>(s.NextU64() & 1u);
  return bits;
}

// Noiseless LLRs of magnitude a: +a for bit 0, -a for bit 1.
std::vector<float> CleanLlrs(std::span<const Bit> coded, float a) {
  std::vector<float> l(coded.size());
  for (std::size_t i = 0; i < coded.size(); ++i) l[i] = coded[i] ? -a : a;
  return l;
}

struct Case {
  TurboDecoderKind kind;
  const char* puncture;
};

TEST(TurboDecoder, NoiselessFramesDecodeInOneIteration) {
  for (Case c : {Case{TurboDecoderKind::kMaxLogMap, nullptr}, Case{TurboDecoderKind::kLogMap, nullptr},
                 Case{TurboDecoderKind::kMaxLogMap, "11,10,01"},
                 Case{TurboDecoderKind::kLogMap, "11,10,01"}}) {
    const TurboCode code = MakeCode(1024, c.puncture);
    TurboDecoderOptions o;
    o.kind = c.kind;
    o.extrinsic_scale = static_cast<float>(DefaultExtrinsicScale(c.kind));
    auto dec = TurboDecoder::Create(code, o);
    ASSERT_TRUE(dec.ok());
    auto ws = dec.value().MakeWorkspace();
    const auto info = RandomBits(code.info_bits(), 5);
    std::vector<Bit> coded(code.coded_bits()), scratch(3 * code.info_bits());
    code.Encode(info, coded, scratch);
    std::vector<Bit> out(code.info_bits(), 2);
    const auto llrs = CleanLlrs(coded, 3.0f);
    const FrameDecodeResult r = dec.value().Decode(llrs, out, ws);
    EXPECT_EQ(out, info) << ToString(c.kind);
    EXPECT_TRUE(r.converged);
    EXPECT_EQ(r.iterations, 1u);  // half-iterations 1 and 2 agree
  }
}

// A frame with one wrong channel LLR anywhere (systematic, either parity, a
// tail bit) decodes to the transmitted bits: the code's free distance is far
// above 2 (d_free of the rate-1/3 (13,15) turbo code with QPP interleaving is
// well above 10; common practice).
TEST(TurboDecoder, OneErrorFramesDecode) {
  const TurboCode code = MakeCode(40);
  for (TurboDecoderKind kind : {TurboDecoderKind::kMaxLogMap, TurboDecoderKind::kLogMap}) {
    TurboDecoderOptions o;
    o.kind = kind;
    o.extrinsic_scale = static_cast<float>(DefaultExtrinsicScale(kind));
    auto dec = TurboDecoder::Create(code, o);
    ASSERT_TRUE(dec.ok());
    auto ws = dec.value().MakeWorkspace();
    const auto info = RandomBits(code.info_bits(), 9);
    std::vector<Bit> coded(code.coded_bits()), scratch(3 * code.info_bits());
    code.Encode(info, coded, scratch);
    const auto clean = CleanLlrs(coded, 2.0f);
    for (std::size_t pos = 0; pos < code.coded_bits(); ++pos) {
      auto llrs = clean;
      llrs[pos] = -llrs[pos];  // the wrong sign, same confidence
      std::vector<Bit> out(code.info_bits(), 2);
      dec.value().Decode(llrs, out, ws);
      ASSERT_EQ(out, info) << ToString(kind) << " error at coded position " << pos;
    }
  }
}

// The SISO's a posteriori LLRs against brute force over all 2^K inputs of
// one terminated constituent (K = 8): exact log-MAP is
// ln sum_{paths: u_t=0} exp(metric) - ln sum_{paths: u_t=1} exp(metric) with
// metric = sum of branch metrics (the BCJR definition, Bahl et al. 1974);
// max-log-MAP the difference of the largest metrics.
TEST(TurboDecoder, SisoMatchesBruteForceOverAllInputs) {
  // QPP for K = 8 with f1 = 3, f2 = 2: 0 5 6 3 4 1 2 7 (a permutation).
  const TurboCode code = MakeCode(8, nullptr, 3, 2);
  const RscCode& rsc = code.rsc();
  const std::size_t k = 8, m = 3;
  RngStream noise(PhiloxKey{3, 3}, 0, 0, Substream::kNoise);
  auto draw = [&]() {
    return static_cast<float>(static_cast<double>(noise.NextU64() >> 11) * 0x1.0p-53 * 6.0 - 3.0);
  };
  std::vector<float> sys(k), apr(k), par(k), ts(m), tp(m);
  for (auto* v : {&sys, &apr, &par, &ts, &tp}) {
    for (float& x : *v) x = draw();
  }
  std::vector<double> sum0(k, 0), sum1(k, 0);
  std::vector<double> max0(k, -1e300), max1(k, -1e300);
  for (unsigned word = 0; word < (1u << k); ++word) {
    int s = 0;
    double metric = 0;
    for (std::size_t t = 0; t < k; ++t) {
      const int u = static_cast<int>((word >> t) & 1u);
      const int p = rsc.Parity(s, u);
      metric += 0.5 * ((1 - 2 * u) * (static_cast<double>(sys[t]) + apr[t]) + (1 - 2 * p) * static_cast<double>(par[t]));
      s = rsc.NextState(s, u);
    }
    for (std::size_t j = 0; j < m; ++j) {
      const int u = rsc.TailInput(s);
      const int p = rsc.Parity(s, u);
      metric += 0.5 * ((1 - 2 * u) * static_cast<double>(ts[j]) + (1 - 2 * p) * static_cast<double>(tp[j]));
      s = rsc.NextState(s, u);
    }
    ASSERT_EQ(s, 0);
    for (std::size_t t = 0; t < k; ++t) {
      if ((word >> t) & 1u) {
        sum1[t] += std::exp(metric);
        max1[t] = std::max(max1[t], metric);
      } else {
        sum0[t] += std::exp(metric);
        max0[t] = std::max(max0[t], metric);
      }
    }
  }
  for (TurboDecoderKind kind : {TurboDecoderKind::kMaxLogMap, TurboDecoderKind::kLogMap}) {
    TurboDecoderOptions o;
    o.kind = kind;
    auto dec = TurboDecoder::Create(code, o);
    ASSERT_TRUE(dec.ok());
    auto ws = dec.value().MakeWorkspace();
    std::vector<float> app(k, std::numeric_limits<float>::quiet_NaN());
    dec.value().Siso(sys, apr, par, ts, tp, app, ws);
    for (std::size_t t = 0; t < k; ++t) {
      const double want = kind == TurboDecoderKind::kLogMap ? std::log(sum0[t]) - std::log(sum1[t])
                                                            : max0[t] - max1[t];
      // float recursions over 11 steps: a few 1e-6 relative to metrics ~ 30.
      EXPECT_NEAR(app[t], want, 1e-4) << ToString(kind) << " t " << t;
    }
  }
}

TEST(TurboDecoder, RefusesBadOptions) {
  const TurboCode code = MakeCode(40);
  TurboDecoderOptions o;
  o.max_iterations = 0;
  EXPECT_FALSE(TurboDecoder::Create(code, o).ok());
  o.max_iterations = 8;
  o.extrinsic_scale = 1.5f;
  auto r = TurboDecoder::Create(code, o);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("(0, 1]"), std::string::npos);
  EXPECT_FALSE(ParseTurboDecoderKind("map").ok());
  EXPECT_EQ(ParseTurboDecoderKind("map").status().message(), "valid: max_log_map, log_map");
}

}  // namespace
}  // namespace capgap
