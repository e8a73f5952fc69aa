// SC decoding of polar codes with frames across SIMD lanes (Google Highway,
// run-time dispatch like the other kernel families of blocks/kernels). Plain
// interface: the code tree as the node kinds and frozen flags the scalar
// decoder computes (PolarScDecoder, blocks/fec/polar_decoder.h, which is the
// scalar oracle of this kernel), LLRs and decisions frame-major.
//
// Decisions (u_hat and x_hat) are those of the scalar decoder bit for bit on
// every target (polar_sc_kernels-inl.h says why); tested per compiled target
// in tests/blocks/kernels/polar_sc_kernels_test.cc. When the scalar kernels
// are forced (ForceScalarKernels, CAPGAP_FORCE_SCALAR) PolarScKernelActive()
// is false and callers run the scalar decoder.
#ifndef CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_H_

#include <cstddef>
#include <cstdint>

#include "blocks/core/types.h"

namespace capgap {

// Node kinds, per node in heap order: the node of level s (size 2^s)
// starting at leaf j sits at (1 << (m - s)) + (j >> s).
enum PolarNodeKind : std::uint8_t {
  kPolarNodePlain = 0,
  kPolarNodeRate0 = 1,
  kPolarNodeRate1 = 2,
  kPolarNodeRepetition = 3,
  kPolarNodeSpc = 4,
};

struct PolarScTree {
  int m = 0;                             // N = 2^m
  const std::uint8_t* kind = nullptr;    // 2N entries (index 0 unused)
  const std::uint8_t* frozen = nullptr;  // N entries, 1 = frozen
};

// True when PolarScDecodeFrames runs a SIMD target (not forced scalar).
bool PolarScKernelActive();

// Frames decoded side by side by the chosen target (its float lanes).
std::size_t PolarScKernelLanes();

// Floats of scratch PolarScDecodeFrames needs for codes of 2^m bits on the
// chosen target (fixed for the process).
std::size_t PolarScScratch(int m);

// Decodes `frames` frames and writes the decisions at `count` positions of
// u (from_x false) or x (from_x true): out[f * count + j] = bit
// positions[j] of frame f (a polar code's message is u, or x when
// systematic, at its information positions; all N positions give u_hat or
// x_hat). REQUIRES: PolarScKernelActive(); llr: frames * N; positions in
// [0, N); out: frames * count bits; scratch: PolarScScratch(tree.m) floats.
void PolarScDecodeFrames(const PolarScTree& tree, const float* llr, std::size_t frames,
                         const int* positions, std::size_t count, bool from_x, Bit* out,
                         float* scratch);

// Target the kernel runs ("AVX3", ..., or the scalar name when forced).
const char* PolarScKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_POLAR_SC_KERNELS_H_
