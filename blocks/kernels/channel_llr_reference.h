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

#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <limits>

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

// The demapper oracle's decided axis label for one 64-/256-QAM axis sample y
// (demap_reference.h: HardLabel and DemapSoft's kPam metrics with
// LlrsFromMetrics, written out; CountQamAxisErrors of channel_llr_kernels.h).
// Compiled without floating-point contraction, like demap_reference.h.
inline unsigned QamAxisDecision(const QamAxisDecider& d, float y) {
  const int p = d.axis_bits;
  const int levels = 1 << p;
  if (!d.maxlog) {
    const float u = d.inv_s * y;
    unsigned j = 0;
    for (int i = 0; i < levels - 1; ++i) j += u < static_cast<float>(levels - 2 - 2 * i) ? 1u : 0u;
    return j ^ (j >> 1);
  }
  const float u2 = d.two_inv_s * y;
  float e[16];
  for (int j = 0; j < levels; ++j) {
    const auto c = static_cast<float>(levels - 1 - 2 * j);
    e[j ^ (j >> 1)] = c * c - c * u2;
  }
  unsigned label = 0;
  for (int k = 0; k < p; ++k) {
    float m0 = std::numeric_limits<float>::infinity(), m1 = m0;
    for (int l = 0; l < levels; ++l) {
      if ((l >> (p - 1 - k)) & 1) {
        m1 = e[l] < m1 ? e[l] : m1;
      } else {
        m0 = e[l] < m0 ? e[l] : m0;
      }
    }
    label = 2 * label + ((m1 - m0) * d.scale < 0.0f ? 1u : 0u);
  }
  return label;
}

inline std::uint64_t CountQamAxisErrors(const Bit* bits, std::size_t n_symbols,
                                        const QamAxisDecider& d, float sigma, RngStream& noise) {
  const double s = sigma;
  const auto p = static_cast<std::size_t>(d.axis_bits);
  std::uint64_t errors = 0;
  ForEachNormal(2 * n_symbols, noise, [&](std::size_t t, double z) {
    unsigned label = 0;
    for (std::size_t k = 0; k < p; ++k) label = 2 * label + (bits[p * t + k] & 1u);
    const float y = NoisySample(d.levels[label], s, z);
    errors += static_cast<std::uint64_t>(std::popcount(QamAxisDecision(d, y) ^ label));
  });
  return errors;
}

// The demapper oracle's decided label for one 8-/16-PSK symbol y = (yr, yi)
// (demap_reference.h: HardLabel and DemapSoft of kPsk with LlrsFromMetrics,
// written out; CountPskErrors of channel_llr_kernels.h).
inline unsigned PskDecision(const PskDecider& d, float yr, float yi) {
  const int b = d.bits;
  const int order = 1 << b;
  if (!d.maxlog) {
    int c = 0;
    for (int i = 0; i < order / 2; ++i) {
      c += yi * d.boundary_cos[i] - yr * d.boundary_sin[i] >= 0.0f ? 1 : 0;
    }
    const int upper = yi >= 0.0f ? 1 : 0;
    const int j = upper * (c - 1) + (1 - upper) * (order - 1 - c);
    return static_cast<unsigned>(j ^ (j >> 1));
  }
  const float yr2 = -2.0f * yr;
  const float yi2 = -2.0f * yi;
  float e[16];
  for (int l = 0; l < order; ++l) e[l] = yr2 * d.metric_re[l] + yi2 * d.metric_im[l];
  unsigned label = 0;
  for (int k = 0; k < b; ++k) {
    float m0 = std::numeric_limits<float>::infinity(), m1 = m0;
    for (int l = 0; l < order; ++l) {
      if ((l >> (b - 1 - k)) & 1) {
        m1 = e[l] < m1 ? e[l] : m1;
      } else {
        m0 = e[l] < m0 ? e[l] : m0;
      }
    }
    label = 2 * label + ((m1 - m0) * d.inv_n0 < 0.0f ? 1u : 0u);
  }
  return label;
}

inline std::uint64_t CountPskErrors(const Bit* bits, std::size_t n_symbols, const PskDecider& d,
                                    float sigma, RngStream& noise) {
  const double s = sigma;
  const auto b = static_cast<std::size_t>(d.bits);
  std::uint64_t errors = 0;
  unsigned label = 0;
  float yr = 0.0f;
  ForEachNormal(2 * n_symbols, noise, [&](std::size_t i, double z) {
    const std::size_t sym = i / 2;
    if (i % 2 == 0) {
      label = 0;
      for (std::size_t k = 0; k < b; ++k) label = 2 * label + (bits[b * sym + k] & 1u);
      yr = NoisySample(d.point_re[label], s, z);
      return;
    }
    const float yi = NoisySample(d.point_im[label], s, z);
    errors += static_cast<std::uint64_t>(std::popcount(PskDecision(d, yr, yi) ^ label));
  });
  return errors;
}

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_CHANNEL_LLR_REFERENCE_H_
