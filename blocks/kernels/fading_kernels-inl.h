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

}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#endif  // include guard
