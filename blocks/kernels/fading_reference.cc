// Scalar oracle of the fading kernels (fading_reference.h); compiled with
// -ffp-contract=off -fno-tree-vectorize (blocks/CMakeLists.txt).
#include "blocks/kernels/fading_reference.h"

#include <algorithm>

namespace capgap::reference {

void MultiplyGain(const float* h, const float* x, float* out, std::size_t n) {
  for (std::size_t i = 0; i < n; ++i) {
    const float xr = x[2 * i], xi = x[2 * i + 1];
    const float hr = h[2 * i], hi = h[2 * i + 1];
    out[2 * i] = hr * xr - hi * xi;
    out[2 * i + 1] = hr * xi + hi * xr;
  }
}

void EqualiseOne(const float* h, float* r, float n0, float* n0_out, std::size_t n) {
  for (std::size_t i = 0; i < n; ++i) {
    const float hr = h[2 * i], hi = h[2 * i + 1];
    const float rr = r[2 * i], ri = r[2 * i + 1];
    const float inv = 1.0f / std::max(hr * hr + hi * hi, kMinCombinedGain);
    r[2 * i] = (hr * rr + hi * ri) * inv;
    r[2 * i + 1] = (hr * ri - hi * rr) * inv;
    n0_out[i] = n0 * inv;
  }
}

void CombineMrc(const float* h, const float* r, std::size_t n, std::size_t branches, float n0,
                float* z, float* n0_out) {
  for (std::size_t i = 0; i < n; ++i) {
    float num_r = 0.0f, num_i = 0.0f, g = 0.0f;
    for (std::size_t l = 0; l < branches; ++l) {
      const std::size_t k = 2 * (l * n + i);
      const float hr = h[k], hi = h[k + 1], rr = r[k], ri = r[k + 1];
      num_r = num_r + (hr * rr + hi * ri);
      num_i = num_i + (hr * ri - hi * rr);
      g = g + (hr * hr + hi * hi);
    }
    const float inv = 1.0f / std::max(g, kMinCombinedGain);
    z[2 * i] = num_r * inv;
    z[2 * i + 1] = num_i * inv;
    n0_out[i] = n0 * inv;
  }
}

}  // namespace capgap::reference
