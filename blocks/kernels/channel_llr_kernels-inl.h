// Per-target body of the fused channel-LLR kernels declared in
// channel_llr_kernels.h. Included once per instruction-set target by
// channel_llr_kernels.cc (through hwy/foreach_target.h) and, the same way, by
// the per-target test. channel_llr_reference.h is the oracle.
//
// The normals come from awgn_detail::ForEachNormalGroup, the loop of
// AddRealNoise / AddComplexNoise, and each noisy sample is
// awgn_detail::NoisySample(sigma, z, x), the operation those apply; the LLR
// is one multiply (the compiler may not contract it: channel_llr_kernels.cc
// is compiled with -ffp-contract=off, like the demap kernels). Per vector of
// Lanes(float) real samples i .. i + Lanes - 1:
//  * BPSK: the Lanes bytes of the bits, zero-extended, give x = +-1 by a
//    select, as the fused hard-decision kernel does;
//  * QPSK: sample i is Re (even lane) or Im (odd lane) of symbol i / 2, and
//    the bytes of a symbol, b0 and b1, sit in the same lane pair, so DupEven
//    / DupOdd of the zero-extended bytes give every lane its symbol's b0 and
//    b1; x is a select among the four points' (Re, Im) lane pairs, and the
//    LLRs (b0 from Im, b1 from Re) are the noisy samples with the two lanes
//    of each pair swapped (Reverse2), times the gain. Lanes is even on every
//    target with vectors, so pairs never straddle vectors.
//  * 64-/256-QAM error count: the p label bits of each axis sample are
//    gathered into one u32 per lane by a scalar pass (p = 3 does not align
//    with any vector layout), x is a select among the 2^p levels, and the
//    decision repeats the demapper oracle's slicer or metrics lane by lane.
// Tails: the last partial group goes through the same vector operations on a
// zero-padded copy of its bits; only `count` outputs are written.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_KERNELS_INL_H_
#endif

#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_kernels-inl.h"
#include "blocks/kernels/channel_llr_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {

#if HWY_TARGET != HWY_SCALAR

