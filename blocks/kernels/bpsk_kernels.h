// Fused kernel of the uncoded BPSK chain with hard decisions: bits -> +-1 ->
// AWGN -> decision -> error count in one pass, in registers, with no
// intermediate arrays. Plain interface (spans, no vector types); the
// implementation in bpsk_kernels.cc is compiled for several instruction sets
// (Google Highway dynamic dispatch) like awgn_kernels.cc, and
// bpsk_reference.h holds the scalar oracle.
//
// Exactness (what makes it a drop-in replacement): for bit b_i (0 or 1) the
// kernel forms x_i = 1 - 2 b_i (bit 0 -> +1, bit 1 -> -1), the noisy sample
// y_i = x_i + sigma z_i with the same z_i and the same float operations as
// AddRealNoise(x, sigma, noise) of awgn_kernels.h, decides bit 1 iff y_i < 0
// and counts the decisions that differ from b_i. So the count equals that of
// the composed path (fill x, AddRealNoise, decide, compare) bit for bit, on
// every target, and the noise stream is advanced exactly as AddRealNoise
// advances it: by ceil(n / 2) blocks. The scalar path (ForceScalarKernels,
// CAPGAP_FORCE_SCALAR) follows the same rule against the scalar noise path.
#ifndef CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_H_

#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"

namespace capgap {

// Bits one per byte (the layout of GenerateRandomBits).
// REQUIRES: every bit is 0 or 1.
std::uint64_t CountBpskHardErrors(std::span<const Bit> bits, float sigma, RngStream& noise);

// The same for the n_bits uniform random bits GenerateRandomBits (bit_source.h)
// would draw from bit_stream, without storing them: they are drawn here, by
// the same rule (block j supplies bits 128 j .. 128 j + 127, bit i =
// (word[(i % 128) / 32] >> (i % 32)) & 1), with the noise kernel's vector
// Philox, and bit_stream is advanced as GenerateRandomBits advances it, by
// ceil(n_bits / 128) blocks. So the count equals CountBpskHardErrors on the
// output of GenerateRandomBits(bits, bit_stream).
std::uint64_t CountBpskHardErrorsOfRandomBits(std::size_t n_bits, RngStream& bit_stream,
                                              float sigma, RngStream& noise);

// Name of the instruction set this kernel dispatches to; always the same as
// NoiseKernelTarget() (both families choose once, by the same rule).
const char* BpskKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_BPSK_KERNELS_H_
