// Tests of the fused channel-LLR kernels (blocks/kernels/channel_llr_kernels.h).
//
// This file is compiled once per Highway target (hwy/foreach_target.h, like
// channel_llr_kernels.cc), so every target compiled in and supported by this
// CPU is checked against the composed path of the same target: symbols as
// the chain / Mapper form them, that target's noise loop (NormalKernel), and
// the LLR multiply. LLRs must be identical bit for bit, on awkward lengths,
// misaligned bit arrays and streams whose block index wraps inside a call;
// the fused uncoded 16-, 64-, 256-QAM and 8-, 16-PSK counts equal the count
// of the same target's noisy samples decided by the demapper's operations.
// The public entry points are checked against the public composed path
// (Mapper::Map, AwgnChannel noise, Demapper::Demap; dispatched and forced
// scalar) for LLRs and stream positions.
#include <bit>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <numbers>
#include <span>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/channel_llr_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/channel_llr_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {

void BpskUnderTest(const Bit* bits, std::size_t n, float sigma, float scale, PhiloxKey key,
                   const PhiloxCounter& counter, float* llrs) {
  BpskChannelLlrsKernel(bits, n, sigma, scale, key, counter, llrs);
}
void QpskUnderTest(const Bit* bits, std::size_t n, const float* re, const float* im, float sigma,
                   float gain, PhiloxKey key, const PhiloxCounter& counter, float* llrs) {
  QpskChannelLlrsKernel(bits, n, re, im, sigma, gain, key, counter, llrs);
}
std::uint64_t Qam16UnderTest(const Bit* bits, std::size_t n, const Qam16Decider& d, float sigma,
                             PhiloxKey key, const PhiloxCounter& counter) {
  return CountQam16ErrorsKernel(bits, n, d, sigma, key, counter);
}
std::uint64_t QamAxisUnderTest(const Bit* bits, std::size_t n, const QamAxisDecider& d,
                               float sigma, PhiloxKey key, const PhiloxCounter& counter) {
  return CountQamAxisErrorsKernel(bits, n, d, sigma, key, counter);
}
std::uint64_t PskUnderTest(const Bit* bits, std::size_t n, const PskDecider& d, float sigma,
                           PhiloxKey key, const PhiloxCounter& counter) {
  return CountPskErrorsKernel(bits, n, d, sigma, key, counter);
}
// The composed path's noise step on this target: x[i] += sigma z_i.
void AddNoiseOnTarget(float* x, std::size_t n, float sigma, PhiloxKey key,
                      const PhiloxCounter& counter) {
  NormalKernel(x, n, sigma, /*add=*/true, key, counter);
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/channel/awgn_channel.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/channel_llr_kernels.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/source/bit_source.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(BpskUnderTest);
HWY_EXPORT(QpskUnderTest);
HWY_EXPORT(AddNoiseOnTarget);
HWY_EXPORT(Qam16UnderTest);
HWY_EXPORT(QamAxisUnderTest);
HWY_EXPORT(PskUnderTest);

// The library picks its targets once, on first use: before any test mocks
// the CPU's target list.
const char* const kNoiseTarget = NoiseKernelTarget();
const char* const kLlrTarget = ChannelLlrKernelTarget();

const PhiloxKey kKey = DeriveKey(20261205u, "channel_llr_kernels_test");

RngStream StreamAt(Substream substream, std::uint32_t block_index) {
  RngStream s(kKey, /*point_index=*/2u, /*unit_index=*/9u, substream);
  s.Advance(block_index);
  return s;
}

std::vector<Bit> RandomBits(std::size_t n, std::uint32_t block) {
  std::vector<Bit> bits(n);
  RngStream s = StreamAt(Substream::kBits, block);
  GenerateRandomBits(bits, s);
  return bits;
}

bool SameFloats(const std::vector<float>& a, const float* b, std::size_t n) {
  for (std::size_t i = 0; i < n; ++i) {
    if (std::bit_cast<std::uint32_t>(a[i]) != std::bit_cast<std::uint32_t>(b[i])) return false;
  }
  return true;
}

// sigma of QPSK at Es/N0 = 3 dB, and its LLR factors (values only need to be
// typical: the comparisons are exact).
constexpr float kSigma = 0.5f;
constexpr float kN0 = 2 * kSigma * kSigma;

std::vector<std::size_t> AwkwardLengths() {
  return {1, 2, 3, 7, 15, 16, 17, 31, 32, 33, 63, 64, 65, 127, 129, 1008, 2016, 4097};
}

struct Points {
  float re[4], im[4];
};
Points QpskPoints() {
  const Mapper mapper = Mapper::Create(ParseModulation("qpsk").value()).value();
  Points p;
  for (int l = 0; l < 4; ++l) {
    p.re[l] = mapper.points()[static_cast<std::size_t>(l)].real();
    p.im[l] = mapper.points()[static_cast<std::size_t>(l)].imag();
  }
  return p;
}

class ChannelLlrPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(ChannelLlrPerTarget);

// Lengths, misaligned starts (offset 1 and 3 into the bit and LLR arrays),
// and a stream whose block index wraps (0xFFFFFFF0) inside the call.
TEST_P(ChannelLlrPerTarget, BpskEqualsComposedPathOfTheSameTarget) {
  const float scale = 4.0f / kN0;
  for (std::uint32_t start : {0u, 0xFFFFFFF0u}) {
    for (std::size_t n : AwkwardLengths()) {
      for (std::size_t offset : {std::size_t{0}, std::size_t{3}}) {
        const std::vector<Bit> bits = RandomBits(n + offset, 1);
        const RngStream noise = StreamAt(Substream::kNoise, start);
        std::vector<float> x(n);
        for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[offset + i]);
        HWY_DYNAMIC_DISPATCH(AddNoiseOnTarget)(x.data(), n, kSigma, noise.key(), noise.counter());
        for (float& v : x) v = scale * v;
        std::vector<float> llrs(n + offset, -1.0f);
        HWY_DYNAMIC_DISPATCH(BpskUnderTest)(bits.data() + offset, n, kSigma, scale, noise.key(),
                                            noise.counter(), llrs.data() + offset);
        EXPECT_TRUE(SameFloats(x, llrs.data() + offset, n)) << "n = " << n << " start " << start;
        for (std::size_t i = 0; i < offset; ++i) EXPECT_EQ(llrs[i], -1.0f);  // nothing before
      }
    }
  }
}