namespace channel_llr_detail {

// Which symbol shape a sink forms.
struct BpskShape {
  float scale;
  template <class DF>
  HWY_INLINE hn::Vec<DF> Llrs(DF df, const Bit* HWY_RESTRICT bits, hn::Vec<DF> z,
                              hn::Vec<DF> sigma) const {
    const hn::RebindToUnsigned<DF> du;
    const hn::Rebind<std::uint8_t, DF> d8;
    const auto b = hn::PromoteTo(du, hn::LoadU(d8, bits));
    const auto one = hn::RebindMask(df, hn::Ne(b, hn::Zero(du)));
    const auto x = hn::IfThenElse(one, hn::Set(df, -1.0f), hn::Set(df, 1.0f));
    return hn::Mul(hn::Set(df, scale), awgn_detail::NoisySample(sigma, z, x));
  }
};

struct QpskShape {
  float re[4], im[4];
  float gain;
  template <class DF>
  HWY_INLINE hn::Vec<DF> Llrs(DF df, const Bit* HWY_RESTRICT bits, hn::Vec<DF> z,
                              hn::Vec<DF> sigma) const {
    const hn::RebindToUnsigned<DF> du;
    const hn::Rebind<std::uint8_t, DF> d8;
    const auto b = hn::And(hn::PromoteTo(du, hn::LoadU(d8, bits)), hn::Set(du, 1u));
    const auto b0 = hn::RebindMask(df, hn::Ne(hn::DupEven(b), hn::Zero(du)));
    const auto b1 = hn::RebindMask(df, hn::Ne(hn::DupOdd(b), hn::Zero(du)));
    // Point of label l as (Re, Im) in each (even, odd) lane pair.
    const auto p0 = hn::OddEven(hn::Set(df, im[0]), hn::Set(df, re[0]));
    const auto p1 = hn::OddEven(hn::Set(df, im[1]), hn::Set(df, re[1]));
    const auto p2 = hn::OddEven(hn::Set(df, im[2]), hn::Set(df, re[2]));
    const auto p3 = hn::OddEven(hn::Set(df, im[3]), hn::Set(df, re[3]));
    const auto x = hn::IfThenElse(b0, hn::IfThenElse(b1, p3, p2), hn::IfThenElse(b1, p1, p0));
    const auto y = awgn_detail::NoisySample(sigma, z, x);
    return hn::Mul(hn::Set(df, gain), hn::Reverse2(df, y));
  }
};

// llrs[i] for every real sample i of the stream's normals.
template <class DF, class Shape>
struct LlrSink {
  DF df;
  float sigma;  // scalars: sizeless vector types cannot be members on every target
  Shape shape;
  const Bit* HWY_RESTRICT bits;
  float* HWY_RESTRICT llrs;

  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    hn::StoreU(shape.Llrs(df, bits + i, s0, vs), df, llrs + i);
    hn::StoreU(shape.Llrs(df, bits + i + lanes, s1, vs), df, llrs + i + lanes);
    hn::StoreU(shape.Llrs(df, bits + i + 2 * lanes, s2, vs), df, llrs + i + 2 * lanes);
    hn::StoreU(shape.Llrs(df, bits + i + 3 * lanes, s3, vs), df, llrs + i + 3 * lanes);
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) const {
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    HWY_ALIGN Bit b[4 * hn::MaxLanes(DF())] = {};
    HWY_ALIGN float out[4 * hn::MaxLanes(DF())];
    for (std::size_t k = 0; k < count; ++k) b[k] = bits[i + k];
    hn::Store(shape.Llrs(df, b, s0, vs), df, out);
    hn::Store(shape.Llrs(df, b + lanes, s1, vs), df, out + lanes);
    hn::Store(shape.Llrs(df, b + 2 * lanes, s2, vs), df, out + 2 * lanes);
    hn::Store(shape.Llrs(df, b + 3 * lanes, s3, vs), df, out + 3 * lanes);
    for (std::size_t k = 0; k < count; ++k) llrs[i + k] = out[k];
  }
};

template <class Shape>
HWY_NOINLINE void LlrLoop(const Shape& shape, const Bit* HWY_RESTRICT bits, std::size_t n,
                          float sigma, PhiloxKey key, const PhiloxCounter& counter,
                          float* HWY_RESTRICT llrs) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  LlrSink<DF, Shape> sink{df, sigma, shape, bits, llrs};
  awgn_detail::ForEachNormalGroup(df, n, key, counter, sink);
}

