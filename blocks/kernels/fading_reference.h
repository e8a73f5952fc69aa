// Scalar oracle of the fading kernels (fading_kernels.h): per-symbol complex
// products written out in real arithmetic, in exactly the order the vector
// kernels use, so every target matches it bit for bit. Defined in
// fading_reference.cc, compiled once for the baseline with -ffp-contract=off
// and without auto-vectorisation: inlined into an FMA target's kernel, GCC
// would turn the complex product into fmaddsub (one rounding instead of
// two), which the vector kernels (explicit Mul/Sub/Add) never do.
#ifndef CAPGAP_BLOCKS_KERNELS_FADING_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_FADING_REFERENCE_H_

#include <cstddef>

namespace capgap::reference {

// Smallest combined gain used: a gain of exactly 0 (probability 0 in theory,
// possible in float) would divide by zero.
inline constexpr float kMinCombinedGain = 1e-30f;

// out_k = h_k x_k (interleaved re, im; out may equal x):
// (hr xr - hi xi, hr xi + hi xr).
void MultiplyGain(const float* h, const float* x, float* out, std::size_t n);

// One branch: g = max(|h|^2, kMin), z = h* r / g in place of r, n0_out = n0 / g
// (as n0 * (1 / g)); z = ((hr rr + hi ri) inv, (hr ri - hi rr) inv).
void EqualiseOne(const float* h, float* r, float n0, float* n0_out, std::size_t n);

// MRC of `branches` branches (h, r branch-major: branch l at 2 l n): sums in
// branch order, z = (sum h* r) / g, n0_out = n0 / g, g = max(sum |h|^2, kMin).
void CombineMrc(const float* h, const float* r, std::size_t n, std::size_t branches, float n0,
                float* z, float* n0_out);

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_FADING_REFERENCE_H_
