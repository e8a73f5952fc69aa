// Exhaustive maximum-likelihood soft decoder of a short binary linear block
// code (blocks/fec/block_code.h): per frame it correlates the channel LLRs
// with all 2^k codewords and decides the best one, so it is exact ML
// (minimum codeword error probability for equiprobable codewords) on any
// memoryless binary-input channel whose LLRs it is given (J. G. Proakis and
// M. Salehi, Digital Communications, 5th ed., 2008, ch. 7, soft-decision
// decoding of linear block codes; from memory).
//
// Input convention: L = ln P(c=0|y) / P(c=1|y), L > 0 favours 0 (the
// project's convention). For codeword c the metric is the correlation
// sum_i (1 - 2 c_i) L_i, maximised; on BPSK/AWGN (0 -> +1, L = 4 y / N0) it
// is the ML metric. Ties go to the lowest codeword index j = sum_t u_t 2^t;
// the float arithmetic is fixed exactly (blocks/kernels/block_ml_kernels.h),
// so the decision never depends on the SIMD target or on ForceScalarKernels.
// Output: the k information bits u of the decided codeword u G per frame
// (u G is one-to-one because G has full rank).
//
// Cost: n 2^k adds per frame (98,304 for the Golay (24, 12) code), run on
// SIMD lanes holding codewords (blocks/kernels/block_ml_kernels.h). Frames
// go to the kernel frames_per_call at a time; Decode takes any whole number
// of frames.
//
// Immutable after Create(); one instance may be shared by all threads, each
// with its own Workspace. Decode allocates nothing.
#ifndef CAPGAP_BLOCKS_FEC_BLOCK_ML_DECODER_H_
#define CAPGAP_BLOCKS_FEC_BLOCK_ML_DECODER_H_

#include <cstddef>
#include <cstdint>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/block_code.h"
#include "blocks/kernels/block_ml_kernels.h"

namespace capgap {

struct BlockMlOptions {
  int frames_per_call = 64;  // in [1, kMaxFramesPerCall]
};

class BlockMlDecoder {
 public:
  static constexpr int kMaxFramesPerCall = 1 << 16;

  // Per-thread mutable state: the kernel's scratch and the decided indices
  // of one call.
  class Workspace {
   public:
    Workspace() = default;
    std::size_t frames_per_call() const { return index_.size(); }

   private:
    friend class BlockMlDecoder;
    std::vector<std::uint8_t> scratch_;
    std::vector<std::uint32_t> index_;
  };

  // Refuses frames_per_call outside [1, kMaxFramesPerCall]
  // ("block ML decoder: frames_per_call = 0: must be in [1, 65536]").
  static Result<BlockMlDecoder> Create(const BlockCode& code, const BlockMlOptions& options = {});

  Workspace MakeWorkspace() const;

  const BlockCode& code() const { return code_; }
  int frames_per_call() const { return frames_per_call_; }
  // Instruction set the kernel runs now ("AVX3", ..., "SCALAR").
  const char* KernelTarget() const;

  // Decodes F = llrs.size() / n frames. REQUIRES: llrs.size() == F n,
  // info.size() == F k, F >= 0, finite LLRs, ws from MakeWorkspace().
  // info of frame f = the information bits of the decided codeword.
  void Decode(std::span<const float> llrs, std::span<Bit> info, Workspace& ws) const;
  // The same decisions as codeword indices j (index.size() == F).
  void DecodeIndices(std::span<const float> llrs, std::span<std::uint32_t> index,
                     Workspace& ws) const;

 private:
  explicit BlockMlDecoder(BlockCode code) : code_(std::move(code)) {}

  BlockCode code_;
  int frames_per_call_ = 0;
  BlockMlTables tables_;  // codewords and the SIMD tables of the dispatched target
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_BLOCK_ML_DECODER_H_