// 16-QAM errors of Lanes(df) axis samples from 2 Lanes(df) bytes of bits:
// the byte pair of sample t read as one 16-bit lane (low byte bits[2t] =
// the label's MSB, high byte its LSB; every Highway target is
// little-endian), x by a select among the four levels, y = NoisySample,
// then the demapper's decision operations; the per-lane error counts (0..2)
// are added to `acc`. `valid`: lanes from valid on count nothing.
template <class DF>
HWY_INLINE void Qam16Errors(DF df, const Qam16Decider& d, const Bit* HWY_RESTRICT bits,
                            hn::Vec<DF> z, hn::Vec<DF> sigma, std::size_t valid,
                            hn::Vec<hn::RebindToUnsigned<DF>>& acc) {
  const hn::RebindToUnsigned<DF> du;
  const hn::Rebind<std::uint16_t, DF> d16;
  const hn::Repartition<std::uint8_t, decltype(d16)> d8;
  const auto pair = hn::PromoteTo(du, hn::BitCast(d16, hn::LoadU(d8, bits)));
  const auto hi = hn::And(pair, hn::Set(du, 1u));
  const auto lo = hn::And(hn::ShiftRight<8>(pair), hn::Set(du, 1u));
  const auto mhi = hn::RebindMask(df, hn::Ne(hi, hn::Zero(du)));
  const auto mlo = hn::RebindMask(df, hn::Ne(lo, hn::Zero(du)));
  const auto x = hn::IfThenElse(mhi, hn::IfThenElse(mlo, hn::Set(df, d.levels[3]), hn::Set(df, d.levels[2])),
                                hn::IfThenElse(mlo, hn::Set(df, d.levels[1]), hn::Set(df, d.levels[0])));
  const auto y = awgn_detail::NoisySample(sigma, z, x);
  hn::Mask<DF> dhi, dlo;
  const auto zero = hn::Zero(df);
  if (d.maxlog) {
    const auto two_s = hn::Set(df, d.two_s);
    const auto l0 = hn::Sub(hn::Mul(hn::Set(df, d.ka), y),
                            hn::Mul(hn::Set(df, d.kb),
                                    hn::Sub(hn::Abs(hn::Add(y, two_s)), hn::Abs(hn::Sub(y, two_s)))));
    const auto l1 = hn::Sub(hn::Mul(hn::Set(df, d.kc), hn::Abs(y)), hn::Set(df, d.kd));
    dhi = hn::Lt(l0, zero);
    dlo = hn::Lt(l1, zero);
  } else {
    const auto u = hn::Mul(hn::Set(df, d.inv_s), y);
    dhi = hn::Lt(u, zero);
    dlo = hn::Xor(hn::Lt(u, hn::Set(df, 2.0f)), hn::Lt(u, hn::Set(df, -2.0f)));
  }
  const auto first = hn::FirstN(df, valid);
  const auto ehi = hn::And(hn::Xor(dhi, mhi), first);
  const auto elo = hn::And(hn::Xor(dlo, mlo), first);
  const auto one = hn::Set(du, 1u);
  acc = hn::Add(acc, hn::IfThenElseZero(hn::RebindMask(du, ehi), one));
  acc = hn::Add(acc, hn::IfThenElseZero(hn::RebindMask(du, elo), one));
}

template <class DF>
struct Qam16Sink {
  DF df;
  float sigma;
  Qam16Decider d;
  const Bit* HWY_RESTRICT bits;
  std::uint64_t errors = 0;

  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    auto acc = hn::Zero(du);
    Qam16Errors(df, d, bits + 2 * i, s0, vs, lanes, acc);
    Qam16Errors(df, d, bits + 2 * (i + lanes), s1, vs, lanes, acc);
    Qam16Errors(df, d, bits + 2 * (i + 2 * lanes), s2, vs, lanes, acc);
    Qam16Errors(df, d, bits + 2 * (i + 3 * lanes), s3, vs, lanes, acc);
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    const auto vs = hn::Set(df, sigma);
    HWY_ALIGN Bit b[8 * hn::MaxLanes(DF())] = {};
    for (std::size_t k = 0; k < 2 * count; ++k) b[k] = bits[2 * i + k];
    auto acc = hn::Zero(du);
    const hn::Vec<DF> s[4] = {s0, s1, s2, s3};
    for (std::size_t v = 0; v < 4 && v * lanes < count; ++v) {
      const std::size_t left = count - v * lanes;
      Qam16Errors(df, d, b + 2 * v * lanes, s[v], vs, left < lanes ? left : lanes, acc);
    }
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
};

inline HWY_NOINLINE std::uint64_t Qam16Loop(const Qam16Decider& d, const Bit* HWY_RESTRICT bits,
                                            std::size_t n_symbols, float sigma, PhiloxKey key,
                                            const PhiloxCounter& counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  Qam16Sink<DF> sink{df, sigma, d, bits};
  awgn_detail::ForEachNormalGroup(df, 2 * n_symbols, key, counter, sink);
  return sink.errors;
}

