// Exhaustive maximum-likelihood soft decoding of a short binary linear block
// code: the correlation of one frame's LLRs with all 2^k codewords and the
// argmax. Plain interface (pointers and counts, no vector types); the
// implementation in block_ml_kernels.cc is compiled for several instruction
// sets (Google Highway dynamic dispatch) and runs the best one the CPU
// supports, chosen once per process. block_ml_reference.h holds the scalar
// oracle, which every target matches exactly (the same codeword index for
// every frame, whatever the LLRs).
//
// Metric and decision. For codeword j (j = sum_t u_t 2^t, the codeword u G
// of information word u) the metric is the correlation
//   M_j = sum_{i=0}^{n-1} (1 - 2 c_{j,i}) L_i,   L > 0 favours bit 0,
// evaluated in float exactly as: acc = 0.0f; for i = 0, 1, ..., n-1:
// acc = acc + (c_{j,i} ? -L_i : L_i) (one rounding per add, in index order).
// The decision is the lowest j whose M_j is the largest (ties go to the
// lowest codeword index). A NaN metric never wins; if no metric exceeds -inf
// the decision is j = 0. Finite LLRs are expected (REQUIRES).
//
// Layout (the reason the targets agree). The SIMD kernel puts codewords
// across lanes, one codeword per lane, and each lane runs exactly the oracle's
// sequence of float adds: lane l of block b holds codeword j = b B + l (B
// lanes) and adds its n signed LLRs in index order. The sign of L_i in a lane
// is applied as an XOR of the IEEE sign bit, which gives exactly -L_i or L_i,
// so every lane's metric is bit-identical to the oracle's M_j; no
// re-association, no quantisation. The sign pattern is split to keep the
// tables small: with b0 = min(log2 B, k) low index bits, codeword j =
// c_low(j mod 2^b0) XOR c_high(j - j mod 2^b0), so per frame the kernel forms
// once the n vectors L_i XOR low_mask[i] (lane l: the sign of c_low(l) at i)
// and per block it XORs the block's one broadcast sign word high_mask[b][i].
// When 2^k < B the lanes l >= 2^k carry codeword 0's pattern (low mask 0):
// their metric equals M_0 bit for bit and their index is larger, so they can
// never be chosen.
#ifndef CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_H_
#define CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_H_

#include <cstddef>
#include <cstdint>
#include <vector>

namespace capgap {

// Limits of the exhaustive decoder (2^16 codewords of up to 256 bits).
inline constexpr int kBlockMlMaxInfoBits = 16;
inline constexpr int kBlockMlMaxLength = 256;
// 64-bit words of a packed codeword (bit i at word i / 64, bit i % 64).
inline constexpr int kBlockMlWords = 4;

// A view of the tables of one code; the storage (BlockMlTables) must outlive
// every call.
struct BlockMlView {
  int n = 0;  // code length, [1, kBlockMlMaxLength]
  int k = 0;  // information bits, [1, kBlockMlMaxInfoBits]
  // The oracle's table: 2^k packed codewords, kBlockMlWords words each.
  const std::uint64_t* codewords = nullptr;
  // The SIMD tables for `lanes` float lanes (0: none built).
  std::size_t lanes = 0;
  int low_bits = 0;                           // b0 = min(log2 lanes, k)
  const std::uint32_t* low_masks = nullptr;   // n x lanes sign words
  const std::uint32_t* high_masks = nullptr;  // (2^k >> b0) blocks x n sign words
};

// Owner of the tables of a code, built once (at a decoder's Create).
// Memory: 32 2^k bytes for the codewords plus 4 n (lanes + 2^k / B') bytes
// for the SIMD tables, B' = 2^b0 (2 MiB + 16 MiB at k = 16, n = 256 with
// 4 lanes; 128 KiB + 24 KiB for the (24, 12) Golay code with 16 lanes).
class BlockMlTables {
 public:
  BlockMlTables() = default;
  // rows: k packed generator rows (kBlockMlWords words each, bits >= n zero).
  // lanes: 0 (oracle only) or a power of two (the kernel's float lanes).
  // REQUIRES: n, k within the limits above.
  static BlockMlTables Build(int n, int k, const std::uint64_t* rows, std::size_t lanes);
  BlockMlView view() const;

 private:
  int n_ = 0;
  int k_ = 0;
  std::size_t lanes_ = 0;
  int low_bits_ = 0;
  std::vector<std::uint64_t> codewords_;
  std::vector<std::uint32_t> low_masks_;
  std::vector<std::uint32_t> high_masks_;
};

// Float lanes of the dispatched target whether or not the scalar path is
// forced (0 without a SIMD target): build the tables with it.
std::size_t BlockMlMaxLanes();

// Bytes of workspace BlockMlDecode needs for length n (any path; includes 64
// bytes of alignment slack): n lanes floats.
std::size_t BlockMlWorkspaceBytes(int n, std::size_t lanes);

// Decides `frames` frames. llrs: frames * n LLRs, frame-major (frame f at
// [f n, (f+1) n)), any alignment. best[f]: the decided codeword index j of
// frame f (the information word: u_t = bit t of j). workspace:
// BlockMlWorkspaceBytes(n, BlockMlMaxLanes()) bytes, any alignment. Runs the
// dispatched SIMD target when its lane count equals view.lanes and the scalar
// path is not forced (ForceScalarKernels, blocks/kernels/awgn_kernels.h),
// else the oracle. No allocation.
void BlockMlDecode(const BlockMlView& view, const float* llrs, std::size_t frames,
                   std::uint32_t* best, void* workspace);

// Instruction set BlockMlDecode runs for tables of `lanes` lanes ("AVX3",
// "AVX2", ..., "SCALAR" when forced, without a SIMD target, or when the
// lanes do not match the target).
const char* BlockMlKernelTarget(std::size_t lanes);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_BLOCK_ML_KERNELS_H_
