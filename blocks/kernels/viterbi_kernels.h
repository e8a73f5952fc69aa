// Add-compare-select (ACS) kernel of the Viterbi decoder: the decoder's hot
// loop. Plain interface (pointers and counts, no vector types); the
// implementation in viterbi_kernels.cc is compiled for several instruction
// sets (Google Highway dynamic dispatch) and picks the best one the running
// CPU supports, once per process. viterbi_reference.h holds the scalar
// oracle, which every target matches bit for bit.
//
// Trellis (see blocks/fec/conv_code.h): S = 2^(K-1) states, H = S/2; new
// states j and j + H both have the predecessors 2j and 2j + 1. Branch metric
// of combination c = 2u + b (u = input, b = low bit of the predecessor), i.e.
// of the branch with register (u << (K-1)) | 2j | b:
//   bm_c(j) = sum_i signs[(c n + i) H + j] q_i,   signs = +1 (c_i = 0) or -1,
// a correlation metric: larger is better.
// One step t (counted from the start of the call), for j in [0, H):
//   r = old[0] if t % kViterbiRenormPeriod == 0, else 0    (renormalisation)
//   a = old[2j] - r, b = old[2j+1] - r
//   new[j]     = max(a + bm_0, b + bm_1),  bit j     = (b + bm_1 > a + bm_0)
//   new[j + H] = max(a + bm_2, b + bm_3),  bit j + H = (b + bm_3 > a + bm_2)
// with int16 saturating subtraction and addition. A set decision bit means
// "the predecessor was the odd state 2j+1"; ties choose the even one.
// Decision bits of step t go to decisions[t row_bytes ...], row_bytes =
// max(1, S/8), bit s of the row is bit (s % 8) of byte s / 8.
//
// Range. With |q_i| <= 127 and n <= 4 a branch metric is at most 508 in
// magnitude; after renormalisation every metric lies within (K-1) 2 508 <=
// 8128 of the state-0 metric (any state is K-1 steps from any other), and
// the kViterbiRenormPeriod - 1 = 3 steps until the next renormalisation move
// them by at most 3 x 508 more, so
// nothing saturates except the "impossible" start states of a terminated
// frame (initialised to kViterbiStartPenalty below), which lose every
// comparison; saturation is part of the oracle, so results stay bit-exact.
#ifndef CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_H_

#include <cstddef>
#include <cstdint>

namespace capgap {

// Initial metric of the states a terminated frame cannot start in.
constexpr std::int16_t kViterbiStartPenalty = -12000;
// Renormalise every this many steps (keeps the broadcast of old[0] off most
// steps of the loop-carried chain).
constexpr std::size_t kViterbiRenormPeriod = 4;
// Largest quantised LLR magnitude the kernels accept.
constexpr int kViterbiMaxQ = 127;

struct ViterbiAcsArgs {
  int constraint_length = 0;            // K in [3, 9]
  int num_outputs = 0;                  // n in [2, 4]
  const std::int16_t* signs = nullptr;  // [4][n][H], entries +1 / -1
};

// Runs `steps` ACS steps. metrics: S values, updated in place. q: steps * n
// quantised mother LLRs (|q| <= kViterbiMaxQ), q[t n + i] for output i of
// step t. decisions: steps * row_bytes bytes, written.
void ViterbiAcsInt16(const ViterbiAcsArgs& args, std::int16_t* metrics, const std::int16_t* q,
                     std::size_t steps, std::uint8_t* decisions);

// q[i] = trunc(c + copysign(1/2, c)), c = clamp(x[i] scale, -127, 127): the
// decoder's LLR quantiser (round half away from zero), vectorised; identical
// on every target and in the scalar reference.
void ViterbiQuantise(const float* x, std::size_t n, float scale, std::int16_t* q);

// Instruction set ViterbiAcsInt16 runs for this K ("AVX3", "AVX2", ... or
// "SCALAR": K < 5, forced scalar, or no SIMD target compiled).
const char* ViterbiKernelTarget(int constraint_length);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_VITERBI_KERNELS_H_
