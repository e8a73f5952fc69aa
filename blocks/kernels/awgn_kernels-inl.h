// Per-target body of the Gaussian noise kernels declared in awgn_kernels.h.
// Included once per instruction-set target by awgn_kernels.cc (through
// hwy/foreach_target.h) and, the same way, by the per-target tests, which call
// capgap::HWY_NAMESPACE::NormalKernel directly. Implements exactly the
// block-to-sample mapping of awgn_kernels.h; awgn_reference.h is the oracle.
//
// Shared with the fused BPSK kernel (bpsk_kernels-inl.h includes this file),
// so that there is one copy of Philox, log and sincos: the Philox and
// Box-Muller helpers, the sample loop ForEachNormalGroup (FillStandardNormal
// and AddRealNoise are two of its sinks), the noisy-sample operation
// NoisySample, and PhiloxBlockWords (all four words of consecutive blocks, for
// random bits drawn in a kernel).
//
// Tails. The last partial group is generated whole and its first samples are
// used, with the same vector operations as a full group. Before the fused
// BPSK kernel the add tail was the scalar x += sigma z, which GCC contracts to
// one FMA on the AVX2/AVX3 targets and leaves as multiply-then-add on
// SSE4/SSSE3, i.e. the per-target MulAdd semantics now written out: every
// sample of lengths 1..399 (fill and add) and of 3840, 3841, 4999 hashed
// identically before and after on every target, so no simulated number moved.
//
// Layout.
//  * Philox4x32-10 runs one block per lane with consecutive counters, in
//    64-bit lanes: each u64 lane holds one 32-bit Philox word in its low half.
//    The round needs the full 32x32->64 products M0 c0 and M1 c2; MulEven
//    (vpmuludq / pmuludq) reads exactly the low half of every u64 lane and
//    returns the whole product, so lo is the product's low half as is and hi
//    is one ShiftRight<32>. A round is then 2 MulEven + 2 shifts + 2 Xor3 per
//    vector and needs no shuffle or blend; with 32-bit lanes the even/odd
//    products would have to be split and re-merged every round (about twice
//    the work). The upper halves are left holding garbage: only MulEven and
//    the final packing read the words, and both ignore them.
//  * Only c0 differs between blocks of a stream (c1..c3 = substream, unit,
//    point), so the products of round 0 (M1 c2) and round 1 (M0 c0) are the
//    same for every lane and are folded, with the round keys, into scalars
//    computed once per call: rounds 0 and 1 cost one vector multiply each.
//  * Two u64 vectors (A, B) of Philox state are packed into one vector of u32
//    words (OddEven: A's words in even lanes, B's in odd ones), and the
//    Box-Muller transform runs in float lanes. Which block sits in which lane
//    is chosen so that InterleaveLower/Upper(z0, z1) (an in-block shuffle,
//    one instruction on x86) produce consecutive output samples directly; the
//    lane order is derived per call from the target's own interleave, so it is
//    right on every target.
// Unrolling. A Philox round is a serial chain (multiply, shift, xor: about
// 5-7 cycles on current x86), and the Box-Muller half of a batch is another
// long chain (polynomial, square root). The main loop therefore does two
// batches per iteration (kNoiseUnroll) and issues them interleaved: the four
// Philox state vectors round by round (eight independent multiply chains),
// then each Box-Muller stage for both batches in turn. The four state
// vectors take 16 registers, so the AVX2/SSE4 targets (16 registers) spill a
// little; a one-batch variant for them measured slower, so all targets share
// this loop. The loop is bound by vector-pipe throughput rather than latency,
// ~60% of its instructions Philox (per 8 blocks 18 multiplies, 18 shifts and
// 19 xors, the minimum for this layout). Measurements of this loop and of the
// variants tried: docs/performance_notes.md, "Gaussian noise kernel".
//
// Approximations (float; bounds of the polynomials in exact arithmetic with
// the float coefficients below, measured on a 2e6-point grid with numpy;
// coefficients fitted as relative-error minimax by Lawson-iterated weighted
// least squares):
//  * -2 ln(1 + f) = -2 f + f^2 A(f), A of degree 7, f in [sqrt(2)/2 - 1,
//    sqrt(2) - 1]: relative error <= 3.5e-8 (0.3 ulp); float evaluation
//    (Horner, FMA) adds < 0.6 ulp (simulated in numpy: total <= 0.8 ulp).
//  * sin(phi) = phi + phi^3 S(phi^2), S of degree 2, and
//    cos(phi) = 1 + phi^2 C(phi^2), C of degree 3, |phi| <= pi/4: relative
//    errors <= 8.4e-9 and <= 3.1e-9.
//  * The reductions are exact: the angle is split into quadrant and remainder
//    in integer arithmetic on w2, and the radius uniform is formed directly
//    as min(u1, 1 - u1) from the 64-bit integer, so ln u1 keeps full relative
//    accuracy as u1 -> 1 (r -> 0) as well as in the tail (u1 -> 2^-64).
//  The whole kernel agrees with the double reference within a few float ulps
//  relative to |z| (tested in tests/blocks/kernels/awgn_kernels_test.cc).

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

