// Scalar oracle for the fused BPSK hard-decision kernel of bpsk_kernels.h.
//
// Header-only, and nothing but the composed uncoded BPSK chain written out
// sample by sample on the scalar path: x_i = 1 - 2 b_i (bit 0 -> +1, bit 1 ->
// -1, as in sim/chain/chain.cc), y_i = reference::NoisySample(x_i, sigma, z_i) with
// z_i the normals of reference::ForEachNormal (the mapping of awgn_kernels.h),
// decided bit = (y_i < 0), error when it differs from b_i. So it gives exactly
// the count of the bits + reference::AddRealNoise + decisions, and it
// advances the noise stream like AddRealNoise, by ceil(n / 2) blocks; the
// random-bits variant draws the bits by bit_source.h's rule and advances the
// bit stream like GenerateRandomBits. ForceScalarKernels(true) /
// CAPGAP_FORCE_SCALAR route the public kernel here (the composed path then
// runs reference::AddRealNoise, so both agree), and the SIMD targets are
// tested against the composed path of their own target for equal counts.
#ifndef CAPGAP_BLOCKS_KERNELS_BPSK_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_BPSK_REFERENCE_H_

#include <cstddef>
#include <cstdint>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_reference.h"

namespace capgap::reference {

// The BPSK symbol of a bit (0 -> +1, 1 -> -1), exactly as the chain maps it.
inline float BpskSymbol(Bit b) { return 1.0f - 2.0f * static_cast<float>(b); }

// Bit errors of hard decisions on y_i = x_i + sigma z_i; bit i is bit(i).
// REQUIRES: every bit is 0 or 1.
template <class BitAt>
inline std::uint64_t CountBpskHardErrorsOf(std::size_t n, BitAt&& bit, float sigma,
                                           RngStream& noise) {
  const double s = sigma;
  std::uint64_t errors = 0;
  reference::ForEachNormal(n, noise, [&](std::size_t i, double z) {
    const Bit b = bit(i);
    CAPGAP_DCHECK(b <= 1);
    const float y = reference::NoisySample(BpskSymbol(b), s, z);
    const Bit decided = static_cast<Bit>(y < 0.0f);
    errors += static_cast<std::uint64_t>(decided ^ b);
  });
  return errors;
}

// One bit per byte (the layout of GenerateRandomBits).
inline std::uint64_t CountBpskHardErrors(std::span<const Bit> bits, float sigma, RngStream& noise) {
  return CountBpskHardErrorsOf(
      bits.size(), [&](std::size_t i) { return bits[i]; }, sigma, noise);
}

// Random bits drawn from bit_stream by the rule of blocks/source/bit_source.h
// (block j of the call supplies bits 128 j .. 128 j + 127, bit i = (word[(i %
// 128) / 32] >> (i % 32)) & 1; ceil(n_bits / 128) blocks), the same bits
// GenerateRandomBits would write. Relies on ForEachNormal visiting i in
// increasing order.
inline std::uint64_t CountBpskHardErrorsOfRandomBits(std::size_t n_bits, RngStream& bit_stream,
                                                     float sigma, RngStream& noise) {
  PhiloxBlock block{};
  return CountBpskHardErrorsOf(
      n_bits,
      [&](std::size_t i) {
        if (i % 128 == 0) block = bit_stream.NextBlock();
        return static_cast<Bit>((block[(i % 128) / 32] >> (i % 32)) & 1u);
      },
      sigma, noise);
}

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_BPSK_REFERENCE_H_
