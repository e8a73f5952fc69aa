// Scalar oracle of the fused channel-LLR kernels of channel_llr_kernels.h:
// the composed scalar path written out sample by sample. x from the bits as
// the chain and the Mapper form it, y = reference::NoisySample(x, sigma, z)
// with z the normals of reference::ForEachNormal (what
// reference::AddRealNoise / AddComplexNoise do), then the LLR as the chain
// (BPSK: scale y) or the demapper's oracle (QPSK: gain y, b0 from Im y)
// forms it. Advances the noise stream like the composed path, by ceil(n / 2)
// blocks for n real samples.
#ifndef CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_REFERENCE_H_

#include <cmath>
#include <cstddef>
#include <cstdint>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_reference.h"
#include "blocks/kernels/channel_llr_kernels.h"

namespace capgap::reference {

inline void BpskChannelLlrs(const Bit* bits, std::size_t n, float sigma, float scale,
                            RngStream& noise, float* llrs) {
  const double s = sigma;
  ForEachNormal(n, noise, [&](std::size_t i, double z) {
    const float x = 1.0f - 2.0f * static_cast<float>(bits[i]);
    llrs[i] = scale * NoisySample(x, s, z);
  });
}

// Real sample i is Re (i even) or Im (i odd) of symbol i / 2, whose label is
// 2 b0 + b1 with b0 = bits[i & ~1], b1 = bits[i | 1]; its LLR goes to bit
// b1 (Re) or b0 (Im) of that symbol, i.e. to llrs[i ^ 1].
inline void QpskChannelLlrs(const Bit* bits, std::size_t n_symbols, const float* points_re,
                            const float* points_im, float sigma, float gain, RngStream& noise,
                            float* llrs) {
  const double s = sigma;
  ForEachNormal(2 * n_symbols, noise, [&](std::size_t i, double z) {
    const std::size_t e = i & ~std::size_t{1};
    const unsigned label = 2u * (bits[e] & 1u) + (bits[e + 1] & 1u);
    const float x = (i & 1u) ? points_im[label] : points_re[label];
    llrs[i ^ 1u] = gain * NoisySample(x, s, z);
  });
}

// Errors of one 16-QAM axis sample y whose sent label bits are (hi, lo).
// Must be compiled without floating-point contraction (it is, in
// channel_llr_kernels.cc and its test), like demap_reference.h.
inline unsigned Qam16AxisErrors(const Qam16Decider& d, float y, unsigned hi, unsigned lo) {
  unsigned dhi, dlo;
  if (d.maxlog) {
    const float l0 = d.ka * y - d.kb * (std::fabs(y + d.two_s) - std::fabs(y - d.two_s));
    const float l1 = d.kc * std::fabs(y) - d.kd;
    dhi = l0 < 0.0f ? 1u : 0u;
    dlo = l1 < 0.0f ? 1u : 0u;
  } else {
    const float u = d.inv_s * y;
    unsigned j = 0;
    j += u < 2.0f ? 1u : 0u;
    j += u < 0.0f ? 1u : 0u;
    j += u < -2.0f ? 1u : 0u;
    const unsigned label = j ^ (j >> 1);
    dhi = label >> 1;
    dlo = label & 1u;
  }
  return (dhi ^ hi) + (dlo ^ lo);
}

inline std::uint64_t CountQam16Errors(const Bit* bits, std::size_t n_symbols,
                                      const Qam16Decider& d, float sigma, RngStream& noise) {
  const double s = sigma;
  std::uint64_t errors = 0;
  ForEachNormal(2 * n_symbols, noise, [&](std::size_t t, double z) {
    const unsigned hi = bits[2 * t] & 1u, lo = bits[2 * t + 1] & 1u;
    const float y = NoisySample(d.levels[2 * hi + lo], s, z);
    errors += Qam16AxisErrors(d, y, hi, lo);
  });
  return errors;
}

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_REFERENCE_H_