TEST_P(ChannelLlrPerTarget, QpskEqualsComposedPathOfTheSameTarget) {
  const Points p = QpskPoints();
  const float gain = 2.0f * std::numbers::sqrt2_v<float> * (1.0f / kN0);
  for (std::uint32_t start : {0u, 0xFFFFFFF0u}) {
    for (std::size_t n : AwkwardLengths()) {
      for (std::size_t offset : {std::size_t{0}, std::size_t{1}}) {
        const std::vector<Bit> bits = RandomBits(2 * n + offset, 2);
        const RngStream noise = StreamAt(Substream::kNoise, start);
        // Symbols interleaved (re, im) as Mapper::Map writes them.
        std::vector<float> y(2 * n);
        for (std::size_t s = 0; s < n; ++s) {
          const unsigned l = 2u * bits[offset + 2 * s] + bits[offset + 2 * s + 1];
          y[2 * s] = p.re[l];
          y[2 * s + 1] = p.im[l];
        }
        HWY_DYNAMIC_DISPATCH(AddNoiseOnTarget)(y.data(), 2 * n, kSigma, noise.key(),
                                               noise.counter());
        std::vector<float> expected(2 * n);
        for (std::size_t s = 0; s < n; ++s) {
          expected[2 * s] = gain * y[2 * s + 1];
          expected[2 * s + 1] = gain * y[2 * s];
        }
        std::vector<float> llrs(2 * n + offset + 1, -1.0f);
        HWY_DYNAMIC_DISPATCH(QpskUnderTest)(bits.data() + offset, n, p.re, p.im, kSigma, gain,
                                            noise.key(), noise.counter(), llrs.data() + offset);
        EXPECT_TRUE(SameFloats(expected, llrs.data() + offset, 2 * n))
            << "n = " << n << " start " << start;
        EXPECT_EQ(llrs[2 * n + offset], -1.0f);  // nothing written past the end
      }
    }
  }
}

