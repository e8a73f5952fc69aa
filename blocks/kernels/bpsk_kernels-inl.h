// Per-target body of the fused BPSK hard-decision kernel declared in
// bpsk_kernels.h. Included once per instruction-set target by
// bpsk_kernels.cc (through hwy/foreach_target.h) and, the same way, by the
// per-target tests, which call capgap::HWY_NAMESPACE::BpskHardErrorsKernel
// directly. bpsk_reference.h is the oracle.
//
// The normals come from awgn_detail::ForEachNormalGroup of awgn_kernels-inl.h,
// the loop AddRealNoise runs, and each noisy sample is
// awgn_detail::NoisySample(sigma, z_i, x_i), the operation AddRealNoise
// applies: so y_i is bit for bit the sample the composed chain (bits -> +-1 ->
// AddRealNoise -> y < 0) would decide on, on every target and for every
// length (tails included). Per vector of Lanes(float) samples the bits become
// a lane mask (bit 1 <=> true), x = +-1 is a select on that mask, y = MulAdd,
// the decision y < 0 is a compare, errors are the XOR of the two masks and
// are counted with CountTrue (a mask-register popcount on AVX3, a movemask
// and popcount on AVX2/SSE4): nothing but the bits is read and nothing is
// written to memory.
//
// Bits:
//  * given, one per byte (BpskHardErrorsKernel; e.g. a PRBS frame):
//    Lanes(float) bytes are loaded, zero-extended to 32-bit lanes and tested
//    against zero;
//  * random (BpskHardErrorsRandomKernel): drawn here from the bit stream by
//    bit_source.h's rule with awgn_detail::PhiloxBlockWords (the noise
//    kernel's vector Philox; one block per 128 bits, 1/64 of the noise's
//    blocks), 4096 bits at a time into a 512-byte buffer, and read as packed
//    words, bit i = (words[i / 32] >> (i % 32)) & 1: the Lanes(float) <= 32
//    bits of a vector lie in one word (vectors start at multiples of
//    Lanes(float), a power of two), which is broadcast and tested against
//    each lane's bit (1 << lane). Faster than GenerateRandomBits (a scalar
//    Philox per block plus one byte per bit): docs/performance_notes.md,
//    "Fused BPSK chain".

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_kernels-inl.h"
#include "blocks/kernels/bpsk_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {

#if HWY_TARGET != HWY_SCALAR