// 64-/256-QAM (p = 3, 4 bits per axis): the errors of `valid` axis samples
// with labels `lab` (one per u32 lane), noise z. The same float operations
// per lane as reference::QamAxisDecision; labels and decisions are integers
// in u32 lanes. The level is one table lookup (a lane permute) when the 2^p
// levels fit in a vector, else a select per level.
template <int kP, class DF>
HWY_INLINE void QamAxisErrors(DF df, const QamAxisDecider& d,
                              hn::Vec<hn::RebindToUnsigned<DF>> lab, hn::Vec<DF> z,
                              hn::Vec<DF> sigma, std::size_t valid,
                              hn::Vec<hn::RebindToUnsigned<DF>>& acc) {
  constexpr int kLevels = 1 << kP;
  const hn::RebindToUnsigned<DF> du;
  hn::Vec<DF> x;
  if constexpr (kLevels <= hn::MaxLanes(DF())) {
    x = hn::TableLookupLanes(hn::LoadU(df, d.levels), hn::IndicesFromVec(df, lab));
  } else {
    x = hn::Set(df, d.levels[0]);
    for (int l = 1; l < kLevels; ++l) {
      const auto is_l = hn::Eq(lab, hn::Set(du, static_cast<std::uint32_t>(l)));
      x = hn::IfThenElse(hn::RebindMask(df, is_l), hn::Set(df, d.levels[l]), x);
    }
  }
  const auto y = awgn_detail::NoisySample(sigma, z, x);
  const auto zero = hn::Zero(df);
  const auto one = hn::Set(du, 1u);
  hn::Vec<decltype(du)> dec;
  if (!d.maxlog) {
    const auto u = hn::Mul(hn::Set(df, d.inv_s), y);
    auto j = hn::Zero(du);
    for (int i = 0; i < kLevels - 1; ++i) {
      const auto below = hn::Lt(u, hn::Set(df, static_cast<float>(kLevels - 2 - 2 * i)));
      j = hn::Add(j, hn::IfThenElseZero(hn::RebindMask(du, below), one));
    }
    dec = hn::Xor(j, hn::ShiftRight<1>(j));
  } else {
    const auto u2 = hn::Mul(hn::Set(df, d.two_inv_s), y);
    hn::Vec<DF> e[kLevels];
    for (int j = 0; j < kLevels; ++j) {
      const auto c = static_cast<float>(kLevels - 1 - 2 * j);
      e[j ^ (j >> 1)] = hn::Sub(hn::Set(df, c * c), hn::Mul(hn::Set(df, c), u2));
    }
    const auto scale = hn::Set(df, d.scale);
    const auto inf = hn::Set(df, std::numeric_limits<float>::infinity());
    dec = hn::Zero(du);
    for (int k = 0; k < kP; ++k) {
      auto m0 = inf, m1 = inf;
      for (int l = 0; l < kLevels; ++l) {
        if ((l >> (kP - 1 - k)) & 1) {
          m1 = hn::Min(m1, e[l]);
        } else {
          m0 = hn::Min(m0, e[l]);
        }
      }
      const auto neg = hn::Lt(hn::Mul(hn::Sub(m1, m0), scale), zero);
      dec = hn::Add(hn::Add(dec, dec), hn::IfThenElseZero(hn::RebindMask(du, neg), one));
    }
  }
  auto diff = hn::Xor(dec, lab);
  auto count = hn::And(diff, one);
  for (int k = 1; k < kP; ++k) {
    diff = hn::ShiftRight<1>(diff);
    count = hn::Add(count, hn::And(diff, one));
  }
  acc = hn::Add(acc, hn::IfThenElseZero(hn::RebindMask(du, hn::FirstN(df, valid)), count));
}

