// Float LDPC decoding kernel with frames across SIMD lanes: normalised and
// offset min-sum, and sum-product in float32. Plain interface (pointers and
// counts, no vector types); the implementation in ldpc_float_kernels.cc is
// compiled for several instruction sets (Google Highway dynamic dispatch) and
// runs the best one the CPU supports, chosen once per process.
//
// Oracles, matched bit for bit by every target (decisions, iteration counts,
// convergence flags; compiled with -ffp-contract=off, so no multiply and add
// are fused but those the sum-product oracle writes as std::fma):
//  * min-sum (both rules): reference::LdpcDecodeFloatFrame of
//    ldpc_reference.h, the float min-sum decoder the project had before this
//    kernel, operation for operation (t = P - c, the two smallest |t| from a
//    cap of kLdpcFloatMinSumCap, alpha min or max(min - beta, 0), sign from
//    the sign bits, P = t + c or L + sum c in column order). So configs that
//    chose arithmetic = float keep their counts.
//  * sum-product (kSumProduct32): reference::LdpcDecodeSpaFrame of
//    ldpc_spa_reference.h, a float32 check-node rule of its own with
//    polynomial exp2/log2 that the kernel evaluates with the same operations
//    (see there); it is not the double-precision tanh rule of
//    LdpcDecodeFloatFrame, whose libm tanh/atanh no vector code reproduces.
//
// Layout. B = Lanes(ScalableTag<float>) lanes (16 on AVX3, 8 on AVX2, 4 on
// SSE4/SSSE3/EMU128), one frame per lane: every per-variable and per-edge
// quantity is a row of B floats (L[v B + l], P[v B + l], c[e B + l]), so the
// decoder walks the Tanner graph once for all lanes with whole-vector loads
// and stores and no gather. A call takes any number of frames and streams
// them through the lanes: a lane whose frame stops (zero syndrome with early
// stop, or max_iterations) hands out its result and takes the next frame
// after the iteration, so no frame waits for a slow neighbour. A frame's
// arithmetic never depends on its lane or neighbours; each result is the one
// the oracle gives for that frame alone. Idle lanes compute on, unobserved.
//
// Schedules, stopping and decisions are those of ldpc_kernels.h: layered
// (rows in index order, posteriors updated at once) or flooding; with early
// stop the syndrome is checked before iteration 1 and after every iteration;
// bit = 1 iff P < 0.
#ifndef CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_H_

#include <cstddef>

#include "blocks/core/types.h"
#include "blocks/kernels/ldpc_kernels.h"

namespace capgap {

// Check-node rule of the float lane kernel.
enum class LdpcFloatRule { kMinSumNormalized, kMinSumOffset, kSumProduct32 };

struct LdpcFloatKernelArgs {
  LdpcGraph graph;
  LdpcFloatRule rule = LdpcFloatRule::kMinSumNormalized;
  bool layered = true;
  int max_iterations = 1;  // >= 1
  bool early_stop = true;
  float normalization = 0.75f;  // normalised min-sum factor
  float offset = 0.5f;          // offset min-sum, LLR units
};

// Largest row degree kSumProduct32 accepts (its per-row products stay below
// 2^(degree - 1); ldpc_spa_reference.h).
constexpr int kLdpcSpaMaxRowDegree = 128;

// Frames the dispatched kernel decodes at once for `rule`; 1 when the scalar
// path runs (forced, no SIMD target, or for kSumProduct32 a target without a
// native fused multiply-add: SSE4, SSSE3, EMU128; ldpc_spa_reference.h).
std::size_t LdpcFloatLanes(LdpcFloatRule rule);
// The dispatched target's lanes for `rule` whether or not the scalar path is
// forced (1 when it has none). Size workspaces with it.
std::size_t LdpcFloatMaxLanes(LdpcFloatRule rule);

// Bytes of workspace LdpcDecodeFloatLanes needs when the kernel has `lanes`
// lanes, on any path (includes 64 bytes of alignment slack).
std::size_t LdpcFloatWorkspaceBytes(const LdpcFloatKernelArgs& args, std::size_t lanes);

// Decodes `frames` >= 1 frames. llrs: frames * n channel LLRs, frame-major.
// decided: frames * n bits; results: one per frame. workspace:
// LdpcFloatWorkspaceBytes(args, LdpcFloatMaxLanes(args.rule)) bytes, any
// alignment.
// REQUIRES: kSumProduct32 only with max_row_degree <= kLdpcSpaMaxRowDegree.
// No allocation.
void LdpcDecodeFloatLanes(const LdpcFloatKernelArgs& args, const float* llrs, std::size_t frames,
                          Bit* decided, LdpcFrameResult* results, void* workspace);

// Instruction set LdpcDecodeFloatLanes runs for `rule` ("AVX3", ...,
// "SCALAR").
const char* LdpcFloatKernelTarget(LdpcFloatRule rule);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_LDPC_FLOAT_KERNELS_H_