namespace bpsk_detail {

// Errors among the Lanes(df) samples with normals z whose bits are `one`
// (true <=> bit 1): x = one ? -1 : +1, y = NoisySample(sigma, z, x), decided
// bit = (y < 0).
template <class DF>
HWY_INLINE std::size_t Errors(DF df, hn::Mask<DF> one, hn::Vec<DF> z, hn::Vec<DF> sigma) {
  const auto x = hn::IfThenElse(one, hn::Set(df, -1.0f), hn::Set(df, 1.0f));
  const auto y = awgn_detail::NoisySample(sigma, z, x);
  return hn::CountTrue(df, hn::Xor(hn::Lt(y, hn::Zero(df)), one));
}

// As Errors, counting only the first `valid` lanes (tails).
template <class DF>
HWY_INLINE std::size_t ErrorsFirstN(DF df, hn::Mask<DF> one, hn::Vec<DF> z, hn::Vec<DF> sigma,
                                    std::size_t valid) {
  const auto x = hn::IfThenElse(one, hn::Set(df, -1.0f), hn::Set(df, 1.0f));
  const auto y = awgn_detail::NoisySample(sigma, z, x);
  const auto err = hn::And(hn::Xor(hn::Lt(y, hn::Zero(df)), one), hn::FirstN(df, valid));
  return hn::CountTrue(df, err);
}

// Bits i .. i + Lanes(df) - 1, one per byte, as a lane mask.
template <class DF>
HWY_INLINE hn::Mask<DF> MaskFromBytes(DF df, const Bit* HWY_RESTRICT bits) {
  const hn::RebindToUnsigned<DF> du;
  const hn::Rebind<std::uint8_t, DF> d8;
  const auto b = hn::PromoteTo(du, hn::LoadU(d8, bits));
  return hn::RebindMask(df, hn::Ne(b, hn::Zero(du)));
}

// Bits i .. i + Lanes(df) - 1 from packed words, as a lane mask; lanes from
// `valid` on may be anything (and their words are not read).
// REQUIRES: i is a multiple of Lanes(df); 0 < valid <= Lanes(df).
template <class DF>
HWY_INLINE hn::Mask<DF> MaskFromWords(DF df, const std::uint32_t* HWY_RESTRICT words, std::size_t i,
                                      std::size_t valid) {
  if constexpr (hn::MaxLanes(DF()) <= 32) {
    // Lanes(df) is a power of two <= 32, so the bits lie in words[i / 32].
    const hn::RebindToUnsigned<DF> du;
    const auto lane_bit = hn::Set(du, 1u) << hn::Iota(du, 0);  // 1 << lane
    (void)valid;
    const std::uint32_t w = words[i / 32] >> (i % 32);
    return hn::RebindMask(df, hn::TestBit(hn::Set(du, w), lane_bit));
  } else {
    // Wider vectors (not on x86): spread the bits to bytes first.
    HWY_ALIGN Bit buf[hn::MaxLanes(DF())] = {};
    for (std::size_t k = 0; k < valid; ++k) {
      buf[k] = static_cast<Bit>((words[(i + k) / 32] >> ((i + k) % 32)) & 1u);
    }
    return MaskFromBytes(df, buf);
  }
}

// Sums the errors of each group; the bits are given by MaskSource, one of the
// two below.
template <class DF, class MaskSource>
struct ErrorSink {
  DF df;
  float sigma;  // a scalar: sizeless vector types cannot be members on every target
  MaskSource source;
  std::size_t errors = 0;

  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) {
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    // Four independent counts, summed once: shorter dependency chains.
    const std::size_t e0 = Errors(df, source.Get(df, i), s0, vs);
    const std::size_t e1 = Errors(df, source.Get(df, i + lanes), s1, vs);
    const std::size_t e2 = Errors(df, source.Get(df, i + 2 * lanes), s2, vs);
    const std::size_t e3 = Errors(df, source.Get(df, i + 3 * lanes), s3, vs);
    errors += (e0 + e1) + (e2 + e3);
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) {
    const std::size_t lanes = hn::Lanes(df);
    TailVector(i, count, s0);
    if (count > lanes) TailVector(i + lanes, count - lanes, s1);
    if (count > 2 * lanes) TailVector(i + 2 * lanes, count - 2 * lanes, s2);
    if (count > 3 * lanes) TailVector(i + 3 * lanes, count - 3 * lanes, s3);
  }
  // Samples i .. i + min(left, Lanes) - 1 of the tail; left > 0.
  HWY_INLINE void TailVector(std::size_t i, std::size_t left, hn::Vec<DF> z) {
    const std::size_t lanes = hn::Lanes(df);
    const std::size_t valid = left < lanes ? left : lanes;
    errors += ErrorsFirstN(df, source.GetPartial(df, i, valid), z, hn::Set(df, sigma), valid);
  }
};

struct ByteBits {
  const Bit* HWY_RESTRICT bits;
  template <class DF>
  HWY_INLINE hn::Mask<DF> Get(DF df, std::size_t i) const {
    return MaskFromBytes(df, bits + i);
  }
  // Only `valid` bytes may be read: copy them to a zero-padded buffer.
  template <class DF>
  HWY_INLINE hn::Mask<DF> GetPartial(DF df, std::size_t i, std::size_t valid) const {
    HWY_ALIGN Bit buf[hn::MaxLanes(DF())] = {};
    for (std::size_t k = 0; k < valid; ++k) buf[k] = bits[i + k];
    return MaskFromBytes(df, buf);
  }
};

struct WordBits {
  const std::uint32_t* HWY_RESTRICT words;
  template <class DF>
  HWY_INLINE hn::Mask<DF> Get(DF df, std::size_t i) const {
    return MaskFromWords(df, words, i, hn::Lanes(df));
  }
  template <class DF>
  HWY_INLINE hn::Mask<DF> GetPartial(DF df, std::size_t i, std::size_t valid) const {
    return MaskFromWords(df, words, i, valid);
  }
};

template <class MaskSource>
HWY_NOINLINE std::uint64_t BpskLoop(MaskSource source, std::size_t n, float sigma, PhiloxKey key,
                                    const PhiloxCounter& counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  ErrorSink<DF, MaskSource> sink{df, sigma, source};
  awgn_detail::ForEachNormalGroup(df, n, key, counter, sink);
  return sink.errors;
}

// Random bits: chunks of kRandomChunkBits bits (32 Philox blocks of the bit
// stream, a multiple of every target's group size) are drawn with the noise
// kernel's vector Philox into a 512-byte buffer that stays in L1 and are then
// consumed as packed words. Chunking changes no sample: every y_i is the same
// vector operation wherever it falls (ForEachNormalGroup), and consecutive
// chunks continue both streams exactly.
constexpr std::size_t kRandomChunkBits = 4096;

