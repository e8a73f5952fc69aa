// Tests of the fused BPSK hard-decision kernel (blocks/kernels/bpsk_kernels.h).
//
// This file is compiled once per Highway target (hwy/foreach_target.h, like
// bpsk_kernels.cc), so every target compiled into the library and supported
// by this CPU is checked against the composed path of the same target:
// GenerateRandomBits, x = 1 - 2 b, that target's AddRealNoise loop
// (NormalKernel), decision y < 0, error count. Counts must be identical, on
// awkward lengths, misaligned bit arrays, streams whose block index wraps
// inside a call, and, through prefix lengths, sample by sample. The public
// entry points are checked against the public composed path (dispatched and
// forced scalar) for counts and stream positions, and once against the
// closed-form BER.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <utility>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/bpsk_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/bpsk_kernels-inl.h"
// clang-format on

// ---------------------------------------------------------------------------
// Per-target entry points (compiled for every target).
HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {

std::uint64_t FusedBytesUnderTest(const Bit* bits, std::size_t n, float sigma, PhiloxKey key,
                                  const PhiloxCounter& counter) {
  return BpskHardErrorsKernel(bits, n, sigma, key, counter);
}

std::uint64_t FusedRandomUnderTest(std::size_t n, PhiloxKey bit_key,
                                   const PhiloxCounter& bit_counter, float sigma,
                                   PhiloxKey noise_key, const PhiloxCounter& noise_counter) {
  return BpskHardErrorsRandomKernel(n, bit_key, bit_counter, sigma, noise_key, noise_counter);
}

// The composed path's noise step on this target: x[i] += sigma z_i.
void AddNoiseUnderTest(float* x, std::size_t n, float sigma, PhiloxKey key,
                       const PhiloxCounter& counter) {
  NormalKernel(x, n, sigma, /*add=*/true, key, counter);
}

std::size_t GroupSamplesUnderTest() { return NoiseBatchSamples(); }

std::int64_t TargetUnderTest() { return HWY_TARGET; }

// Decision of one sample with a given normal z, both ways: `fused` and
// `fused_full` are the fused kernel's error tests of a group tail
// (bpsk_detail::ErrorsFirstN, one valid lane) and of a whole vector
// (bpsk_detail::Errors, every lane the same sample; true when all lanes
// count), `y` is the composed path's noisy sample (awgn_detail::NoisySample,
// the operation of AddRealNoise). Returns false on the one-lane SCALAR target,
// whose kernel is the oracle itself.
bool DecideOneSample(float z, Bit bit, float sigma, bool& fused, bool& fused_full, float& y) {
#if HWY_TARGET == HWY_SCALAR
  (void)z, (void)bit, (void)sigma, (void)fused, (void)fused_full, (void)y;
  return false;
#else
  namespace hn = hwy::HWY_NAMESPACE;
  const hn::ScalableTag<float> df;
  HWY_ALIGN Bit bs[hn::MaxLanes(df)];
  for (Bit& b : bs) b = bit;
  const auto vs = hn::Set(df, sigma);
  const auto vz = hn::Set(df, z);
  const auto one = bpsk_detail::MaskFromBytes(df, bs);
  fused = bpsk_detail::ErrorsFirstN(df, one, vz, vs, 1) == 1;
  fused_full = bpsk_detail::Errors(df, one, vz, vs) == hn::Lanes(df);
  const auto x = hn::Set(df, 1.0f - 2.0f * static_cast<float>(bit));
  y = hn::GetLane(awgn_detail::NoisySample(vs, vz, x));
  return true;
#endif
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include <boost/math/special_functions/erf.hpp>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/bpsk_kernels.h"
#include "blocks/kernels/bpsk_reference.h"
#include "blocks/source/bit_source.h"
#include "hwy/aligned_allocator.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(FusedBytesUnderTest);
HWY_EXPORT(FusedRandomUnderTest);
HWY_EXPORT(AddNoiseUnderTest);
HWY_EXPORT(GroupSamplesUnderTest);
HWY_EXPORT(TargetUnderTest);
HWY_EXPORT(DecideOneSample);

// The library picks its targets once, on first use. Make that happen at
// start-up, before any test below mocks the CPU's target list.
const char* const kNoiseTarget = NoiseKernelTarget();
const char* const kBpskTarget = BpskKernelTarget();

const PhiloxKey kKey = DeriveKey(20240602u, "bpsk_kernels_test");

RngStream StreamAt(Substream substream, std::uint32_t block_index, std::uint32_t unit = 5u) {
  RngStream s(kKey, /*point_index=*/3u, unit, substream);
  s.Advance(block_index);
  return s;
}

std::vector<Bit> RandomBits(std::size_t n, RngStream stream) {
  std::vector<Bit> bits(n);
  GenerateRandomBits(bits, stream);
  return bits;
}

// Error indicator of every sample of the composed path on the target under
// test (the per-target loop of AddRealNoise), noise from `noise`.
std::vector<Bit> ComposedErrorsOnTarget(const std::vector<Bit>& bits, float sigma,
                                        const RngStream& noise) {
  std::vector<float> x(bits.size());
  for (std::size_t i = 0; i < bits.size(); ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
  HWY_DYNAMIC_DISPATCH(AddNoiseUnderTest)(x.data(), x.size(), sigma, noise.key(), noise.counter());
  std::vector<Bit> errors(bits.size());
  for (std::size_t i = 0; i < bits.size(); ++i) {
    errors[i] = static_cast<Bit>(static_cast<Bit>(x[i] < 0.0f) ^ bits[i]);
  }
  return errors;
}

std::uint64_t Sum(const std::vector<Bit>& v, std::size_t n) {
  std::uint64_t s = 0;
  for (std::size_t i = 0; i < n; ++i) s += v[i];
  return s;
}

// sigma = 0.8: a BER of Q(1.25) = 0.106, so a length-100001 run has ~10^4
// errors and every short one a few.
constexpr float kSigma = 0.8f;

std::vector<std::size_t> AwkwardLengths(std::size_t group) {
  return {1,   2,   3,   7,    group - 1, group, group + 1,      2 * group - 1, 2 * group + 1,
          127, 128, 129, 4095, 4096,      4097,  2 * 4096 + 129, 100001};
}

// ---------------------------------------------------------------------------
// Every compiled target against the composed path of the same target.
class BpskKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(BpskKernelPerTarget);

TEST_P(BpskKernelPerTarget, DispatchReachesTheTargetUnderTest) {
  EXPECT_EQ(HWY_DYNAMIC_DISPATCH(TargetUnderTest)(), GetParam());
}

// Bits one per byte, at offsets 0..3 from a 64-byte boundary; noise streams
// starting at block 5 and just below 2^32 (the block index wraps inside the
// call and must wrap exactly like RngStream's).
TEST_P(BpskKernelPerTarget, ByteBitsCountEqualsComposedPathOnAwkwardLengths) {
  const std::size_t group = HWY_DYNAMIC_DISPATCH(GroupSamplesUnderTest)();
  ASSERT_GE(group, 4u);
  auto buffer = hwy::AllocateAligned<Bit>(100001 + 64);
  for (std::uint32_t start : {5u, 0xFFFFFFFFu - 9u}) {
    for (std::size_t n : AwkwardLengths(group)) {
      const std::vector<Bit> bits = RandomBits(n, StreamAt(Substream::kBits, 0, 7u));
      const RngStream noise = StreamAt(Substream::kNoise, start);
      const std::uint64_t want = Sum(ComposedErrorsOnTarget(bits, kSigma, noise), n);
      for (std::size_t offset = 0; offset < 4; ++offset) {
        SCOPED_TRACE(testing::Message() << "n=" << n << " offset=" << offset << " start=" << start);
        Bit* b = buffer.get() + offset;
        std::copy(bits.begin(), bits.end(), b);
        EXPECT_EQ(
            HWY_DYNAMIC_DISPATCH(FusedBytesUnderTest)(b, n, kSigma, noise.key(), noise.counter()),
            want);
      }
      if (n > 1000) {
        EXPECT_GT(want, n / 20) << "the comparison must see many errors";
      }
    }
  }
}

// Random bits drawn inside the kernel: the same counts as GenerateRandomBits
// on the bit stream followed by the composed path, across the kernel's
// 4096-bit chunks and 128-bit Philox blocks, with both streams' block indices
// wrapping inside a call.
TEST_P(BpskKernelPerTarget, RandomBitsCountEqualsComposedPathOnAwkwardLengths) {
  const std::size_t group = HWY_DYNAMIC_DISPATCH(GroupSamplesUnderTest)();
  for (std::uint32_t start : {5u, 0xFFFFFFFFu - 9u}) {
    for (std::size_t n : AwkwardLengths(group)) {
      SCOPED_TRACE(testing::Message() << "n=" << n << " start=" << start);
      const RngStream bit_stream = StreamAt(Substream::kBits, start);
      const RngStream noise = StreamAt(Substream::kNoise, start);
      const std::vector<Bit> bits = RandomBits(n, bit_stream);
      const std::uint64_t want = Sum(ComposedErrorsOnTarget(bits, kSigma, noise), n);
      EXPECT_EQ(
          HWY_DYNAMIC_DISPATCH(FusedRandomUnderTest)(n, bit_stream.key(), bit_stream.counter(),
                                                     kSigma, noise.key(), noise.counter()),
          want);
    }
  }
}

// Sample by sample: z_i does not depend on the call length, so the fused count
// of every prefix n' must equal the composed error indicators summed up to n'.
// Covers several groups, the first 128-bit block boundaries, and both bit
// layouts; at this BER a wrong bit, a wrong sample or an off-by-one decision
// shows within a few samples.
TEST_P(BpskKernelPerTarget, EveryPrefixCountEqualsComposedPath) {
  const std::size_t group = HWY_DYNAMIC_DISPATCH(GroupSamplesUnderTest)();
  const std::size_t n = std::max<std::size_t>(3 * group + 5, 300);
  const RngStream bit_stream = StreamAt(Substream::kBits, 11u);
  const RngStream noise = StreamAt(Substream::kNoise, 40u);
  const std::vector<Bit> bits = RandomBits(n, bit_stream);
  const std::vector<Bit> errors = ComposedErrorsOnTarget(bits, kSigma, noise);
  ASSERT_GT(Sum(errors, n), 10u);
  for (std::size_t len = 0; len <= n; ++len) {
    const std::uint64_t want = Sum(errors, len);
    ASSERT_EQ(HWY_DYNAMIC_DISPATCH(FusedBytesUnderTest)(bits.data(), len, kSigma, noise.key(),
                                                        noise.counter()),
              want)
        << "bytes, length " << len;
    ASSERT_EQ(
        HWY_DYNAMIC_DISPATCH(FusedRandomUnderTest)(len, bit_stream.key(), bit_stream.counter(),
                                                   kSigma, noise.key(), noise.counter()),
        want)
        << "random, length " << len;
  }
}

// The decision rule at and around the threshold, with hand-picked normals.
// sigma = 0.5: y = x + sigma z is exactly 0 for z = -2 x (decided bit 0, so
// an error for bit 1 only), and one float step either side. Several other
// sigmas: the 64 floats nearest to z = -+1 / sigma, among which are samples
// whose sign depends on how x + sigma z is rounded (one rounding with FMA, two
// without), so a fused kernel computing y with other float operations than
// AddRealNoise would disagree on some of them (found by mutation). Also far
// tails and z = +-0. The fused tests (tail and whole vector) must agree with
// "composed sample y, then y < 0" on each.
TEST_P(BpskKernelPerTarget, DecisionAtThresholdMatchesComposedSample) {
  std::vector<std::pair<float, float>> cases;  // (sigma, z)
  for (float z : {2.0f, -2.0f, std::nextafter(2.0f, 0.0f), std::nextafter(2.0f, 4.0f),
                  std::nextafter(-2.0f, 0.0f), std::nextafter(-2.0f, -4.0f), 0.0f, -0.0f, 9.4f,
                  -9.4f, 1e-30f, -1e-30f}) {
    cases.emplace_back(0.5f, z);
  }
  // Cases where one rounding and two roundings decide differently (computed
  // exactly in double: a float product has at most 48 significant bits).
  std::size_t rounding_decided = 0;
  for (float sigma : {0.7f, 0.3f, 0.61f, 0.9f, 1.3f}) {
    for (float side : {-1.0f, 1.0f}) {
      float z = side / sigma;
      for (int k = 0; k < 32; ++k) z = std::nextafter(z, 0.0f);
      for (int k = 0; k < 64; ++k, z = std::nextafter(z, 2.0f * side / sigma)) {
        cases.emplace_back(sigma, z);
        const double exact = static_cast<double>(sigma) * static_cast<double>(z);
        const double rounded = static_cast<double>(sigma * z);
        const double x = -static_cast<double>(side);
        if ((x + exact < 0.0) != (x + rounded < 0.0)) ++rounding_decided;
      }
    }
  }
  ASSERT_GT(rounding_decided, 0u);
  for (const auto& [sigma, z] : cases) {
    for (Bit bit : {Bit{0}, Bit{1}}) {
      bool fused = false, fused_full = false;
      float y = 0.0f;
      if (!HWY_DYNAMIC_DISPATCH(DecideOneSample)(z, bit, sigma, fused, fused_full, y)) {
        GTEST_SKIP() << "one-lane target: its kernel is the reference itself";
      }
      const bool composed = (y < 0.0f) != (bit == 1);
      EXPECT_EQ(fused, composed) << "sigma=" << sigma << " z=" << z << " bit=" << int{bit};
      EXPECT_EQ(fused_full, composed) << "sigma=" << sigma << " z=" << z << " bit=" << int{bit};
    }
  }
  // y = 0 exactly is decided as bit 0 (y < 0 is false).
  bool fused = false, fused_full = false;
  float y = 1.0f;
  if (HWY_DYNAMIC_DISPATCH(DecideOneSample)(2.0f, Bit{1}, 0.5f, fused, fused_full, y)) {
    EXPECT_EQ(y, 0.0f);
    EXPECT_TRUE(fused);
    EXPECT_TRUE(fused_full);
  }
}

// ---------------------------------------------------------------------------
// The scalar oracle.

// It is the composed scalar path: reference::AddRealNoise, then decisions.
TEST(BpskReference, EqualsComposedScalarPathAndAdvancesLikeIt) {
  for (std::size_t n : {0u, 1u, 2u, 3u, 127u, 128u, 129u, 1001u}) {
    const RngStream bit_stream = StreamAt(Substream::kBits, 9u);
    const std::vector<Bit> bits = RandomBits(n, bit_stream);
    std::vector<float> x(n);
    for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
    RngStream composed_noise = StreamAt(Substream::kNoise, 2u);
    reference::AddRealNoise(x, kSigma, composed_noise);
    std::uint64_t want = 0;
    for (std::size_t i = 0; i < n; ++i)
      want += static_cast<Bit>(static_cast<Bit>(x[i] < 0.0f) ^ bits[i]);

    RngStream noise = StreamAt(Substream::kNoise, 2u);
    EXPECT_EQ(reference::CountBpskHardErrors(bits, kSigma, noise), want) << n;
    EXPECT_EQ(noise.counter(), composed_noise.counter()) << n;

    RngStream bits_again = bit_stream;
    RngStream noise_again = StreamAt(Substream::kNoise, 2u);
    EXPECT_EQ(reference::CountBpskHardErrorsOfRandomBits(n, bits_again, kSigma, noise_again), want)
        << n;
    EXPECT_EQ(bits_again.block_index(), bit_stream.block_index() + (n + 127) / 128) << n;
    EXPECT_EQ(noise_again.counter(), composed_noise.counter()) << n;
  }
}

// ---------------------------------------------------------------------------
// Public entry points.

TEST(BpskKernels, DispatchesToTheNoiseKernelsTarget) {
  EXPECT_STREQ(kBpskTarget, kNoiseTarget);
  EXPECT_STREQ(BpskKernelTarget(), NoiseKernelTarget());
  const bool before = ForceScalarKernels(true);
  EXPECT_STREQ(BpskKernelTarget(), "SCALAR");
  ForceScalarKernels(before);
}

// Public composed path (GenerateRandomBits, x = 1 - 2 b, AddRealNoise,
// y < 0) against both entry points, dispatched and forced scalar: equal counts
// and equal stream positions afterwards.
TEST(BpskKernels, PublicEntryPointsEqualComposedPathAndAdvanceStreamsAlike) {
  for (bool scalar : {false, true}) {
    const bool before = ForceScalarKernels(scalar);
    for (std::size_t n : {0u, 1u, 2u, 3u, 127u, 128u, 129u, 3840u, 4097u, 10001u}) {
      SCOPED_TRACE(testing::Message() << "n=" << n << " scalar=" << scalar);
      RngStream composed_bits = StreamAt(Substream::kBits, 1u, 8u);
      RngStream composed_noise = StreamAt(Substream::kNoise, 1u, 8u);
      std::vector<Bit> bits(n);
      GenerateRandomBits(bits, composed_bits);
      std::vector<float> x(n);
      for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
      AddRealNoise(x, kSigma, composed_noise);
      std::uint64_t want = 0;
      for (std::size_t i = 0; i < n; ++i)
        want += static_cast<Bit>(static_cast<Bit>(x[i] < 0.0f) ^ bits[i]);

      RngStream noise = StreamAt(Substream::kNoise, 1u, 8u);
      EXPECT_EQ(CountBpskHardErrors(bits, kSigma, noise), want);
      EXPECT_EQ(noise.counter(), composed_noise.counter());

      RngStream bit_stream = StreamAt(Substream::kBits, 1u, 8u);
      RngStream noise2 = StreamAt(Substream::kNoise, 1u, 8u);
      EXPECT_EQ(CountBpskHardErrorsOfRandomBits(n, bit_stream, kSigma, noise2), want);
      EXPECT_EQ(bit_stream.counter(), composed_bits.counter());
      EXPECT_EQ(noise2.counter(), composed_noise.counter());
    }
    ForceScalarKernels(before);
  }
}

// Consecutive calls continue both streams: two calls of 4096 + 1001 bits give
// the count of one call of 5097 bits.
TEST(BpskKernels, ConsecutiveCallsContinueBothStreams) {
  RngStream bits_whole = StreamAt(Substream::kBits, 0u),
            noise_whole = StreamAt(Substream::kNoise, 0u);
  RngStream bits_parts = StreamAt(Substream::kBits, 0u),
            noise_parts = StreamAt(Substream::kNoise, 0u);
  const std::uint64_t whole =
      CountBpskHardErrorsOfRandomBits(5097, bits_whole, kSigma, noise_whole);
  std::uint64_t parts = CountBpskHardErrorsOfRandomBits(4096, bits_parts, kSigma, noise_parts);
  parts += CountBpskHardErrorsOfRandomBits(1001, bits_parts, kSigma, noise_parts);
  EXPECT_EQ(parts, whole);
  EXPECT_EQ(bits_parts.counter(), bits_whole.counter());
  EXPECT_EQ(noise_parts.counter(), noise_whole.counter());
}

// Uncoded BPSK in AWGN: Pb = Q(sqrt(2 Eb/N0)) = 1.2501e-2 at 4 dB (Proakis &
// Salehi, Digital Communications, 5th ed., ch. 4; value evaluated with
// scipy.special.erfc), sigma = sqrt(N0 / 2) = sqrt(1 / (2 Eb/N0)). n = 2^17
// bits: expected 1638.5 errors, binomial sd 40.2; band +-4.5 sd (two-sided
// probability ~7e-6 for a correct kernel; normal approximation).
TEST(BpskKernels, BerMatchesClosedFormAt4dB) {
  const double ebno = std::pow(10.0, 0.4);
  const double p = 0.5 * boost::math::erfc(std::sqrt(2.0 * ebno) / std::sqrt(2.0));
  ASSERT_NEAR(p, 1.2501e-2, 1e-6);
  const auto sigma = static_cast<float>(std::sqrt(1.0 / (2.0 * ebno)));
  const std::size_t frame = 4096, frames = 32;  // 2^17 bits
  std::uint64_t errors = 0;
  for (std::uint32_t f = 0; f < frames; ++f) {
    RngStream bits(DeriveKey(4u, "ber"), 0u, f, Substream::kBits);
    RngStream noise(DeriveKey(4u, "ber"), 0u, f, Substream::kNoise);
    errors += CountBpskHardErrorsOfRandomBits(frame, bits, sigma, noise);
  }
  const double n = static_cast<double>(frame * frames);
  EXPECT_NEAR(static_cast<double>(errors), n * p, 4.5 * std::sqrt(n * p * (1.0 - p)));
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
