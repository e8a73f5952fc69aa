// Direct-form FIR kernels of the pulse-shaped chain: the interpolating
// (upsample by S, then filter) and the decimating (filter, then keep one
// sample per S) convolutions with real taps on complex interleaved samples.
// Plain interface (pointers, counts and a plan of plain vectors, no vector
// types); the implementation in fir_kernels.cc is compiled for several
// instruction sets (Google Highway dynamic dispatch) and picks the best one
// the running CPU supports, once per process. fir_reference.h holds the
// scalar oracle (double accumulation), which ForceScalarKernels(true)
// (awgn_kernels.h) and CAPGAP_FORCE_SCALAR builds run instead.
//
// What a call computes (indices relative to the pointers passed in):
//   FirInterpolate: out[d S + p] = sum_{i >= 0, iS + p < L} h[iS + p] x[d - i]
//                   for d in [0, n), p in [0, S): n S output samples;
//   FirDecimate:    out[k] = sum_{m = 0}^{L - 1} g[m] in[k S - m]
//                   for k in [0, n_out).
// Both read before the first element (the filter history: history() elements
// of the plan) and may read a few elements past the last one (lookahead());
// those must be readable and finite (zeros are the natural choice), and they
// only ever meet zero taps or feed outputs that are discarded, so their value
// does not change any output. The caller (blocks/shaping/fir_filter.cc) keeps
// [history | chunk | lookahead] in one line buffer per stream.
//
// Rounding. All targets sum in float in a fixed order that does not depend on
// where an output falls in a vector or in a call, so a stream gives the same
// samples however it is cut into calls (on a given target). Targets differ in
// the last bits (FMA vs multiply-add, vector width sets the partial sums);
// each agrees with the double oracle within a few float epsilons times
// sum |h| |x| (tests/blocks/kernels/fir_kernels_test.cc).
#ifndef CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_H_

#include <cstddef>
#include <span>
#include <vector>

#include "blocks/core/types.h"

namespace capgap {

// Widest vector any target may use, in complex samples (8 for AVX-512; the
// bounds below leave room for 1024-bit vectors). Sizes history and lookahead.
inline constexpr std::size_t kFirMaxComplexLanes = 16;

// Taps of an interpolating filter arranged for every target at once: the taps
// as (h[m], h[m]) float pairs (one per re / im of a sample), with `pad` zero
// pairs on either side, so a target reads any window of consecutive taps with
// one unaligned load. Immutable after MakeFirInterpolatorPlan().
struct FirInterpolatorPlan {
  int factor = 1;                 // S >= 1
  int tap_count = 0;              // L >= 1
  std::size_t pad = 0;            // zero taps each side of `padded`, in taps
  std::vector<float> taps;        // h, for the reference
  std::vector<float> padded;      // 2 (pad + L + pad) floats
  std::size_t history() const;    // symbols read before x[0]: ceil(L / S)
  std::size_t lookahead() const;  // symbols read after x[n - 1]
};

// Taps of a decimating filter as the dispatched target's tap vectors (built
// once, by that target: the layout depends on its vector width, see
// fir_kernels-inl.h), plus the plain taps for the reference. vector_floats is
// 0 when no SIMD target built a table (forced-scalar build, or a one-lane
// target); FirDecimate then always runs the reference.
struct FirDecimatorPlan {
  int factor = 1;                     // S >= 1
  int tap_count = 0;                  // L >= 1
  std::vector<float> taps;            // g, for the reference
  std::vector<float> table;           // tap_vectors * vector_floats floats
  std::size_t vector_floats = 0;      // floats per vector of the building target
  std::size_t padded_taps = 0;        // P >= L: taps incl. leading zeros
  std::size_t outputs_per_vector = 1; // m (see fir_kernels-inl.h)
  std::size_t history() const;        // samples read before in[0]
  std::size_t lookahead() const;      // samples read after in[n_out S - 1]
};

// REQUIRES: taps non-empty, factor >= 1 (checked by the filters' Create()).
FirInterpolatorPlan MakeFirInterpolatorPlan(std::span<const float> taps, int factor);
FirDecimatorPlan MakeFirDecimatorPlan(std::span<const float> taps, int factor);

// REQUIRES: x[-history() .. n + lookahead()) readable and finite; out holds
// n * factor samples and does not overlap x.
void FirInterpolate(const FirInterpolatorPlan& plan, const cf32* x, std::size_t n, cf32* out);

// REQUIRES: in[-history() .. n_out * factor + lookahead()) readable and
// finite; out holds n_out samples and does not overlap in.
void FirDecimate(const FirDecimatorPlan& plan, const cf32* in, std::size_t n_out, cf32* out);

// Instruction set FirInterpolate / FirDecimate run ("AVX3", "AVX2", "SSE4",
// ... or "SCALAR": forced scalar, or no SIMD target compiled).
const char* FirKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_FIR_KERNELS_H_