// 16-QAM: the fused count against this target's noisy samples decided by
// the demapper's oracle operations (reference::Qam16AxisErrors; the demap
// kernels are bit-identical to their oracle on every target), hard and
// max-log, awkward lengths, misaligned bits, a wrapping stream.
TEST_P(ChannelLlrPerTarget, Qam16CountEqualsComposedPathOfTheSameTarget) {
  const Mapper mapper = Mapper::Create(ParseModulation("16qam").value()).value();
  const Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
  const float sigma = 0.2f;  // Es/N0 about 11 dB: symbol errors ~5e-3
  for (bool maxlog : {false, true}) {
    const Qam16Decider d = MakeQam16Decider(mapper.pam_levels().data(),
                                            demapper.kernel_args().level_scale, 2 * sigma * sigma,
                                            maxlog);
    for (std::uint32_t start : {0u, 0xFFFFFFF0u}) {
      for (std::size_t n : AwkwardLengths()) {
        for (std::size_t offset : {std::size_t{0}, std::size_t{1}}) {
          const std::vector<Bit> bits = RandomBits(4 * n + offset, 3);
          const Bit* b = bits.data() + offset;
          const RngStream noise = StreamAt(Substream::kNoise, start);
          std::vector<float> y(2 * n);
          for (std::size_t t = 0; t < 2 * n; ++t) y[t] = d.levels[2 * b[2 * t] + b[2 * t + 1]];
          HWY_DYNAMIC_DISPATCH(AddNoiseOnTarget)(y.data(), 2 * n, sigma, noise.key(),
                                                 noise.counter());
          std::uint64_t expected = 0;
          for (std::size_t t = 0; t < 2 * n; ++t) {
            expected += reference::Qam16AxisErrors(d, y[t], b[2 * t], b[2 * t + 1]);
          }
          EXPECT_EQ(HWY_DYNAMIC_DISPATCH(Qam16UnderTest)(b, n, d, sigma, noise.key(),
                                                         noise.counter()),
                    expected)
              << "n = " << n << " maxlog " << maxlog << " start " << start;
        }
      }
    }
  }
}

// 64-/256-QAM: the fused count against this target's noisy samples decided
// by the demapper oracle's operations (reference::QamAxisDecision), hard
// and max-log, awkward lengths, misaligned bits, a wrapping stream.
TEST_P(ChannelLlrPerTarget, QamAxisCountEqualsComposedPathOfTheSameTarget) {
  for (const char* name : {"64qam", "256qam"}) {
    const Mapper mapper = Mapper::Create(ParseModulation(name).value()).value();
    const Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
    const int p = mapper.bits_per_symbol() / 2;
    const auto pp = static_cast<std::size_t>(p);
    const float sigma = p == 3 ? 0.08f : 0.04f;  // symbol errors of order 1e-2
    for (bool maxlog : {false, true}) {
      const QamAxisDecider d =
          MakeQamAxisDecider(p, mapper.pam_levels().data(), demapper.kernel_args().level_scale,
                             2 * sigma * sigma, maxlog);
      for (std::uint32_t start : {0u, 0xFFFFFFF0u}) {
        for (std::size_t n : AwkwardLengths()) {
          for (std::size_t offset : {std::size_t{0}, std::size_t{1}}) {
            const std::vector<Bit> bits = RandomBits(2 * pp * n + offset, 3);
            const Bit* b = bits.data() + offset;
            const RngStream noise = StreamAt(Substream::kNoise, start);
            std::vector<float> y(2 * n);
            std::vector<unsigned> label(2 * n);
            for (std::size_t t = 0; t < 2 * n; ++t) {
              unsigned l = 0;
              for (std::size_t k = 0; k < pp; ++k) l = 2 * l + b[pp * t + k];
              label[t] = l;
              y[t] = d.levels[l];
            }
            HWY_DYNAMIC_DISPATCH(AddNoiseOnTarget)(y.data(), 2 * n, sigma, noise.key(),
                                                   noise.counter());
            std::uint64_t expected = 0;
            for (std::size_t t = 0; t < 2 * n; ++t) {
              expected += static_cast<std::uint64_t>(
                  std::popcount(reference::QamAxisDecision(d, y[t]) ^ label[t]));
            }
            EXPECT_EQ(HWY_DYNAMIC_DISPATCH(QamAxisUnderTest)(b, n, d, sigma, noise.key(),
                                                             noise.counter()),
                      expected)
                << name << " n = " << n << " maxlog " << maxlog << " start " << start;
          }
        }
      }
    }
  }
}

