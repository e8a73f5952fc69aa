// Fixed-point min-sum LDPC decoding kernel (int8 or int16 lanes): the hot
// loop of every coded LDPC sweep. Plain interface (pointers and counts, no
// vector types); the implementation in ldpc_kernels.cc is compiled for
// several instruction sets (Google Highway dynamic dispatch) and runs the
// best one the CPU supports, chosen once per process. ldpc_reference.h holds
// the scalar one-frame oracle of the same arithmetic, which every target
// matches bit for bit (decisions, iteration counts, convergence flags), plus
// the float references of min-sum and sum-product.
//
// Layout. The kernel decodes LdpcFixedMaxLanes(lane) frames at once, one
// frame per SIMD lane (int8: 64 on AVX3, 32 on AVX2, 16 on SSE4/SSSE3/EMU128;
// int16: half that): every message is a vector whose lane l belongs to the
// frame in lane l, so the decoder walks the Tanner graph once for all of them
// and needs no gather or shuffle inside the iterations. A call takes any
// number of frames and streams them through the lanes: when a lane's frame
// stops it hands its result out and takes the next frame, so frames that
// need many iterations do not hold up the others.
//
// Arithmetic (integers; the oracle spells out every step in the same order):
//  * Channel: q = trunc(c + copysign(1/2, c)), c = clamp(L llr_scale,
//    +-channel_clip) in float (round half away from zero); L > 0 favours 0.
//  * Posterior P[v] (init q[v]) and check-to-variable messages c[e] (init 0).
//  * Check update of row r (min-sum; J. Chen and M. Fossorier, "Near optimum
//    universal belief propagation based decoding of low-density parity check
//    codes", IEEE Trans. Commun. 50(3), 2002; title from memory):
//      t_k = P[v_k] - c[e_k]                            variable-to-check
//      min1, min2 = two smallest |t_k| (both start at the lane maximum,
//      127 or 32767), s = XOR of all t_k
//      normalised: M(x) = min((x norm_mul + 128) >> 8, message_clip)
//                  (norm_mul = round(256 alpha); round half up, so alpha =
//                  0.75 gives (3x + 2) >> 2 below the clip)
//      offset:     M(x) = min(max(x - offset_q, 0), message_clip)
//      c_new[e_k] = (|t_k| == min1 ? M(min2) : M(min1)), negated when the
//                   sign bit of (t_k XOR s) is set
//    Ties: when several edges share the minimum, min2 == min1, so the rule is
//    exact without an index of the minimum.
//  * Layered schedule (rows in index order, posterior updated at once):
//      P[v_k] = t_k + c_new[e_k].
//  * Flooding schedule: every row's c_new from the previous iteration's P
//    (t_k as above), then for every variable P[v] = q[v] + sum of its c.
//  * Range: REQUIRES channel_clip + max_col_degree message_clip <= the lane
//    maximum (LdpcMessageClipFor gives the largest such clip). Then no sum
//    ever leaves the lane range: |P| <= channel_clip + deg(v) message_clip,
//    |t| smaller, so this is exact min-sum on clipped channel values and
//    clipped messages; nothing saturates. (Saturating posteriors are not
//    harmless in a layered decoder: a clipped P no longer contains the
//    messages later subtracted from it, and with 8-bit P and messages as
//    large as P the posteriors of a noiseless word collapsed to wrong signs
//    within 4 iterations in an earlier design of this kernel.)
//  * Decision: bit = 1 iff P < 0 (P = 0 decides 0). Syndrome: parity of the
//    decisions over each row.
//  * Early stop (early_stop): the syndrome of the channel decisions is
//    checked before iteration 1 and after every iteration; a frame stops at
//    the first zero syndrome and returns those decisions (iterations =
//    number of full iterations run, 0 if the channel word is a codeword).
//    Without early stop every frame runs max_iterations. converged = zero
//    syndrome of the decisions returned. Each frame's result is the one it
//    gets decoded alone, whatever shares the lanes with it.
//  * Idle lanes (waiting for a refill, or no frame left) compute on,
//    unobserved.
#ifndef CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_H_