// Batches of 2 Lanes(float) samples done per main-loop iteration.
constexpr std::size_t kNoiseUnroll = 2;

#if HWY_TARGET != HWY_SCALAR

namespace awgn_detail {

// Philox4x32 constants (Salmon et al., SC'11); the same values as the scalar
// reference in blocks/core/rng_stream.cc, which the tests compare against.
constexpr std::uint32_t kM0 = 0xD2511F53u;
constexpr std::uint32_t kM1 = 0xCD9E8D57u;
constexpr std::uint32_t kW0 = 0x9E3779B9u;
constexpr std::uint32_t kW1 = 0xBB67AE85u;

constexpr std::size_t kMaxLanes64 = HWY_MAX_BYTES / sizeof(std::uint64_t);

// Everything a call needs besides the block index, as scalars (vectors cannot
// be struct members on every target); the loops broadcast them.
struct PhiloxSchedule {
  std::uint32_t k0[10], k1[10];  // round keys
  std::uint32_t r0_x;            // round 0: c3 ^ k1(0), xored into hi(M0 c0)
  std::uint32_t r1_x0;           // round 1: lo(M1 c2) ^ k0(1), xored into hi(M1 c2')
  std::uint32_t r1_x2;           // round 1: hi(M0 c0') ^ k1(1), xored into c3'
  std::uint32_t r2_x2;           // round 2: lo(M0 c0') ^ k1(2) (c3'' is uniform)
  // Block offset of each u64 lane of state vector A (feeds the even u32
  // lanes, see PackLow) and B (odd u32 lanes).
  HWY_ALIGN std::uint64_t off_a[kMaxLanes64];
  HWY_ALIGN std::uint64_t off_b[kMaxLanes64];
};

HWY_INLINE void MulHiLo(std::uint32_t m, std::uint32_t c, std::uint32_t& hi, std::uint32_t& lo) {
  const std::uint64_t p = static_cast<std::uint64_t>(m) * c;
  hi = static_cast<std::uint32_t>(p >> 32);
  lo = static_cast<std::uint32_t>(p);
}

template <class DF>
HWY_INLINE void MakeSchedule(DF df, PhiloxKey key, const PhiloxCounter& counter,
                             PhiloxSchedule& s) {
  for (int r = 0; r < 10; ++r) {
    s.k0[r] = key.k0 + static_cast<std::uint32_t>(r) * kW0;
    s.k1[r] = key.k1 + static_cast<std::uint32_t>(r) * kW1;
  }
  const std::uint32_t c1 = counter[1], c2 = counter[2], c3 = counter[3];
  // Round 0: hi/lo(M1 c2) is uniform, so the new c0 and c1 are uniform.
  std::uint32_t hi1, lo1;
  MulHiLo(kM1, c2, hi1, lo1);
  const std::uint32_t c0_r1 = hi1 ^ c1 ^ s.k0[0];
  s.r0_x = c3 ^ s.k1[0];
  // Round 1: hi/lo(M0 c0_r1) is uniform.
  std::uint32_t hi0, lo0;
  MulHiLo(kM0, c0_r1, hi0, lo0);
  s.r1_x0 = lo1 ^ s.k0[1];
  s.r1_x2 = hi0 ^ s.k1[1];
  s.r2_x2 = lo0 ^ s.k1[2];

  // Lane order: feed lane indices through the same interleave the store uses
  // and read back where each lane's (z0, z1) lands; lane l then takes block
  // (position of its z0) / 2 so that the stored samples come out in order.
  const hn::RebindToUnsigned<DF> du32;
  constexpr std::size_t kMaxL = hn::MaxLanes(DF());
  const std::size_t lanes = hn::Lanes(df);
  HWY_ALIGN std::uint32_t code[2 * kMaxL];
  const auto even = hn::ShiftLeft<1>(hn::Iota(du32, 0));  // 2l   = z0 of lane l
  const auto odd = hn::Add(even, hn::Set(du32, 1u));      // 2l+1 = z1 of lane l
  hn::Store(hn::InterleaveLower(du32, even, odd), du32, code);
  hn::Store(hn::InterleaveUpper(du32, even, odd), du32, code + lanes);
  std::uint32_t block_of_lane[kMaxL];
  for (std::size_t p = 0; p < 2 * lanes; p += 2) {
    CAPGAP_DCHECK(code[p] % 2 == 0 && code[p + 1] == code[p] + 1);
    block_of_lane[code[p] / 2] = static_cast<std::uint32_t>(p / 2);
  }
  for (std::size_t j = 0; j < lanes / 2; ++j) {  // PackLow's lane order
    s.off_a[j] = block_of_lane[2 * j];
    s.off_b[j] = block_of_lane[2 * j + 1];
  }
}

// Rounds 0-2 of one state vector (c1..c3 uniform at the start, see above).
template <class DU64, class VU32>
HWY_INLINE void FirstRounds(DU64 du64, const PhiloxSchedule& s, VU32 m0, VU32 m1, hn::Vec<DU64>& c0,
                            hn::Vec<DU64>& c1, hn::Vec<DU64>& c2, hn::Vec<DU64>& c3) {
  const hn::Repartition<std::uint32_t, DU64> du32;
  // Round 0: c2 = hi(M0 c0) ^ c3 ^ k1; c3 = lo(M0 c0); c0, c1 uniform.
  auto p0 = hn::MulEven(hn::BitCast(du32, c0), m0);
  c2 = hn::Xor(hn::ShiftRight<32>(p0), hn::Set(du64, s.r0_x));
  c3 = p0;
  // Round 1: c0 = hi(M1 c2) ^ c1 ^ k0; c2 = hi(M0 c0) ^ c3 ^ k1 (M0 c0 uniform).
  auto p1 = hn::MulEven(hn::BitCast(du32, c2), m1);
  c0 = hn::Xor(hn::ShiftRight<32>(p1), hn::Set(du64, s.r1_x0));
  c1 = p1;
  c2 = hn::Xor(c3, hn::Set(du64, s.r1_x2));
  // Round 2: c3 is uniform (lo of the uniform product), folded into r2_x2.
  p0 = hn::MulEven(hn::BitCast(du32, c0), m0);
  p1 = hn::MulEven(hn::BitCast(du32, c2), m1);
  c0 = hn::Xor3(hn::ShiftRight<32>(p1), c1, hn::Set(du64, s.k0[2]));
  c2 = hn::Xor(hn::ShiftRight<32>(p0), hn::Set(du64, s.r2_x2));
  c1 = p1;
  c3 = p0;
}

// The general Philox round on one state vector.
template <class DU64, class VU32>
HWY_INLINE void Round(DU64 du64, VU32 m0, VU32 m1, hn::Vec<DU64> k0, hn::Vec<DU64> k1,
                      hn::Vec<DU64>& c0, hn::Vec<DU64>& c1, hn::Vec<DU64>& c2, hn::Vec<DU64>& c3) {
  const hn::Repartition<std::uint32_t, DU64> du32;
  (void)du64;
  const auto p0 = hn::MulEven(hn::BitCast(du32, c0), m0);
  const auto p1 = hn::MulEven(hn::BitCast(du32, c2), m1);
  c0 = hn::Xor3(hn::ShiftRight<32>(p1), c1, k0);
  c2 = hn::Xor3(hn::ShiftRight<32>(p0), c3, k1);
  c1 = p1;
  c3 = p0;
}

// Low halves of the u64 lanes of a (even u32 lanes of the result) and b (odd
// lanes) as one u32 vector: a shift and a blend, both cheap in-lane
// operations (a cross-lane ConcatEven permute measured no faster).
template <class DU32, class VU64>
HWY_INLINE hn::Vec<DU32> PackLow(DU32 du32, VU64 a, VU64 b) {
  return hn::OddEven(hn::BitCast(du32, hn::ShiftLeft<32>(b)), hn::BitCast(du32, a));
}

// Philox4x32-10 for two batches at once: state vectors a, b (first batch) and
// c, d (second batch) advanced round by round together, so each round offers
// eight independent multiply chains. Returns words w0, w1, w2 of batch k in
// w0_k, w1_k, w2_k, packed to u32 lanes (w3 is not needed).
template <class DF>
HWY_INLINE void PhiloxTwoBatches(DF /*df*/, const PhiloxSchedule& s, std::uint32_t base0,
                                 std::uint32_t base1, hn::Vec<hn::RebindToUnsigned<DF>>& w0_0,
                                 hn::Vec<hn::RebindToUnsigned<DF>>& w1_0,
                                 hn::Vec<hn::RebindToUnsigned<DF>>& w2_0,
                                 hn::Vec<hn::RebindToUnsigned<DF>>& w0_1,
                                 hn::Vec<hn::RebindToUnsigned<DF>>& w1_1,
                                 hn::Vec<hn::RebindToUnsigned<DF>>& w2_1) {
  const hn::RebindToUnsigned<DF> du32;
  const hn::Repartition<std::uint64_t, DF> du64;
  const auto m0 = hn::Set(du32, kM0);
  const auto m1 = hn::Set(du32, kM1);
  const auto off_a = hn::Load(du64, s.off_a);
  const auto off_b = hn::Load(du64, s.off_b);
  // Only the low 32 bits of c0 matter, so the sums wrap modulo 2^32 exactly
  // like RngStream's block index.
  auto a0 = hn::Add(hn::Set(du64, base0), off_a), a1 = a0, a2 = a0, a3 = a0;
  auto b0 = hn::Add(hn::Set(du64, base0), off_b), b1 = b0, b2 = b0, b3 = b0;
  auto c0 = hn::Add(hn::Set(du64, base1), off_a), c1 = c0, c2 = c0, c3 = c0;
  auto d0 = hn::Add(hn::Set(du64, base1), off_b), d1 = d0, d2 = d0, d3 = d0;
  FirstRounds(du64, s, m0, m1, a0, a1, a2, a3);
  FirstRounds(du64, s, m0, m1, b0, b1, b2, b3);
  FirstRounds(du64, s, m0, m1, c0, c1, c2, c3);
  FirstRounds(du64, s, m0, m1, d0, d1, d2, d3);
  for (int r = 3; r < 10; ++r) {
    const auto k0 = hn::Set(du64, s.k0[r]);
    const auto k1 = hn::Set(du64, s.k1[r]);
    Round(du64, m0, m1, k0, k1, a0, a1, a2, a3);
    Round(du64, m0, m1, k0, k1, b0, b1, b2, b3);
    Round(du64, m0, m1, k0, k1, c0, c1, c2, c3);
    Round(du64, m0, m1, k0, k1, d0, d1, d2, d3);
  }
  w0_0 = PackLow(du32, a0, b0);
  w1_0 = PackLow(du32, a1, b1);
  w2_0 = PackLow(du32, a2, b2);
  w0_1 = PackLow(du32, c0, d0);
  w1_1 = PackLow(du32, c1, d1);
  w2_1 = PackLow(du32, c2, d2);
}

// All four words of Philox blocks base .. base + count - 1 of the stream
// whose schedule is s, in block order: out[4 k + w] = word w of block
// base + k (block indices wrap modulo 2^32 like RngStream's). For the random
// bits of the fused BPSK kernel (bpsk_kernels-inl.h), which need one block
// per 128 bits, 1/64 of the noise's blocks: two state vectors at a time, the
// words leave through a small aligned buffer.
template <class DF>
HWY_INLINE void PhiloxBlockWords(DF /*df*/, const PhiloxSchedule& s, std::uint32_t base,
                                 std::size_t count, std::uint32_t* HWY_RESTRICT out) {
  const hn::RebindToUnsigned<DF> du32;
  const hn::Repartition<std::uint64_t, DF> du64;
  const std::size_t lanes64 = hn::Lanes(du64);
  const auto m0 = hn::Set(du32, kM0);
  const auto m1 = hn::Set(du32, kM1);
  const auto iota = hn::Iota(du64, 0);
  HWY_ALIGN std::uint64_t words[8][kMaxLanes64];
  for (std::size_t k = 0; k < count; k += 2 * lanes64) {
    const std::uint32_t first = base + static_cast<std::uint32_t>(k);
    auto a0 = hn::Add(hn::Set(du64, first), iota), a1 = a0, a2 = a0, a3 = a0;
    auto b0 = hn::Add(a0, hn::Set(du64, static_cast<std::uint64_t>(lanes64)));
    auto b1 = b0, b2 = b0, b3 = b0;
    FirstRounds(du64, s, m0, m1, a0, a1, a2, a3);
    FirstRounds(du64, s, m0, m1, b0, b1, b2, b3);
    for (int r = 3; r < 10; ++r) {
      const auto k0 = hn::Set(du64, s.k0[r]);
      const auto k1 = hn::Set(du64, s.k1[r]);
      Round(du64, m0, m1, k0, k1, a0, a1, a2, a3);
      Round(du64, m0, m1, k0, k1, b0, b1, b2, b3);
    }
    hn::Store(a0, du64, words[0]);
    hn::Store(a1, du64, words[1]);
    hn::Store(a2, du64, words[2]);
    hn::Store(a3, du64, words[3]);
    hn::Store(b0, du64, words[4]);
    hn::Store(b1, du64, words[5]);
    hn::Store(b2, du64, words[6]);
    hn::Store(b3, du64, words[7]);
    const std::size_t todo = count - k < 2 * lanes64 ? count - k : 2 * lanes64;
    for (std::size_t j = 0; j < todo; ++j) {
      const std::size_t v = j < lanes64 ? 0 : 4;  // state vector a or b
      const std::size_t lane = j < lanes64 ? j : j - lanes64;
      for (std::size_t w = 0; w < 4; ++w) {
        // Each word is the low half of its u64 lane (the upper half is garbage).
        out[4 * (k + j) + w] = static_cast<std::uint32_t>(words[v + w][lane]);
      }
    }
  }
}

// yes where the sign bit of v is set, else no. Highway 1.0.3's
// IfNegativeThenElse relies on blendv reading only the sign bit, but its
// SSSE3 target (no blendv) selects with and/andnot, which needs all-ones
// lanes (found by the per-target test); broadcast the sign bit there first.
template <class V>
HWY_INLINE V IfSignBit(V v, V yes, V no) {
#if HWY_TARGET == HWY_SSSE3
  const hn::DFromV<V> d;
  const hn::RebindToSigned<decltype(d)> di;
  v = hn::BitCast(d, hn::BroadcastSignBit(hn::BitCast(di, v)));
#endif
  return hn::IfNegativeThenElse(v, yes, no);
}

// Box-Muller, first half: g = r^2 = -2 ln u1 from words w0, w1 (see the file
// comment for the error bound).
template <class DF>
HWY_INLINE hn::Vec<DF> RadiusSquared(DF df, hn::Vec<hn::RebindToUnsigned<DF>> w0,
                                     hn::Vec<hn::RebindToUnsigned<DF>> w1) {
  const hn::RebindToSigned<DF> di;
  const hn::RebindToUnsigned<DF> du;
  const auto one = hn::Set(df, 1.0f);
  // u1 = (x + 1/2) 2^-64, x = w1 2^32 + w0. With y = (u1 > 1/2) ? ~x : x,
  // t = (y + 1/2) 2^-64 = min(u1, 1 - u1), in (0, 1/2]; t is formed with two
  // roundings (< 1 ulp): y1 < 2^31 converts as a signed integer, y0 as
  // unsigned.
  const auto top = hn::BitCast(du, hn::BroadcastSignBit(hn::BitCast(di, w1)));
  const auto y1 = hn::Xor(w1, top);
  const auto y0 = hn::Xor(w0, top);
  const auto t_lo = hn::MulAdd(hn::ConvertTo(df, y0), hn::Set(df, 0x1p-64f), hn::Set(df, 0x1p-65f));
  const auto t = hn::MulAdd(hn::ConvertTo(df, hn::BitCast(di, y1)), hn::Set(df, 0x1p-32f), t_lo);
  // ln u1 = e ln 2 + ln(1 + f) with 1 + f in [sqrt(2)/2, sqrt(2)]:
  //  u1 = t      : t = 2^e (1 + f) from the float's exponent and mantissa;
  //  u1 = 1 - t  : t <= 1 - sqrt(2)/2: e = 0, f = -t (exact);
  //                otherwise        : e = -1, f = 1 - 2t (exact, Sterbenz).
  const auto tb = hn::Add(hn::BitCast(di, t), hn::Set(di, 0x3F800000 - 0x3F3504F3));
  const auto e_low =
      hn::ConvertTo(df, hn::Sub(hn::ShiftRight<23>(tb), hn::Set(di, 127)));  // tb > 0
  const auto m_low =
      hn::BitCast(df, hn::Add(hn::And(tb, hn::Set(di, 0x7FFFFF)), hn::Set(di, 0x3F3504F3)));
  const auto f_low = hn::Sub(m_low, one);
  const auto big = hn::Gt(t, hn::Set(df, 0.29289321881345247560f));  // 1-sqrt(2)/2
  const auto f_high = hn::IfThenElse(big, hn::NegMulAdd(hn::Set(df, 2.0f), t, one), hn::Neg(t));
  const auto e_high = hn::IfThenElseZero(big, hn::Set(df, -1.0f));
  const auto top_f = hn::BitCast(df, w1);  // sign bit set <=> u1 > 1/2
  const auto f = IfSignBit(top_f, f_high, f_low);
  const auto e = IfSignBit(top_f, e_high, e_low);
  // -2 ln(1 + f) = -2 f + f^2 A(f).
  auto a = hn::Set(df, -0.174696937f);
  a = hn::MulAdd(a, f, hn::Set(df, 0.286150515f));
  a = hn::MulAdd(a, f, hn::Set(df, -0.298359483f));
  a = hn::MulAdd(a, f, hn::Set(df, 0.33141014f));
  a = hn::MulAdd(a, f, hn::Set(df, -0.399241447f));
  a = hn::MulAdd(a, f, hn::Set(df, 0.500035107f));
  a = hn::MulAdd(a, f, hn::Set(df, -0.666679025f));
  a = hn::MulAdd(a, f, hn::Set(df, 0.999999821f));
  const auto minus2_log1p = hn::MulAdd(hn::Mul(f, f), a, hn::Mul(hn::Set(df, -2.0f), f));
  // g >= ~5e-20 > 0: its square root is never 0 and never NaN.
  return hn::MulAdd(e, hn::Set(df, -1.38629436111989061883f), minus2_log1p);
}

// Box-Muller, second half: (cos, sin) of 2 pi u2 from word w2.
template <class DF>
HWY_INLINE void CosSinTurn(DF df, hn::Vec<hn::RebindToUnsigned<DF>> w2, hn::Vec<DF>& cos_theta,
                           hn::Vec<DF>& sin_theta) {
  const hn::RebindToSigned<DF> di;
  const hn::RebindToUnsigned<DF> du;
  // 2 pi u2 = q pi/2 + phi, split exactly in integers: qb = w2 + 2^29 carries
  // the quadrant q in its bits 31..30, and the low 30 bits of w2,
  // sign-extended, are d in [-2^29, 2^29), phi = pi (2d + 1) 2^-32.
  const auto qb = hn::Add(w2, hn::Set(du, 1u << 29));
  const auto two_d_plus_1 =
      hn::Or(hn::ShiftRight<1>(hn::BitCast(di, hn::ShiftLeft<2>(w2))), hn::Set(di, 1));
  const auto phi = hn::Mul(hn::ConvertTo(df, two_d_plus_1),
                           hn::Set(df, static_cast<float>(3.14159265358979323846 * 0x1p-32)));
  const auto p2 = hn::Mul(phi, phi);
  auto sp = hn::MulAdd(hn::Set(df, -0.000195152825f), p2, hn::Set(df, 0.0083321603f));
  sp = hn::MulAdd(sp, p2, hn::Set(df, -0.166666552f));
  const auto sin_phi = hn::MulAdd(hn::Mul(phi, p2), sp, phi);
  auto cp = hn::MulAdd(hn::Set(df, 2.43835657e-05f), p2, hn::Set(df, -0.0013886682f));
  cp = hn::MulAdd(cp, p2, hn::Set(df, 0.0416666195f));
  cp = hn::MulAdd(cp, p2, hn::Set(df, -0.5f));
  const auto cos_phi = hn::MulAdd(p2, cp, hn::Set(df, 1.0f));
  // q odd: cos and sin swap; cos is negative for q = 1, 2, sin for q = 2, 3.
  const auto swap = hn::BitCast(df, hn::ShiftLeft<1>(qb));  // sign = bit 30
  const auto sign_bit = hn::Set(du, 0x80000000u);
  const auto sin_sign = hn::BitCast(df, hn::And(qb, sign_bit));
  const auto cos_sign = hn::BitCast(df, hn::And(hn::Add(qb, hn::Set(du, 1u << 30)), sign_bit));
  cos_theta = hn::Xor(IfSignBit(swap, sin_phi, cos_phi), cos_sign);
  sin_theta = hn::Xor(IfSignBit(swap, cos_phi, sin_phi), sin_sign);
}

// Two batches: blocks base .. base + 2 Lanes(df) - 1, returned as 4 Lanes(df)
// consecutive samples s0..s3. The two halves of the Box-Muller transform are
// issued for both batches in turn so that their serial chains overlap.
template <class DF>
HWY_INLINE void TwoBatches(DF df, const PhiloxSchedule& s, std::uint32_t base, hn::Vec<DF>& s0,
                           hn::Vec<DF>& s1, hn::Vec<DF>& s2, hn::Vec<DF>& s3) {
  hn::Vec<hn::RebindToUnsigned<DF>> w0a, w1a, w2a, w0b, w1b, w2b;
  const auto base_b = base + static_cast<std::uint32_t>(hn::Lanes(df));
  PhiloxTwoBatches(df, s, base, base_b, w0a, w1a, w2a, w0b, w1b, w2b);
  const auto ga = RadiusSquared(df, w0a, w1a);
  const auto gb = RadiusSquared(df, w0b, w1b);
  const auto ra = hn::Sqrt(ga);
  const auto rb = hn::Sqrt(gb);
  hn::Vec<DF> ca, sa, cb, sb;
  CosSinTurn(df, w2a, ca, sa);
  CosSinTurn(df, w2b, cb, sb);
  const auto z0a = hn::Mul(ra, ca), z1a = hn::Mul(ra, sa);
  const auto z0b = hn::Mul(rb, cb), z1b = hn::Mul(rb, sb);
  s0 = hn::InterleaveLower(df, z0a, z1a);
  s1 = hn::InterleaveUpper(df, z0a, z1a);
  s2 = hn::InterleaveLower(df, z0b, z1b);
  s3 = hn::InterleaveUpper(df, z0b, z1b);
}

// The one noisy-sample operation of every target: x + sigma z as
// MulAdd(sigma, z, x), i.e. one rounding where the target has FMA (AVX2,
// AVX3) and a rounded product plus a rounded sum where it has not (SSE4,
// SSSE3: Highway emulates MulAdd). AddRealNoise and the fused BPSK kernel of
// bpsk_kernels-inl.h both go through it, on whole groups and tails alike, so
// their samples are bit-identical on each target.
template <class V>
HWY_INLINE V NoisySample(V sigma, V z, V x) {
  return hn::MulAdd(sigma, z, x);
}

// The loop shared by every kernel that consumes the normals of a stream in
// order (awgn_kernels.h mapping). Groups of G = 4 Lanes(df) consecutive
// normals (two batches, NoiseBatchSamples()) are generated in registers and
// handed to the sink:
//   sink.Full(i, s0, s1, s2, s3)         for each group i, i + G <= n: normals
//                                        i .. i + G - 1, Lanes(df) per vector;
//   sink.Tail(i, count, s0, s1, s2, s3)  once if G does not divide n: the last
//                                        count = n - i < G normals are the
//                                        first count lanes of s0..s3.
// The tail's extra blocks are evaluated but not consumed: the caller advances
// the stream by ceil(n / 2) blocks only. Sinks are structs (not lambdas) so
// that their members are compiled for this target like everything else
// between HWY_BEFORE_NAMESPACE and HWY_AFTER_NAMESPACE.
template <class DF, class Sink>
HWY_INLINE void ForEachNormalGroup(DF df, std::size_t n, PhiloxKey key,
                                   const PhiloxCounter& counter, Sink& sink) {
  PhiloxSchedule s;
  MakeSchedule(df, key, counter, s);
  const std::size_t lanes = hn::Lanes(df);
  const std::size_t step = 4 * lanes;  // samples per iteration (two batches)
  std::uint32_t base = counter[0];
  std::size_t i = 0;
  for (; i + step <= n; i += step) {
    hn::Vec<DF> s0, s1, s2, s3;
    TwoBatches(df, s, base, s0, s1, s2, s3);
    base += static_cast<std::uint32_t>(2 * lanes);
    sink.Full(i, s0, s1, s2, s3);
  }
  if (i < n) {
    hn::Vec<DF> s0, s1, s2, s3;
    TwoBatches(df, s, base, s0, s1, s2, s3);
    sink.Tail(i, n - i, s0, s1, s2, s3);
  }
}

// x[i] = z_i.
template <class DF>
struct FillSink {
  DF df;
  float* HWY_RESTRICT x;
  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    hn::StoreU(s0, df, x + i);
    hn::StoreU(s1, df, x + i + lanes);
    hn::StoreU(s2, df, x + i + 2 * lanes);
    hn::StoreU(s3, df, x + i + 3 * lanes);
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    HWY_ALIGN float buf[4 * hn::MaxLanes(DF())];
    hn::Store(s0, df, buf);
    hn::Store(s1, df, buf + lanes);
    hn::Store(s2, df, buf + 2 * lanes);
    hn::Store(s3, df, buf + 3 * lanes);
    for (std::size_t k = 0; k < count; ++k) x[i + k] = buf[k];
  }
};