// The public 64-/256-QAM count against the chain's composed path:
// Mapper::Map, AwgnChannel::AddNoise, then Demapper::HardDecide (hard) or
// Demapper::Demap + LlrToBits (max-log), errors counted bit by bit; at an
// Eb/N0 with many errors and with the stream position after the call.
void ExpectQamAxisPublicPathAgrees() {
  for (const char* name : {"64qam", "256qam"}) {
    const Mapper mapper = Mapper::Create(ParseModulation(name).value()).value();
    const int m = mapper.bits_per_symbol();
    const auto mm = static_cast<std::size_t>(m);
    NoiseSpec spec;
    spec.ebno_db = m == 6 ? 10.0 : 14.0;  // BER of order 1e-2 (Cho and Yoon, 2002; from memory)
    spec.bits_per_symbol = m;
    const AwgnChannel channel(spec);
    const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
    for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
      const Demapper demapper = Demapper::Create(mapper, method).value();
      const QamAxisDecider d =
          MakeQamAxisDecider(m / 2, mapper.pam_levels().data(),
                             demapper.kernel_args().level_scale, channel.n0(),
                             method == DemapMethod::kMaxLog);
      for (std::size_t n : {std::size_t{1}, std::size_t{37}, std::size_t{640}, std::size_t{4001}}) {
        const std::vector<Bit> bits = RandomBits(mm * n, 6);
        RngStream a = StreamAt(Substream::kNoise, 11), b = a;
        std::vector<cf32> symbols(n);
        mapper.Map(bits, symbols);
        channel.AddNoise(symbols, a);
        std::vector<Bit> decided(mm * n);
        if (method == DemapMethod::kHard) {
          demapper.HardDecide(symbols, decided);
        } else {
          std::vector<float> llrs(mm * n);
          demapper.Demap(symbols, channel.n0(), llrs);
          LlrToBits(llrs, decided);
        }
        std::uint64_t expected = 0;
        for (std::size_t i = 0; i < mm * n; ++i) {
          expected += static_cast<std::uint64_t>(bits[i] ^ decided[i]);
        }
        EXPECT_EQ(CountQamAxisErrors(bits.data(), n, d, sigma, b), expected)
            << name << " n = " << n << " method " << ToString(method);
        EXPECT_EQ(a.block_index(), b.block_index());
        if (n == 4001) {
          EXPECT_GT(expected, 100u);  // a wrong decision rule cannot hide among few errors
        }
      }
    }
  }
}

TEST(ChannelLlrKernels, QamAxisCountEqualsComposedPathDispatchedAndScalar) {
  ExpectQamAxisPublicPathAgrees();
  const bool previous = ForceScalarKernels(true);
  ExpectQamAxisPublicPathAgrees();
  ForceScalarKernels(previous);
}

PskDecider PskDeciderOf(const Mapper& mapper, const Demapper& demapper, float n0, bool maxlog) {
  const DemapKernelArgs a = demapper.kernel_args();
  return MakePskDecider(mapper.bits_per_symbol(), mapper.points().data(), a.point_re, a.point_im,
                        a.boundary_cos, a.boundary_sin, n0, maxlog);
}

// 8-/16-PSK: the fused count against this target's noisy samples decided by
// the demapper oracle's operations (reference::PskDecision), hard and
// max-log, awkward lengths, misaligned bits, a wrapping stream.
TEST_P(ChannelLlrPerTarget, PskCountEqualsComposedPathOfTheSameTarget) {
  for (const char* name : {"8psk", "16psk"}) {
    const Mapper mapper = Mapper::Create(ParseModulation(name).value()).value();
    const Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
    const auto b = static_cast<std::size_t>(mapper.bits_per_symbol());
    const float sigma = b == 3 ? 0.15f : 0.08f;  // symbol errors of order 1e-2
    for (bool maxlog : {false, true}) {
      const PskDecider d = PskDeciderOf(mapper, demapper, 2 * sigma * sigma, maxlog);
      for (std::uint32_t start : {0u, 0xFFFFFFF0u}) {
        for (std::size_t n : AwkwardLengths()) {
          for (std::size_t offset : {std::size_t{0}, std::size_t{1}}) {
            const std::vector<Bit> bits = RandomBits(b * n + offset, 3);
            const Bit* bp = bits.data() + offset;
            const RngStream noise = StreamAt(Substream::kNoise, start);
            std::vector<float> y(2 * n);
            std::vector<unsigned> label(n);
            for (std::size_t s = 0; s < n; ++s) {
              unsigned l = 0;
              for (std::size_t k = 0; k < b; ++k) l = 2 * l + bp[b * s + k];
              label[s] = l;
              y[2 * s] = d.point_re[l];
              y[2 * s + 1] = d.point_im[l];
            }
            HWY_DYNAMIC_DISPATCH(AddNoiseOnTarget)(y.data(), 2 * n, sigma, noise.key(),
                                                   noise.counter());
            std::uint64_t expected = 0;
            for (std::size_t s = 0; s < n; ++s) {
              expected += static_cast<std::uint64_t>(
                  std::popcount(reference::PskDecision(d, y[2 * s], y[2 * s + 1]) ^ label[s]));
            }
            EXPECT_EQ(HWY_DYNAMIC_DISPATCH(PskUnderTest)(bp, n, d, sigma, noise.key(),
                                                         noise.counter()),
                      expected)
                << name << " n = " << n << " maxlog " << maxlog << " start " << start;
          }
        }
      }
    }
  }
}