inline HWY_NOINLINE std::uint64_t BpskRandomLoop(std::size_t n, PhiloxKey bit_key,
                                                 const PhiloxCounter& bit_counter, float sigma,
                                                 PhiloxKey noise_key,
                                                 const PhiloxCounter& noise_counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  static_assert(kRandomChunkBits % (4 * hn::MaxLanes(DF())) == 0 && kRandomChunkBits % 128 == 0);
  awgn_detail::PhiloxSchedule bit_schedule;
  awgn_detail::MakeSchedule(df, bit_key, bit_counter, bit_schedule);
  HWY_ALIGN std::uint32_t words[kRandomChunkBits / 32];
  std::uint32_t bit_block = bit_counter[0];
  PhiloxCounter noise_at = noise_counter;
  std::uint64_t errors = 0;
  for (std::size_t done = 0; done < n; done += kRandomChunkBits) {
    const std::size_t m = n - done < kRandomChunkBits ? n - done : kRandomChunkBits;
    const std::size_t blocks = (m + 127) / 128;
    awgn_detail::PhiloxBlockWords(df, bit_schedule, bit_block, blocks, words);
    bit_block += static_cast<std::uint32_t>(blocks);
    ErrorSink<DF, WordBits> sink{df, sigma, WordBits{words}};
    awgn_detail::ForEachNormalGroup(df, m, noise_key, noise_at, sink);
    errors += sink.errors;
    noise_at[0] += static_cast<std::uint32_t>(m / 2);  // m is even unless it is the last chunk
  }
  return errors;
}

}  // namespace bpsk_detail

#endif  // HWY_TARGET != HWY_SCALAR

// Bit errors of hard decisions on y_i = (1 - 2 b_i) + sigma z_i, i < n, with
// bits[i] = b_i (one per byte, 0 or 1) and z_i normal i of the stream at
// (key, counter). Does not advance any stream: the caller advances the noise
// stream by ceil(n / 2) blocks.
// REQUIRES: ceil(n / 2) <= 2^32 - 1; bits are 0 or 1.
HWY_MAYBE_UNUSED inline std::uint64_t BpskHardErrorsKernel(const Bit* HWY_RESTRICT bits,
                                                           std::size_t n, float sigma,
                                                           PhiloxKey key,
                                                           const PhiloxCounter& counter) {
  CAPGAP_DCHECK((n + 1) / 2 <= std::size_t{0xFFFFFFFFu});
  if (n == 0) return 0;
#if HWY_TARGET == HWY_SCALAR
  // One-lane target: the noise kernel runs the oracle here, so does this one.
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  return reference::CountBpskHardErrors(std::span<const Bit>(bits, n), sigma, stream);
#else
  return bpsk_detail::BpskLoop(bpsk_detail::ByteBits{bits}, n, sigma, key, counter);
#endif
}

// The same for the n random bits GenerateRandomBits would draw from the bit
// stream at (bit_key, bit_counter), generated here (bit_source.h's rule: block
// j supplies bits 128 j .. 128 j + 127, bit i = (word[(i % 128) / 32] >> (i %
// 32)) & 1). Does not advance any stream: the caller advances the bit stream
// by ceil(n / 128) blocks and the noise stream by ceil(n / 2).
// REQUIRES: ceil(n / 2) <= 2^32 - 1.
HWY_MAYBE_UNUSED inline std::uint64_t BpskHardErrorsRandomKernel(
    std::size_t n, PhiloxKey bit_key, const PhiloxCounter& bit_counter, float sigma,
    PhiloxKey noise_key, const PhiloxCounter& noise_counter) {
  CAPGAP_DCHECK((n + 1) / 2 <= std::size_t{0xFFFFFFFFu});
  if (n == 0) return 0;
#if HWY_TARGET == HWY_SCALAR
  RngStream bits(bit_key, bit_counter[3], bit_counter[2], static_cast<Substream>(bit_counter[1]));
  bits.Advance(bit_counter[0]);
  RngStream noise(noise_key, noise_counter[3], noise_counter[2],
                  static_cast<Substream>(noise_counter[1]));
  noise.Advance(noise_counter[0]);
  return reference::CountBpskHardErrorsOfRandomBits(n, bits, sigma, noise);
#else
  return bpsk_detail::BpskRandomLoop(n, bit_key, bit_counter, sigma, noise_key, noise_counter);
#endif
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