// x[i] = NoisySample(sigma, z_i, x[i]).
template <class DF>
struct AddSink {
  DF df;
  float sigma;  // a scalar: sizeless vector types cannot be members on every target
  float* HWY_RESTRICT x;
  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    float* HWY_RESTRICT p = x + i;
    hn::StoreU(NoisySample(vs, s0, hn::LoadU(df, p)), df, p);
    hn::StoreU(NoisySample(vs, s1, hn::LoadU(df, p + lanes)), df, p + lanes);
    hn::StoreU(NoisySample(vs, s2, hn::LoadU(df, p + 2 * lanes)), df, p + 2 * lanes);
    hn::StoreU(NoisySample(vs, s3, hn::LoadU(df, p + 3 * lanes)), df, p + 3 * lanes);
  }
  // The same vector operation as Full on a zero-padded copy of the last
  // count samples (a scalar x + sigma z here would be contracted to FMA or
  // not at the compiler's discretion).
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    HWY_ALIGN float buf[4 * hn::MaxLanes(DF())] = {};
    for (std::size_t k = 0; k < count; ++k) buf[k] = x[i + k];
    hn::Store(NoisySample(vs, s0, hn::Load(df, buf)), df, buf);
    hn::Store(NoisySample(vs, s1, hn::Load(df, buf + lanes)), df, buf + lanes);
    hn::Store(NoisySample(vs, s2, hn::Load(df, buf + 2 * lanes)), df, buf + 2 * lanes);
    hn::Store(NoisySample(vs, s3, hn::Load(df, buf + 3 * lanes)), df, buf + 3 * lanes);
    for (std::size_t k = 0; k < count; ++k) x[i + k] = buf[k];
  }
};