// The public 8-/16-PSK count against the chain's composed path: Mapper::Map,
// AwgnChannel::AddNoise, then Demapper::HardDecide (hard) or Demapper::Demap
// + LlrToBits (max-log), errors counted bit by bit; at an Eb/N0 with many
// errors and with the stream position after the call.
void ExpectPskPublicPathAgrees() {
  for (const char* name : {"8psk", "16psk"}) {
    const Mapper mapper = Mapper::Create(ParseModulation(name).value()).value();
    const int m = mapper.bits_per_symbol();
    const auto mm = static_cast<std::size_t>(m);
    NoiseSpec spec;
    spec.ebno_db = m == 3 ? 7.0 : 11.0;  // BER of order 1e-2 (Proakis & Salehi, 5th ed., ch. 4; from memory)
    spec.bits_per_symbol = m;
    const AwgnChannel channel(spec);
    const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
    for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
      const Demapper demapper = Demapper::Create(mapper, method).value();
      const PskDecider d =
          PskDeciderOf(mapper, demapper, channel.n0(), method == DemapMethod::kMaxLog);
      for (std::size_t n : {std::size_t{1}, std::size_t{37}, std::size_t{640}, std::size_t{4001}}) {
        const std::vector<Bit> bits = RandomBits(mm * n, 6);
        RngStream a = StreamAt(Substream::kNoise, 11), b = a;
        std::vector<cf32> symbols(n);
        mapper.Map(bits, symbols);
        channel.AddNoise(symbols, a);
        std::vector<Bit> decided(mm * n);
        if (method == DemapMethod::kHard) {
          demapper.HardDecide(symbols, decided);
        } else {
          std::vector<float> llrs(mm * n);
          demapper.Demap(symbols, channel.n0(), llrs);
          LlrToBits(llrs, decided);
        }
        std::uint64_t expected = 0;
        for (std::size_t i = 0; i < mm * n; ++i) {
          expected += static_cast<std::uint64_t>(bits[i] ^ decided[i]);
        }
        EXPECT_EQ(CountPskErrors(bits.data(), n, d, sigma, b), expected)
            << name << " n = " << n << " method " << ToString(method);
        EXPECT_EQ(a.block_index(), b.block_index());
        if (n == 4001) {
          EXPECT_GT(expected, 100u);  // a wrong decision rule cannot hide among few errors
        }
      }
    }
  }
}

TEST(ChannelLlrKernels, PskCountEqualsComposedPathDispatchedAndScalar) {
  ExpectPskPublicPathAgrees();
  const bool previous = ForceScalarKernels(true);
  ExpectPskPublicPathAgrees();
  ForceScalarKernels(previous);
}