// Labels of `count` consecutive axis samples whose bits start at b (p bytes
// each, 0/1, MSB first) into out. p = 4 (count a multiple of Lanes): the four
// bytes of a sample are one u32 lane (little-endian: the MSB bit in the low
// byte), combined by shifts; p = 3 fits no vector layout: a scalar pass over
// the whole group at once (one pass per vector measured a third slower).
template <int kP, class DF>
HWY_INLINE void QamAxisLabels(DF df, const Bit* HWY_RESTRICT b, std::size_t count,
                              std::uint32_t* HWY_RESTRICT out) {
  const hn::RebindToUnsigned<DF> du;
  if constexpr (kP == 4) {
    const hn::Repartition<std::uint8_t, decltype(du)> d8;
    const std::size_t lanes = hn::Lanes(df);
    const auto one = hn::Set(du, 1u);
    for (std::size_t t = 0; t < count; t += lanes) {
      const auto v = hn::BitCast(du, hn::LoadU(d8, b + 4 * t));
      const auto b0 = hn::ShiftLeft<3>(hn::And(v, one));
      const auto b1 = hn::ShiftLeft<2>(hn::And(hn::ShiftRight<8>(v), one));
      const auto b2 = hn::ShiftLeft<1>(hn::And(hn::ShiftRight<16>(v), one));
      const auto b3 = hn::And(hn::ShiftRight<24>(v), one);
      hn::Store(hn::Or(hn::Or(b0, b1), hn::Or(b2, b3)), du, out + t);
    }
  } else {
    for (std::size_t t = 0; t < count; ++t) {
      std::uint32_t l = 0;
      for (int k = 0; k < kP; ++k) l = 2 * l + (b[kP * t + static_cast<std::size_t>(k)] & 1u);
      out[t] = l;
    }
  }
}

template <int kP, class DF>
struct QamAxisSink {
  DF df;
  float sigma;
  QamAxisDecider d;
  const Bit* HWY_RESTRICT bits;
  std::uint64_t errors = 0;

  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    HWY_ALIGN std::uint32_t lab[4 * hn::MaxLanes(DF())];
    QamAxisLabels<kP>(df, bits + kP * i, 4 * lanes, lab);
    const auto vs = hn::Set(df, sigma);
    auto acc = hn::Zero(du);
    QamAxisErrors<kP>(df, d, hn::Load(du, lab), s0, vs, lanes, acc);
    QamAxisErrors<kP>(df, d, hn::Load(du, lab + lanes), s1, vs, lanes, acc);
    QamAxisErrors<kP>(df, d, hn::Load(du, lab + 2 * lanes), s2, vs, lanes, acc);
    QamAxisErrors<kP>(df, d, hn::Load(du, lab + 3 * lanes), s3, vs, lanes, acc);
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    // Zero-padded copy of the group's bits, so that p = 4 reads whole vectors.
    HWY_ALIGN Bit b[4 * kP * hn::MaxLanes(DF())] = {};
    for (std::size_t k = 0; k < kP * count; ++k) b[k] = bits[kP * i + k];
    HWY_ALIGN std::uint32_t lab[4 * hn::MaxLanes(DF())] = {};
    QamAxisLabels<kP>(df, b, (count + lanes - 1) / lanes * lanes, lab);
    const auto vs = hn::Set(df, sigma);
    auto acc = hn::Zero(du);
    const hn::Vec<DF> s[4] = {s0, s1, s2, s3};
    for (std::size_t v = 0; v < 4 && v * lanes < count; ++v) {
      const std::size_t left = count - v * lanes;
      QamAxisErrors<kP>(df, d, hn::Load(du, lab + v * lanes), s[v], vs,
                        left < lanes ? left : lanes, acc);
    }
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
};

