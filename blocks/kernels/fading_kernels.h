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
#include <cstdint>

#include "blocks/core/types.h"
#include "blocks/kernels/channel_llr_kernels.h"

namespace capgap {

// out_k = h_k x_k for n complex values (out may equal x).
void FadingMultiplyGain(const float* h, const float* x, float* out, std::size_t n);
// In place: r_k = h_k* r_k / g_k, n0_out_k = n0 / g_k, g_k = max(|h_k|^2, 1e-30).
void FadingEqualiseOne(const float* h, float* r, float n0, float* n0_out, std::size_t n);
// MRC: z_k = sum_l h_lk* r_lk / g_k, n0_out_k = n0 / g_k, g_k = max(sum_l |h_lk|^2,
// 1e-30); h and r branch-major (branch l starts at 2 l n floats).
void FadingCombineMrc(const float* h, const float* r, std::size_t n, std::size_t branches,
                      float n0, float* z, float* n0_out);

// Uncoded Gray 16-QAM over one-branch fast fading with gains a + b g (g
// standard normal pairs: Rayleigh a = 0, Rician a = LOS amplitude), fused to
// the error count: n symbols, bits[4i .. 4i + 3] the labels of symbol i (Re
// MSB, LSB, Im MSB, LSB as the Mapper and CountQam16Errors of
// channel_llr_kernels.h read them), g[2i], g[2i + 1] the gain normals and
// z[2i], z[2i + 1] the noise normals of symbol i (FillStandardNormal of the
// fading and noise streams), d the decider made at N0 = 1. Counts exactly
// the errors of the composed path (FadingMultiplyGain, AddComplexNoise with
// sigma, FadingEqualiseOne with n0, the demapper's hard slicer or max-log
// LLRs scaled per symbol, decided as L < 0) on the same target.
// REQUIRES FadingQam16Fused(): a vector target runs (Highway's scalar target
// and the forced-scalar oracle use double-precision noise; the composed path
// serves them).
bool FadingQam16Fused();
std::uint64_t FadingQam16Errors(const Bit* bits, const float* g, const float* z, std::size_t n,
                                float a, float b, float sigma, float n0, const Qam16Decider& d);

// Target the fading kernels run ("AVX3", ..., or the scalar oracle's name).
const char* FadingKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_FADING_KERNELS_H_
