// Scalar oracle of the FIR kernels of fir_kernels.h.
//
// Header-only and deliberately plain: the convolution sums of fir_kernels.h
// written out term by term (polyphase for the interpolator, one dot product
// per output for the decimator), accumulated in double and rounded to float
// once, so its own error (~1e-16 relative to sum |h| |x|) is negligible next
// to the float kernels it judges. The SIMD targets are tested against it on
// awkward lengths and misaligned starts (fir_kernels_test.cc), and
// ForceScalarKernels(true) / CAPGAP_FORCE_SCALAR route FirInterpolate and
// FirDecimate here, so it stays after SIMD exists. It reads x / in exactly
// over [-(history), last used sample], never the lookahead.
#ifndef CAPGAP_BLOCKS_KERNELS_FIR_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_FIR_REFERENCE_H_

#include <cstddef>
#include <span>

#include "blocks/core/types.h"

namespace capgap {
namespace reference {

// out[d S + p] = sum_{i >= 0, iS + p < L} h[iS + p] x[d - i], d in [0, n).
inline void FirInterpolate(std::span<const float> h, int factor, const cf32* x, std::size_t n,
                           cf32* out) {
  const std::size_t s = static_cast<std::size_t>(factor);
  const std::size_t taps = h.size();
  for (std::size_t d = 0; d < n; ++d) {
    for (std::size_t p = 0; p < s; ++p) {
      double re = 0.0, im = 0.0;
      const cf32* xd = x + d;
      for (std::size_t m = p, i = 0; m < taps; m += s, ++i) {
        const double c = static_cast<double>(h[m]);
        const cf32 v = *(xd - static_cast<std::ptrdiff_t>(i));
        re += c * static_cast<double>(v.real());
        im += c * static_cast<double>(v.imag());
      }
      out[d * s + p] = cf32(static_cast<float>(re), static_cast<float>(im));
    }
  }
}

// out[k] = sum_{m = 0}^{L - 1} g[m] in[k S - m], k in [0, n_out).
inline void FirDecimate(std::span<const float> g, int factor, const cf32* in, std::size_t n_out,
                        cf32* out) {
  const std::ptrdiff_t s = factor;
  for (std::size_t k = 0; k < n_out; ++k) {
    double re = 0.0, im = 0.0;
    const cf32* centre = in + static_cast<std::ptrdiff_t>(k) * s;
    for (std::size_t m = 0; m < g.size(); ++m) {
      const double c = static_cast<double>(g[m]);
      const cf32 v = *(centre - static_cast<std::ptrdiff_t>(m));
      re += c * static_cast<double>(v.real());
      im += c * static_cast<double>(v.imag());
    }
    out[k] = cf32(static_cast<float>(re), static_cast<float>(im));
  }
}

}  // namespace reference
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_FIR_REFERENCE_H_
