// Fading channel kernels: the per-symbol complex arithmetic of
// blocks/channel/fading_channel.h (gain times symbol, one-branch
// equalisation, maximal-ratio combining) on interleaved (re, im) floats.
// Plain interface; fading_kernels.cc is compiled per instruction set (Google
// Highway dynamic dispatch, chosen once per process by dispatch.h) and every
// target gives exactly the results of the scalar oracle fading_reference.h
// (same operations in the same order, no fused multiply-add). --scalar
// (ForceScalarKernels) runs the oracle. No random numbers are drawn here.
#ifndef CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_H_

#include <cstddef>

namespace capgap {

// out_k = h_k x_k for n complex values (out may equal x).
void FadingMultiplyGain(const float* h, const float* x, float* out, std::size_t n);
// In place: r_k = h_k* r_k / g_k, n0_out_k = n0 / g_k, g_k = max(|h_k|^2, 1e-30).
void FadingEqualiseOne(const float* h, float* r, float n0, float* n0_out, std::size_t n);
// MRC: z_k = sum_l h_lk* r_lk / g_k, n0_out_k = n0 / g_k, g_k = max(sum_l |h_lk|^2,
// 1e-30); h and r branch-major (branch l starts at 2 l n floats).
void FadingCombineMrc(const float* h, const float* r, std::size_t n, std::size_t branches,
                      float n0, float* z, float* n0_out);

// Target the fading kernels run ("AVX3", ..., or the scalar oracle's name).
const char* FadingKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_H_
