// Gaussian noise kernels: the vectorised inner loop of every Monte Carlo
// chain. Plain interface (spans, no vector types); the implementation in
// awgn_kernels.cc is compiled for several instruction sets (Google Highway
// dynamic dispatch) and picks the best one the running CPU supports, once per
// process. awgn_reference.h holds the scalar oracle.
//
// Stream use (identical for every target, so all targets stay in step):
// normal pair j of a call (samples 2j and 2j+1) comes from Philox block
// (stream.block_index() + j); a call producing n normals advances the stream
// by ceil(n / 2) blocks. Within a block (w0, w1, w2, w3):
//   u1 = (w1 2^32 + w0 + 1/2) 2^-64   (64-bit radius uniform, in (0, 1))
//   u2 = (w2 + 1/2) 2^-32             (angle uniform)
//   z0 = r cos(2 pi u2), z1 = r sin(2 pi u2), r = sqrt(-2 ln u1)
// (Box & Muller, Ann. Math. Stat. 29, 1958). The 64-bit radius uniform keeps
// the tail exact out to r_max = sqrt(2 ln 2^65) = 9.49 sigma (the smallest u1
// is 2^-65). Beyond it the true normal has mass P(|z| > 9.49) ~ 2e-21, so any
// BER a sweep can reach (even BPSK at 1e-15 needs only 7.9 sigma) is unaffected;
// w3 is unused.
#ifndef CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_H_

#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/dispatch.h"  // ForceScalarKernels, ScalarKernelsForced

namespace capgap {

// out[i] = standard normal (mean 0, variance 1).
void FillStandardNormal(std::span<float> out, RngStream& stream);

// samples[i] += sigma * z_i (real channel, e.g. BPSK on the I axis).
void AddRealNoise(std::span<float> samples, float sigma, RngStream& stream);

// samples[k] += sigma_per_dim * (z_2k + j z_2k+1): circular complex noise of
// variance 2 sigma_per_dim^2. Advances the stream by samples.size() blocks.
void AddComplexNoise(std::span<cf32> samples, float sigma_per_dim, RngStream& stream);

// Name of the instruction set the kernels dispatch to ("AVX3", "AVX2",
// "SSE4", "EMU128"/"SCALAR", ...), written into every output file.
const char* NoiseKernelTarget();
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_AWGN_KERNELS_H_