template <bool kAdd>
HWY_NOINLINE void NormalLoop(float* HWY_RESTRICT x, std::size_t n, float sigma, PhiloxKey key,
                             const PhiloxCounter& counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  if constexpr (kAdd) {
    AddSink<DF> sink{df, sigma, x};
    ForEachNormalGroup(df, n, key, counter, sink);
  } else {
    (void)sigma;
    FillSink<DF> sink{df, x};
    ForEachNormalGroup(df, n, key, counter, sink);
  }
}

}  // namespace awgn_detail

#endif  // HWY_TARGET != HWY_SCALAR

// Samples per main-loop iteration (batches of 2 Lanes(float) samples times
// kNoiseUnroll); the tests use it to pick awkward lengths.
HWY_MAYBE_UNUSED inline std::size_t NoiseBatchSamples() {
  return 2 * hn::Lanes(hn::ScalableTag<float>()) * kNoiseUnroll;
}

// x[i] = z_i (add == false) or x[i] += sigma z_i (add == true) for
// i < n, where z_i is normal i of the stream positioned at (key, counter) per
// the mapping of awgn_kernels.h. Does not advance any stream: the caller
// advances by ceil(n / 2) blocks.
// REQUIRES: ceil(n / 2) <= 2^32 - 1.
HWY_MAYBE_UNUSED inline void NormalKernel(float* HWY_RESTRICT x, std::size_t n, float sigma,
                                          bool add, PhiloxKey key, const PhiloxCounter& counter) {
  CAPGAP_DCHECK((n + 1) / 2 <= std::size_t{0xFFFFFFFFu});
  if (n == 0) return;
#if HWY_TARGET == HWY_SCALAR
  // One-lane target: no room for the two-lane Philox layout; use the oracle.
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  if (add) {
    reference::AddRealNoise(std::span<float>(x, n), sigma, stream);
  } else {
    reference::FillStandardNormal(std::span<float>(x, n), stream);
  }
#else
  if (add) {
    awgn_detail::NormalLoop<true>(x, n, sigma, key, counter);
  } else {
    awgn_detail::NormalLoop<false>(x, n, sigma, key, counter);
  }
#endif
}

// The HWY_TARGET this copy was compiled for (lets the dispatcher name it).
HWY_MAYBE_UNUSED inline std::int64_t NoiseKernelCompiledTarget() { return HWY_TARGET; }

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
