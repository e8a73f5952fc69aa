// Per-target bodies of the fading kernels (fading_kernels.h), included once
// per instruction set by fading_kernels.cc and by the per-target test. Layout:
// interleaved (re, im) as the chain stores cf32; LoadInterleaved2 splits a
// vector pair into re and im lanes (one shuffle per pair on x86) so the
// arithmetic is lane-wise, and StoreInterleaved2 merges them back. Every
// operation is the oracle's (fading_reference.h) in its order, and the tail
// (n mod lanes symbols) calls the oracle itself (compiled once, out of
// line), so results are bit-identical. REQUIRES branches <= 64.

// Per-target include guard (Highway's toggle idiom).
#if defined(CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_INL_H_) == defined(HWY_TARGET_TOGGLE)
#ifdef CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_INL_H_
#undef CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_INL_H_
#else
#define CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_INL_H_
#endif

#include <cstddef>

#include "blocks/kernels/awgn_kernels-inl.h"
#include "blocks/kernels/channel_llr_kernels.h"
#include "blocks/kernels/fading_reference.h"
#include "hwy/highway.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
namespace hn = hwy::HWY_NAMESPACE;

inline void FadingMultiplyGainKernel(const float* h, const float* x, float* out, std::size_t n) {
  const hn::ScalableTag<float> d;
  const std::size_t lanes = hn::Lanes(d);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    hn::Vec<decltype(d)> hr, hi, xr, xi;
    hn::LoadInterleaved2(d, h + 2 * i, hr, hi);
    hn::LoadInterleaved2(d, x + 2 * i, xr, xi);
    const auto re = hn::Sub(hn::Mul(hr, xr), hn::Mul(hi, xi));
    const auto im = hn::Add(hn::Mul(hr, xi), hn::Mul(hi, xr));
    hn::StoreInterleaved2(re, im, d, out + 2 * i);
  }
  reference::MultiplyGain(h + 2 * i, x + 2 * i, out + 2 * i, n - i);
}

inline void FadingEqualiseOneKernel(const float* h, float* r, float n0, float* n0_out,
                                    std::size_t n) {
  const hn::ScalableTag<float> d;
  const std::size_t lanes = hn::Lanes(d);
  const auto one = hn::Set(d, 1.0f);
  const auto min_gain = hn::Set(d, reference::kMinCombinedGain);
  const auto vn0 = hn::Set(d, n0);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    hn::Vec<decltype(d)> hr, hi, rr, ri;
    hn::LoadInterleaved2(d, h + 2 * i, hr, hi);
    hn::LoadInterleaved2(d, r + 2 * i, rr, ri);
    const auto g = hn::Max(hn::Add(hn::Mul(hr, hr), hn::Mul(hi, hi)), min_gain);
    const auto inv = hn::Div(one, g);
    const auto zr = hn::Mul(hn::Add(hn::Mul(hr, rr), hn::Mul(hi, ri)), inv);
    const auto zi = hn::Mul(hn::Sub(hn::Mul(hr, ri), hn::Mul(hi, rr)), inv);
    hn::StoreInterleaved2(zr, zi, d, r + 2 * i);
    hn::StoreU(hn::Mul(vn0, inv), d, n0_out + i);
  }
  reference::EqualiseOne(h + 2 * i, r + 2 * i, n0, n0_out + i, n - i);
}

inline void FadingCombineMrcKernel(const float* h, const float* r, std::size_t n,
                                   std::size_t branches, float n0, float* z, float* n0_out) {
  const hn::ScalableTag<float> d;
  const std::size_t lanes = hn::Lanes(d);
  const auto one = hn::Set(d, 1.0f);
  const auto min_gain = hn::Set(d, reference::kMinCombinedGain);
  const auto vn0 = hn::Set(d, n0);
  std::size_t i = 0;
  for (; i + lanes <= n; i += lanes) {
    auto num_r = hn::Zero(d), num_i = hn::Zero(d), g = hn::Zero(d);
    for (std::size_t l = 0; l < branches; ++l) {
      const std::size_t k = 2 * (l * n + i);
      hn::Vec<decltype(d)> hr, hi, rr, ri;
      hn::LoadInterleaved2(d, h + k, hr, hi);
      hn::LoadInterleaved2(d, r + k, rr, ri);
      num_r = hn::Add(num_r, hn::Add(hn::Mul(hr, rr), hn::Mul(hi, ri)));
      num_i = hn::Add(num_i, hn::Sub(hn::Mul(hr, ri), hn::Mul(hi, rr)));
      g = hn::Add(g, hn::Add(hn::Mul(hr, hr), hn::Mul(hi, hi)));
    }
    const auto inv = hn::Div(one, hn::Max(g, min_gain));
    hn::StoreInterleaved2(hn::Mul(num_r, inv), hn::Mul(num_i, inv), d, z + 2 * i);
    hn::StoreU(hn::Mul(vn0, inv), d, n0_out + i);
  }
  // Tail symbols i..n-1: the oracle, one symbol at a time (each branch's
  // values sit at stride 2 n, which the oracle takes as a one-symbol block
  // only when branches == 1; so gather them).
  for (; i < n; ++i) {
    float hb[2 * 64], rb[2 * 64];
    for (std::size_t l = 0; l < branches; ++l) {
      const std::size_t k = 2 * (l * n + i);
      hb[2 * l] = h[k];
      hb[2 * l + 1] = h[k + 1];
      rb[2 * l] = r[k];
      rb[2 * l + 1] = r[k + 1];
    }
    reference::CombineMrc(hb, rb, 1, branches, n0, z + 2 * i, n0_out + i);
  }
}