// 8-/16-PSK (b = 3, 4 bits per symbol): the errors of `valid` symbols with
// labels `lab` (one per u32 lane) and noise zr (Re), zi (Im), the same float
// operations per lane as reference::PskDecision.
template <int kB, class DF>
HWY_INLINE void PskErrors(DF df, const PskDecider& d, hn::Vec<hn::RebindToUnsigned<DF>> lab,
                          hn::Vec<DF> zr, hn::Vec<DF> zi, hn::Vec<DF> sigma, std::size_t valid,
                          hn::Vec<hn::RebindToUnsigned<DF>>& acc) {
  constexpr int kOrder = 1 << kB;
  const hn::RebindToUnsigned<DF> du;
  const hn::RebindToSigned<DF> di;
  hn::Vec<DF> xr, xi;
  if constexpr (kOrder <= hn::MaxLanes(DF())) {
    const auto idx = hn::IndicesFromVec(df, lab);
    xr = hn::TableLookupLanes(hn::LoadU(df, d.point_re), idx);
    xi = hn::TableLookupLanes(hn::LoadU(df, d.point_im), idx);
  } else {
    xr = hn::Set(df, d.point_re[0]);
    xi = hn::Set(df, d.point_im[0]);
    for (int l = 1; l < kOrder; ++l) {
      const auto is_l = hn::RebindMask(df, hn::Eq(lab, hn::Set(du, static_cast<std::uint32_t>(l))));
      xr = hn::IfThenElse(is_l, hn::Set(df, d.point_re[l]), xr);
      xi = hn::IfThenElse(is_l, hn::Set(df, d.point_im[l]), xi);
    }
  }
  const auto yr = awgn_detail::NoisySample(sigma, zr, xr);
  const auto yi = awgn_detail::NoisySample(sigma, zi, xi);
  const auto zero = hn::Zero(df);
  const auto one = hn::Set(du, 1u);
  hn::Vec<decltype(du)> dec;
  if (!d.maxlog) {
    auto c = hn::Zero(di);
    for (int i = 0; i < kOrder / 2; ++i) {
      const auto side = hn::Sub(hn::Mul(yi, hn::Set(df, d.boundary_cos[i])),
                                hn::Mul(yr, hn::Set(df, d.boundary_sin[i])));
      c = hn::Add(c, hn::IfThenElseZero(hn::RebindMask(di, hn::Ge(side, zero)), hn::Set(di, 1)));
    }
    const auto upper = hn::RebindMask(di, hn::Ge(yi, zero));
    const auto j = hn::IfThenElse(upper, hn::Sub(c, hn::Set(di, 1)),
                                  hn::Sub(hn::Set(di, kOrder - 1), c));
    const auto ju = hn::BitCast(du, j);
    dec = hn::Xor(ju, hn::ShiftRight<1>(ju));
  } else {
    const auto yr2 = hn::Mul(hn::Set(df, -2.0f), yr);
    const auto yi2 = hn::Mul(hn::Set(df, -2.0f), yi);
    hn::Vec<DF> e[kOrder];
    for (int l = 0; l < kOrder; ++l) {
      e[l] = hn::Add(hn::Mul(yr2, hn::Set(df, d.metric_re[l])),
                     hn::Mul(yi2, hn::Set(df, d.metric_im[l])));
    }
    const auto scale = hn::Set(df, d.inv_n0);
    const auto inf = hn::Set(df, std::numeric_limits<float>::infinity());
    dec = hn::Zero(du);
    for (int k = 0; k < kB; ++k) {
      auto m0 = inf, m1 = inf;
      for (int l = 0; l < kOrder; ++l) {
        if ((l >> (kB - 1 - k)) & 1) {
          m1 = hn::Min(m1, e[l]);
        } else {
          m0 = hn::Min(m0, e[l]);
        }
      }
      const auto neg = hn::Lt(hn::Mul(hn::Sub(m1, m0), scale), zero);
      dec = hn::Add(hn::Add(dec, dec), hn::IfThenElseZero(hn::RebindMask(du, neg), one));
    }
  }
  auto diff = hn::Xor(dec, lab);
  auto count = hn::And(diff, one);
  for (int k = 1; k < kB; ++k) {
    diff = hn::ShiftRight<1>(diff);
    count = hn::Add(count, hn::And(diff, one));
  }
  acc = hn::Add(acc, hn::IfThenElseZero(hn::RebindMask(du, hn::FirstN(df, valid)), count));
}

// A group of 4 Lanes real samples is 2 Lanes symbols: (s0, s1) hold symbols
// 0 .. Lanes-1 interleaved (Re, Im), (s2, s3) the next Lanes; ConcatEven /
// ConcatOdd split them into Re and Im vectors (NoisySample is per sample, so
// deinterleaving first changes nothing).
template <int kB, class DF>
struct PskSink {
  DF df;
  float sigma;
  PskDecider d;
  const Bit* HWY_RESTRICT bits;
  std::uint64_t errors = 0;

