// Scalar oracle for the Gaussian noise kernels of awgn_kernels.h.
//
// Header-only and deliberately plain: one Philox block at a time through the
// scalar Philox4x32_10 of blocks/core/rng_stream.h, the Box-Muller transform
// evaluated in double with the C library's log/log1p/sqrt/sin/cos, and one
// rounding to float at the end. The SIMD targets in awgn_kernels.cc are tested
// against these functions, and ForceScalarKernels(true) / CAPGAP_FORCE_SCALAR
// route the public kernels here, so it stays after SIMD exists.
//
// Mapping (the one stated in awgn_kernels.h, shared by every target): normal
// pair j of a call (samples 2j, 2j+1) comes from Philox block
// stream.block_index() + j, words (w0, w1, w2, w3):
//   u1 = (w1 2^32 + w0 + 1/2) 2^-64,  u2 = (w2 + 1/2) 2^-32,
//   z0 = r cos(2 pi u2),  z1 = r sin(2 pi u2),  r = sqrt(-2 ln u1).
// Two details keep the double evaluation accurate to a few double ulps
// everywhere, so that it can judge float kernels with a tolerance of a few
// float epsilons:
//  * ln u1 for u1 > 1/2 is computed as log1p(-(1 - u1)), where
//    1 - u1 = (~x + 1/2) 2^-64 is exact in the integer domain (x = w1 2^32 +
//    w0). Rounding u1 itself to double would lose the relative accuracy of
//    1 - u1, i.e. of r near 0.
//  * 2 pi u2 is split exactly in integers into q pi/2 + phi with |phi| <= pi/4
//    (q = nearest quarter turn), and cos/sin of the full angle follow from the
//    quadrant identities. std::cos(2 pi u2) alone has an absolute error of
//    ~1e-15 near its zeros, where |cos| can be as small as pi 2^-32 = 7e-10,
//    i.e. a relative error of up to ~1e-6. The naive formula is kept as
//    NaiveNormalPair so that a test can check the two agree.
#ifndef CAPGAP_BLOCKS_KERNELS_AWGN_REFERENCE_H_
#define CAPGAP_BLOCKS_KERNELS_AWGN_REFERENCE_H_

#include <cmath>
#include <complex>
#include <cstddef>
#include <cstdint>
#include <numbers>
#include <span>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"

namespace capgap::reference {

// -2 ln u1 of a block, in double.
inline double MinusTwoLnU1(const PhiloxBlock& w) {
  const std::uint64_t x = (static_cast<std::uint64_t>(w[1]) << 32) | w[0];
  double ln_u1;
  if ((w[1] >> 31) != 0u) {
    // u1 > 1/2: 1 - u1 = (2^64 - x - 1/2) 2^-64 = (~x + 1/2) 2^-64.
    const double one_minus_u1 = (static_cast<double>(~x) + 0.5) * 0x1p-64;
    ln_u1 = std::log1p(-one_minus_u1);
  } else {
    ln_u1 = std::log((static_cast<double>(x) + 0.5) * 0x1p-64);
  }
  return -2.0 * ln_u1;
}

// The exact normal pair (z0, z1) of one Philox block, in double.
inline void NormalPair(const PhiloxBlock& w, double& z0, double& z1) {
  const double r = std::sqrt(MinusTwoLnU1(w));
  // 2 pi u2 = q pi/2 + phi: q is the nearest quarter turn to (w2 + 1/2) 2^-32,
  // d = w2 - q 2^30 (mod 2^32, as a signed value in [-2^29, 2^29)), so that
  // phi = 2 pi (d + 1/2) 2^-32 = pi (2d + 1) 2^-32 and |phi| <= pi/4.
  const std::uint32_t w2 = w[2];
  const std::uint32_t q = ((w2 + (1u << 29)) >> 30) & 3u;
  const auto d = static_cast<std::int32_t>(w2 - (q << 30));
  const double phi = (2.0 * static_cast<double>(d) + 1.0) * (std::numbers::pi * 0x1p-32);
  const double c = std::cos(phi);
  const double s = std::sin(phi);
  // theta = q pi/2 + phi, so (cos theta, sin theta) is (c, s), (-s, c),
  // (-c, -s) or (s, -c) for q = 0, 1, 2, 3.
  const double cos_theta = (q == 0) ? c : (q == 1) ? -s : (q == 2) ? -c : s;
  const double sin_theta = (q == 0) ? s : (q == 1) ? c : (q == 2) ? -s : -c;
  z0 = r * cos_theta;
  z1 = r * sin_theta;
}

// Textbook form of the same pair (no quadrant split); only for cross-checks.
inline void NaiveNormalPair(const PhiloxBlock& w, double& z0, double& z1) {
  const double r = std::sqrt(MinusTwoLnU1(w));
  const double theta = 2.0 * std::numbers::pi * ((static_cast<double>(w[2]) + 0.5) * 0x1p-32);
  z0 = r * std::cos(theta);
  z1 = r * std::sin(theta);
}

// Number of Philox blocks a call producing n real normals consumes.
inline std::uint32_t BlocksForNormals(std::size_t n) {
  CAPGAP_DCHECK((n + 1) / 2 <= std::size_t{0xFFFFFFFFu});
  return static_cast<std::uint32_t>((n + 1) / 2);
}

// Calls sink(i, z_i) in double for i = 0 .. n-1, then advances the stream by
// ceil(n / 2) blocks (the z1 of the last block is dropped when n is odd).
template <class Sink>
inline void ForEachNormal(std::size_t n, RngStream& stream, Sink&& sink) {
  const std::uint32_t blocks = BlocksForNormals(n);
  PhiloxCounter counter = stream.counter();
  for (std::uint32_t j = 0; j < blocks; ++j) {
    double z0 = 0.0;
    double z1 = 0.0;
    NormalPair(Philox4x32_10(counter, stream.key()), z0, z1);
    ++counter[0];  // wraps modulo 2^32 exactly as RngStream does
    const std::size_t i = 2 * static_cast<std::size_t>(j);
    sink(i, z0);
    if (i + 1 < n) sink(i + 1, z1);
  }
  stream.Advance(blocks);
}

inline void FillStandardNormal(std::span<float> out, RngStream& stream) {
  reference::ForEachNormal(out.size(), stream,
                           [&](std::size_t i, double z) { out[i] = static_cast<float>(z); });
}

// The scalar path's noisy sample x + sigma z: evaluated in double, one
// rounding to float. AddRealNoise and the fused BPSK oracle of
// bpsk_reference.h both use it.
inline float NoisySample(float x, double sigma, double z) {
  return static_cast<float>(static_cast<double>(x) + sigma * z);
}

inline void AddRealNoise(std::span<float> samples, float sigma, RngStream& stream) {
  const double s = sigma;
  reference::ForEachNormal(samples.size(), stream, [&](std::size_t i, double z) {
    samples[i] = reference::NoisySample(samples[i], s, z);
  });
}

// Complex sample k takes block k: re += sigma z_2k, im += sigma z_2k+1.
inline void AddComplexNoise(std::span<cf32> samples, float sigma_per_dim, RngStream& stream) {
  // std::complex<float> is layout-compatible with float[2] ([complex.numbers]).
  reference::AddRealNoise(
      std::span<float>(reinterpret_cast<float*>(samples.data()), 2 * samples.size()), sigma_per_dim,
      stream);
}

}  // namespace capgap::reference

#endif  // CAPGAP_BLOCKS_KERNELS_AWGN_REFERENCE_H_