#if HWY_TARGET != HWY_SCALAR
// Uncoded Gray 16-QAM over one-branch fast fading with Gaussian gains, fused
// from the drawn normals to the error count (fading_kernels.h,
// FadingQam16Errors). Lanes(df) symbols per step, re and im split by
// LoadInterleaved2; every operation is the composed path's, in its order:
// the gain a + b g (FadingProcess), h x (MultiplyGain), NoisySample
// (AddComplexNoise's per-target operation), the one-branch equaliser
// (EqualiseOne), then the demapper's slicer (hard) or its 4-PAM max-log
// LLRs at N0 = 1 (the decider's constants) times 1 / (N0 / g) per symbol,
// decided as L < 0. `valid`: lanes from valid on count nothing.
template <class DF>
HWY_INLINE void FadingQam16Step(DF df, const Bit* HWY_RESTRICT bits, const float* HWY_RESTRICT g,
                                const float* HWY_RESTRICT z, float a, float b, float sigma,
                                float n0, const Qam16Decider& d, std::size_t valid,
                                hn::Vec<hn::RebindToUnsigned<DF>>& acc) {
  const hn::RebindToUnsigned<DF> du;
  const hn::Repartition<std::uint8_t, decltype(du)> d8;
  const auto word = hn::BitCast(du, hn::LoadU(d8, bits));
  const auto one_u = hn::Set(du, 1u);
  const auto zero_u = hn::Zero(du);
  // Bytes of symbol i: Re label (MSB, LSB), then Im label (MSB, LSB).
  const auto mrh = hn::RebindMask(df, hn::Ne(hn::And(word, one_u), zero_u));
  const auto mrl = hn::RebindMask(df, hn::Ne(hn::And(hn::ShiftRight<8>(word), one_u), zero_u));
  const auto mih = hn::RebindMask(df, hn::Ne(hn::And(hn::ShiftRight<16>(word), one_u), zero_u));
  const auto mil = hn::RebindMask(df, hn::Ne(hn::And(hn::ShiftRight<24>(word), one_u), zero_u));
  const auto l0 = hn::Set(df, d.levels[0]), l1 = hn::Set(df, d.levels[1]);
  const auto l2 = hn::Set(df, d.levels[2]), l3 = hn::Set(df, d.levels[3]);
  const auto xr = hn::IfThenElse(mrh, hn::IfThenElse(mrl, l3, l2), hn::IfThenElse(mrl, l1, l0));
  const auto xi = hn::IfThenElse(mih, hn::IfThenElse(mil, l3, l2), hn::IfThenElse(mil, l1, l0));
  hn::Vec<DF> gr, gi, zr, zi;
  hn::LoadInterleaved2(df, g, gr, gi);
  hn::LoadInterleaved2(df, z, zr, zi);
  const auto vb = hn::Set(df, b);
  const auto hr = hn::Add(hn::Set(df, a), hn::Mul(vb, gr));
  const auto hi = hn::Mul(vb, gi);
  const auto yr = hn::Sub(hn::Mul(hr, xr), hn::Mul(hi, xi));
  const auto yi = hn::Add(hn::Mul(hr, xi), hn::Mul(hi, xr));
  const auto vs = hn::Set(df, sigma);
  const auto rr = awgn_detail::NoisySample(vs, zr, yr);
  const auto ri = awgn_detail::NoisySample(vs, zi, yi);
  const auto one = hn::Set(df, 1.0f);
  const auto gain =
      hn::Max(hn::Add(hn::Mul(hr, hr), hn::Mul(hi, hi)), hn::Set(df, reference::kMinCombinedGain));
  const auto inv = hn::Div(one, gain);
  const auto er = hn::Mul(hn::Add(hn::Mul(hr, rr), hn::Mul(hi, ri)), inv);
  const auto ei = hn::Mul(hn::Sub(hn::Mul(hr, ri), hn::Mul(hi, rr)), inv);
  const auto zero = hn::Zero(df);
  hn::Mask<DF> drh, drl, dih, dil;
  if (d.maxlog) {
    const auto scale = hn::Div(one, hn::Mul(hn::Set(df, n0), inv));
    const auto two_s = hn::Set(df, d.two_s);
    const auto ka = hn::Set(df, d.ka), kb = hn::Set(df, d.kb);
    const auto kc = hn::Set(df, d.kc), kd = hn::Set(df, d.kd);
    const auto llr_hi = [&](hn::Vec<DF> y) {
      return hn::Mul(hn::Sub(hn::Mul(ka, y),
                             hn::Mul(kb, hn::Sub(hn::Abs(hn::Add(y, two_s)),
                                                 hn::Abs(hn::Sub(y, two_s))))),
                     scale);
    };
    const auto llr_lo = [&](hn::Vec<DF> y) {
      return hn::Mul(hn::Sub(hn::Mul(kc, hn::Abs(y)), kd), scale);
    };
    drh = hn::Lt(llr_hi(er), zero);
    drl = hn::Lt(llr_lo(er), zero);
    dih = hn::Lt(llr_hi(ei), zero);
    dil = hn::Lt(llr_lo(ei), zero);
  } else {
    const auto inv_s = hn::Set(df, d.inv_s);
    const auto ur = hn::Mul(inv_s, er), ui = hn::Mul(inv_s, ei);
    const auto p2 = hn::Set(df, 2.0f), m2 = hn::Set(df, -2.0f);
    drh = hn::Lt(ur, zero);
    drl = hn::Xor(hn::Lt(ur, p2), hn::Lt(ur, m2));
    dih = hn::Lt(ui, zero);
    dil = hn::Xor(hn::Lt(ui, p2), hn::Lt(ui, m2));
  }
  const auto first = hn::FirstN(df, valid);
  const auto count = [&](hn::Mask<DF> dm, hn::Mask<DF> sent) {
    acc = hn::Add(acc, hn::IfThenElseZero(hn::RebindMask(du, hn::And(hn::Xor(dm, sent), first)),
                                          one_u));
  };
  count(drh, mrh);
  count(drl, mrl);
  count(dih, mih);
  count(dil, mil);
}