#include <cstddef>
#include <cstdint>

#include "blocks/core/types.h"

namespace capgap {

// Check-node rule of the float references (ldpc_reference.h).
enum class LdpcCheckRule { kSumProduct, kMinSumNormalized, kMinSumOffset };

// Outcome of one frame.
struct LdpcFrameResult {
  int iterations = 0;      // full iterations run
  bool converged = false;  // zero syndrome of the returned decisions
};

// Lane type of the fixed-point kernel.
enum class LdpcLane { kInt8, kInt16 };
constexpr int LdpcLaneMax(LdpcLane lane) { return lane == LdpcLane::kInt8 ? 127 : 32767; }

// Shift of the normalisation multiplier: alpha is applied as
// (x norm_mul + 2^(kLdpcNormShift-1)) >> kLdpcNormShift.
constexpr int kLdpcNormShift = 8;

// The Tanner graph: views of an LdpcCode (blocks/fec/ldpc_code.h), which
// must outlive every call.
struct LdpcGraph {
  int n = 0;                           // variables
  int m = 0;                           // checks
  int edges = 0;                       // E
  const int* row_start = nullptr;      // m + 1
  const int* edge_variable = nullptr;  // E
  const int* col_start = nullptr;      // n + 1
  const int* col_edge = nullptr;       // E
  int max_row_degree = 0;
  int max_col_degree = 0;
};

struct LdpcFixedArgs {
  LdpcGraph graph;
  LdpcLane lane = LdpcLane::kInt8;
  // Schedule and stopping.
  bool layered = true;
  int max_iterations = 1;  // >= 1
  bool early_stop = true;
  // Arithmetic (see the header comment).
  float llr_scale = 4.0f;  // quantisation steps per LLR unit
  int channel_clip = 31;   // in [1, lane maximum]
  int message_clip = 32;   // in [1, lane maximum]; see the range rule
  bool offset = false;     // false: normalised min-sum
  int norm_mul = 192;      // in [0, 256]
  int offset_q = 2;        // in [0, lane maximum]
};

// Largest message clip with channel_clip + max_col_degree clip <= the lane
// maximum (0 if none).
constexpr int LdpcMessageClipFor(LdpcLane lane, int max_col_degree, int channel_clip) {
  return max_col_degree > 0 ? (LdpcLaneMax(lane) - channel_clip) / max_col_degree : 0;
}

// Frames the dispatched kernel decodes at once (SIMD lanes); 1 when the
// scalar path runs (forced, or no SIMD target).
std::size_t LdpcFixedLanes(LdpcLane lane);
// The dispatched target's lanes whether or not the scalar path is forced (1
// without a SIMD target). Size workspaces with it.
std::size_t LdpcFixedMaxLanes(LdpcLane lane);

// Bytes of workspace LdpcDecodeFixed needs when the kernel has `lanes`
// lanes, on any path (includes 64 bytes of alignment slack).
std::size_t LdpcFixedWorkspaceBytes(const LdpcFixedArgs& args, std::size_t lanes);

// Decodes `frames` >= 1 frames. llrs: frames * n channel LLRs, frame-major
// (frame f at [f n, (f+1) n)). decided: frames * n bits (0/1). results: one
// per frame. workspace: LdpcFixedWorkspaceBytes(args,
// LdpcFixedMaxLanes(args.lane)) bytes, any alignment. No allocation.
void LdpcDecodeFixed(const LdpcFixedArgs& args, const float* llrs, std::size_t frames, Bit* decided,
                     LdpcFrameResult* results, void* workspace);

// Instruction set LdpcDecodeFixed runs ("AVX3", "AVX2", ..., "SCALAR" when
// forced by ForceScalarKernels / CAPGAP_FORCE_SCALAR or no SIMD target).
const char* LdpcKernelTarget();

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_LDPC_KERNELS_H_