  HWY_INLINE void Labels(const Bit* HWY_RESTRICT b, std::size_t count,
                         std::uint32_t* HWY_RESTRICT out) const {
    for (std::size_t t = 0; t < count; ++t) {
      std::uint32_t l = 0;
      for (int k = 0; k < kB; ++k) l = 2 * l + (b[kB * t + static_cast<std::size_t>(k)] & 1u);
      out[t] = l;
    }
  }
  HWY_INLINE void Full(std::size_t i, hn::Vec<DF> s0, hn::Vec<DF> s1, hn::Vec<DF> s2,
                       hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    HWY_ALIGN std::uint32_t lab[2 * hn::MaxLanes(DF())];
    Labels(bits + kB * (i / 2), 2 * lanes, lab);
    const auto vs = hn::Set(df, sigma);
    auto acc = hn::Zero(du);
    PskErrors<kB>(df, d, hn::Load(du, lab), hn::ConcatEven(df, s1, s0), hn::ConcatOdd(df, s1, s0),
                  vs, lanes, acc);
    PskErrors<kB>(df, d, hn::Load(du, lab + lanes), hn::ConcatEven(df, s3, s2),
                  hn::ConcatOdd(df, s3, s2), vs, lanes, acc);
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
  HWY_INLINE void Tail(std::size_t i, std::size_t count, hn::Vec<DF> s0, hn::Vec<DF> s1,
                       hn::Vec<DF> s2, hn::Vec<DF> s3) {
    const hn::RebindToUnsigned<DF> du;
    const std::size_t lanes = hn::Lanes(df);
    const std::size_t symbols = count / 2;  // count is even (2 per symbol)
    HWY_ALIGN std::uint32_t lab[2 * hn::MaxLanes(DF())] = {};
    Labels(bits + kB * (i / 2), symbols, lab);
    const auto vs = hn::Set(df, sigma);
    auto acc = hn::Zero(du);
    PskErrors<kB>(df, d, hn::Load(du, lab), hn::ConcatEven(df, s1, s0), hn::ConcatOdd(df, s1, s0),
                  vs, symbols < lanes ? symbols : lanes, acc);
    if (symbols > lanes) {
      PskErrors<kB>(df, d, hn::Load(du, lab + lanes), hn::ConcatEven(df, s3, s2),
                    hn::ConcatOdd(df, s3, s2), vs, symbols - lanes, acc);
    }
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
};

template <int kB>
HWY_NOINLINE std::uint64_t PskLoop(const PskDecider& d, const Bit* HWY_RESTRICT bits,
                                   std::size_t n_symbols, float sigma, PhiloxKey key,
                                   const PhiloxCounter& counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  PskSink<kB, DF> sink{df, sigma, d, bits};
  awgn_detail::ForEachNormalGroup(df, 2 * n_symbols, key, counter, sink);
  return sink.errors;
}

template <int kP>
HWY_NOINLINE std::uint64_t QamAxisLoop(const QamAxisDecider& d, const Bit* HWY_RESTRICT bits,
                                       std::size_t n_symbols, float sigma, PhiloxKey key,
                                       const PhiloxCounter& counter) {
  using DF = hn::ScalableTag<float>;
  const DF df;
  QamAxisSink<kP, DF> sink{df, sigma, d, bits};
  awgn_detail::ForEachNormalGroup(df, 2 * n_symbols, key, counter, sink);
  return sink.errors;
}

}  // namespace channel_llr_detail

#endif  // HWY_TARGET != HWY_SCALAR

// Uncoded 16-QAM error count (channel_llr_kernels.h) at a stream position;
// does not advance the stream (the caller advances it by n_symbols blocks).
HWY_MAYBE_UNUSED inline std::uint64_t CountQam16ErrorsKernel(const Bit* HWY_RESTRICT bits,
                                                             std::size_t n_symbols,
                                                             const Qam16Decider& d, float sigma,
                                                             PhiloxKey key,
                                                             const PhiloxCounter& counter) {
  if (n_symbols == 0) return 0;
#if HWY_TARGET == HWY_SCALAR
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  return reference::CountQam16Errors(bits, n_symbols, d, sigma, stream);
#else
  return channel_llr_detail::Qam16Loop(d, bits, n_symbols, sigma, key, counter);
#endif
}

// Uncoded 64-/256-QAM error count (channel_llr_kernels.h) at a stream
// position; does not advance the stream (the caller advances it by n_symbols
// blocks).
HWY_MAYBE_UNUSED inline std::uint64_t CountQamAxisErrorsKernel(const Bit* HWY_RESTRICT bits,
                                                               std::size_t n_symbols,
                                                               const QamAxisDecider& d,
                                                               float sigma, PhiloxKey key,
                                                               const PhiloxCounter& counter) {
  if (n_symbols == 0) return 0;
#if HWY_TARGET == HWY_SCALAR
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  return reference::CountQamAxisErrors(bits, n_symbols, d, sigma, stream);
#else
  return d.axis_bits == 3
             ? channel_llr_detail::QamAxisLoop<3>(d, bits, n_symbols, sigma, key, counter)
             : channel_llr_detail::QamAxisLoop<4>(d, bits, n_symbols, sigma, key, counter);
#endif
}

// Uncoded 8-/16-PSK error count (channel_llr_kernels.h) at a stream position;
// does not advance the stream (the caller advances it by n_symbols blocks).
HWY_MAYBE_UNUSED inline std::uint64_t CountPskErrorsKernel(const Bit* HWY_RESTRICT bits,
                                                           std::size_t n_symbols,
                                                           const PskDecider& d, float sigma,
                                                           PhiloxKey key,
                                                           const PhiloxCounter& counter) {
  if (n_symbols == 0) return 0;
#if HWY_TARGET == HWY_SCALAR
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  return reference::CountPskErrors(bits, n_symbols, d, sigma, stream);
#else
  return d.bits == 3 ? channel_llr_detail::PskLoop<3>(d, bits, n_symbols, sigma, key, counter)
                     : channel_llr_detail::PskLoop<4>(d, bits, n_symbols, sigma, key, counter);
#endif
}

// The kernels at a stream position (key, counter); they do not advance any
// stream: the caller advances the noise stream by ceil(n / 2) blocks (BPSK:
// n = bits; QPSK: n = 2 n_symbols).
// REQUIRES: ceil(n / 2) <= 2^32 - 1.
HWY_MAYBE_UNUSED inline void BpskChannelLlrsKernel(const Bit* HWY_RESTRICT bits, std::size_t n,
                                                   float sigma, float scale, PhiloxKey key,
                                                   const PhiloxCounter& counter,
                                                   float* HWY_RESTRICT llrs) {
  if (n == 0) return;
#if HWY_TARGET == HWY_SCALAR
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  reference::BpskChannelLlrs(bits, n, sigma, scale, stream, llrs);
#else
  channel_llr_detail::LlrLoop(channel_llr_detail::BpskShape{scale}, bits, n, sigma, key, counter,
                              llrs);
#endif
}

HWY_MAYBE_UNUSED inline void QpskChannelLlrsKernel(const Bit* HWY_RESTRICT bits,
                                                   std::size_t n_symbols, const float* points_re,
                                                   const float* points_im, float sigma, float gain,
                                                   PhiloxKey key, const PhiloxCounter& counter,
                                                   float* HWY_RESTRICT llrs) {
  if (n_symbols == 0) return;
#if HWY_TARGET == HWY_SCALAR
  RngStream stream(key, counter[3], counter[2], static_cast<Substream>(counter[1]));
  stream.Advance(counter[0]);
  reference::QpskChannelLlrs(bits, n_symbols, points_re, points_im, sigma, gain, stream, llrs);
#else
  channel_llr_detail::QpskShape shape;
  for (int l = 0; l < 4; ++l) {
    shape.re[l] = points_re[l];
    shape.im[l] = points_im[l];
  }
  shape.gain = gain;
  channel_llr_detail::LlrLoop(shape, bits, 2 * n_symbols, sigma, key, counter, llrs);
#endif
}

// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#endif  // per-target include guard