// n symbols: bits 4 per symbol, g and z 2 normals per symbol (gain and noise
// of symbol i at 2i, 2i + 1). The tail runs the same step on zero-padded
// copies with the extra lanes masked.
inline std::uint64_t FadingQam16ErrorsKernel(const Bit* bits, const float* g, const float* z,
                                             std::size_t n, float a, float b, float sigma,
                                             float n0, const Qam16Decider& d) {
  const hn::ScalableTag<float> df;
  const hn::RebindToUnsigned<decltype(df)> du;
  const std::size_t lanes = hn::Lanes(df);
  std::uint64_t errors = 0;
  std::size_t i = 0;
  // Per-lane counts grow by at most 4 per step: flush well before 2^32.
  for (; i + lanes <= n;) {
    auto acc = hn::Zero(du);
    for (std::size_t k = 0; k < (1u << 20) && i + lanes <= n; ++k, i += lanes) {
      FadingQam16Step(df, bits + 4 * i, g + 2 * i, z + 2 * i, a, b, sigma, n0, d, lanes, acc);
    }
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
  if (i < n) {
    constexpr std::size_t kMax = hn::MaxLanes(decltype(df)());
    HWY_ALIGN Bit bb[4 * kMax] = {};
    HWY_ALIGN float gb[2 * kMax] = {}, zb[2 * kMax] = {};
    const std::size_t left = n - i;
    for (std::size_t k = 0; k < 4 * left; ++k) bb[k] = bits[4 * i + k];
    for (std::size_t k = 0; k < 2 * left; ++k) {
      gb[k] = g[2 * i + k];
      zb[k] = z[2 * i + k];
    }
    auto acc = hn::Zero(du);
    FadingQam16Step(df, bb, gb, zb, a, b, sigma, n0, d, left, acc);
    errors += hn::GetLane(hn::SumOfLanes(du, acc));
  }
  return errors;
}
#endif  // HWY_TARGET != HWY_SCALAR

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#endif  // include guard