// The public 16-QAM count against the chain's composed path: Mapper::Map,
// AwgnChannel::AddNoise, then Demapper::HardDecide (hard) or
// Demapper::Demap + LlrToBits (max-log), errors counted bit by bit; at an
// Eb/N0 with many errors (so a wrong decision rule could not hide) and
// with the stream position after the call.
void ExpectQam16PublicPathAgrees() {
  const Mapper mapper = Mapper::Create(ParseModulation("16qam").value()).value();
  NoiseSpec spec;
  spec.ebno_db = 4.0;
  spec.bits_per_symbol = 4;
  const AwgnChannel channel(spec);
  const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
  for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
    const Demapper demapper = Demapper::Create(mapper, method).value();
    const Qam16Decider d =
        MakeQam16Decider(mapper.pam_levels().data(), demapper.kernel_args().level_scale,
                         channel.n0(), method == DemapMethod::kMaxLog);
    for (std::size_t n : {std::size_t{1}, std::size_t{37}, std::size_t{960}, std::size_t{4001}}) {
      const std::vector<Bit> bits = RandomBits(4 * n, 6);
      RngStream a = StreamAt(Substream::kNoise, 11), b = a;
      std::vector<cf32> symbols(n);
      mapper.Map(bits, symbols);
      channel.AddNoise(symbols, a);
      std::vector<Bit> decided(4 * n);
      if (method == DemapMethod::kHard) {
        demapper.HardDecide(symbols, decided);
      } else {
        std::vector<float> llrs(4 * n);
        demapper.Demap(symbols, channel.n0(), llrs);
        LlrToBits(llrs, decided);
      }
      std::uint64_t expected = 0;
      for (std::size_t i = 0; i < 4 * n; ++i) expected += static_cast<std::uint64_t>(bits[i] ^ decided[i]);
      EXPECT_EQ(CountQam16Errors(bits.data(), n, d, sigma, b), expected)
          << "n = " << n << " method " << ToString(method);
      EXPECT_EQ(a.block_index(), b.block_index());
      if (n == 4001) {
        EXPECT_GT(expected, 100u);  // a BER of ~1e-2 at 4 dB
      }
    }
  }
}

TEST(ChannelLlrKernels, Qam16CountEqualsComposedPathDispatchedAndScalar) {
  ExpectQam16PublicPathAgrees();
  const bool previous = ForceScalarKernels(true);
  ExpectQam16PublicPathAgrees();
  ForceScalarKernels(previous);
}

// The public entry points against the public composed path of the chain
// (sim/chain/chain.cc: x = 1 - 2 b, AwgnChannel::AddNoiseReal, 4 / N0 x for
// BPSK; Mapper::Map, AwgnChannel::AddNoise, Demapper::Demap for QPSK), on
// the dispatched target and with the scalar kernels forced, including the
// stream position after the call.
void ExpectPublicPathsAgree() {
  NoiseSpec spec;
  spec.ebno_db = 1.5;
  spec.code_rate = 0.5;
  spec.bits_per_symbol = 2;
  const AwgnChannel channel(spec);
  const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
  const Mapper mapper = Mapper::Create(ParseModulation("qpsk").value()).value();
  const Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
  const Points p = QpskPoints();
  for (std::size_t n : {std::size_t{1}, std::size_t{33}, std::size_t{1008}}) {
    const std::vector<Bit> bits = RandomBits(2 * n, 4);
    // QPSK.
    RngStream a = StreamAt(Substream::kNoise, 7), b = a;
    std::vector<cf32> symbols(n);
    mapper.Map(bits, symbols);
    channel.AddNoise(symbols, a);
    std::vector<float> expected(2 * n), llrs(2 * n);
    demapper.Demap(symbols, channel.n0(), expected);
    const float gain = 2.0f * std::numbers::sqrt2_v<float> * (1.0f / channel.n0());
    QpskChannelLlrs(bits.data(), n, p.re, p.im, sigma, gain, b, llrs.data());
    EXPECT_TRUE(SameFloats(expected, llrs.data(), 2 * n)) << "qpsk n = " << n;
    EXPECT_EQ(a.block_index(), b.block_index());
    // BPSK on the real axis (2 n bits).
    RngStream c = StreamAt(Substream::kNoise, 9), d = c;
    std::vector<float> x(2 * n);
    for (std::size_t i = 0; i < 2 * n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
    channel.AddNoiseReal(x, c);
    const float scale = 4.0f / channel.n0();
    for (float& v : x) v = scale * v;
    BpskChannelLlrs(bits.data(), 2 * n, sigma, scale, d, llrs.data());
    EXPECT_TRUE(SameFloats(x, llrs.data(), 2 * n)) << "bpsk n = " << n;
    EXPECT_EQ(c.block_index(), d.block_index());
  }
}

TEST(ChannelLlrKernels, PublicEntryPointsEqualComposedPathDispatched) {
  EXPECT_STREQ(kLlrTarget, kNoiseTarget);
  ExpectPublicPathsAgree();
}

TEST(ChannelLlrKernels, PublicEntryPointsEqualComposedPathForcedScalar) {
  const bool previous = ForceScalarKernels(true);
  ExpectPublicPathsAgree();
  EXPECT_STREQ(ChannelLlrKernelTarget(), "SCALAR");
  ForceScalarKernels(previous);
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
