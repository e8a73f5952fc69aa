// Iterative decoder for binary LDPC codes (LdpcCode): sum-product and
// normalised / offset min-sum (J. Chen and M. Fossorier, IEEE Trans. Commun.
// 50(3), 2002), flooding or layered schedule, per-frame early stop on a zero
// syndrome.
//
// Input convention: L = ln P(c=0|y) / P(c=1|y), L > 0 favours 0 (the
// project's convention; BPSK 0 -> +1 on AWGN gives L = 4 y / N0). Output:
// hard decisions of the posteriors, bit = 1 iff P < 0 (P = 0 decides 0).
//
// Schedules. Flooding: every check updates from the previous iteration's
// posteriors, then every posterior is recomputed. Layered: checks are taken
// row by row in index order and each updates the posteriors of its variables
// at once (check-serial; D. E. Hocevar, "A reduced complexity decoder
// architecture via layered decoding of LDPC codes", IEEE SiPS 2004; from
// memory); it typically converges in about half the iterations (measured in
// tests/blocks/fec/ldpc_decoder_test.cc: 0.54 of flooding's mean at 2 dB).
//
// Stopping. With early_stop the syndrome of the channel decisions is checked
// before the first iteration and after each one; a frame stops at the first
// zero syndrome (FrameResult::iterations = full iterations run, 0 when the
// received word is already a codeword). Without it every frame runs
// max_iterations. converged = zero syndrome of the returned decisions. Each
// frame's result is the one it gets decoded alone, whatever else is decoded
// in the same call (the fixed-point kernel streams the frames through its
// SIMD lanes, a new frame entering a lane when the previous one stops).
//
// Arithmetic (LdpcDecoderOptions::arithmetic):
//  * Fixed point (min-sum; the default via kAuto): the frame-interleaved
//    kernel of blocks/kernels/ldpc_kernels.h, one frame per SIMD lane of the
//    best target (Highway dynamic dispatch), bit-exact with its scalar
//    oracle in ldpc_reference.h (which runs, with the same results, under
//    ForceScalarKernels(true) or CAPGAP_FORCE_SCALAR). The messages are
//    clipped so that no posterior can leave the lane range (channel clip +
//    max variable degree x message clip <= lane maximum), which makes the
//    integer decoder exact min-sum on clipped values:
//      int8:  4 steps per LLR unit (q = round(4 L), round half away from
//             zero), channel clip +-31 (L = +-7.75), message clip
//             (127 - 31) / d_v,max (32 = 8 LLR for d_v = 3; 24 for 4);
//      int16: 16 steps per LLR unit, channel clip +-1023 (L = +-63.9),
//             message clip min(2047, (32767 - 1023) / d_v,max).
//    kAuto uses int8 when d_v,max <= 4 (64 lanes on AVX3), else int16 (32).
//    kInt8 is refused when its message clip would fall below 8 (2 LLR,
//    d_v,max > 12). Normalisation: M(x) = (x round(256 alpha) + 128) >> 8,
//    i.e. alpha to 1/256, round half up (0.75: (3x + 2) >> 2). Offset:
//    M(x) = max(x - round(steps beta), 0), beta in LLR units (0.5: 2 int8
//    steps, exact).
//    Chosen by measurement: 4 steps per LLR is the coarsest that matched
//    float (int8 curves within 0.01 dB of float in the waterfall).
//    Error floor: int8 messages stop at 8 LLR, which can hold a decoder in
//    a trapping set that float escapes. For error-floor studies (FER below
//    ~1e-4) choose int16 or float. The measurements behind both:
//    docs/performance_notes.md, "LDPC decoder arithmetic".
//  * float, min-sum: the float kernel of blocks/kernels/ldpc_float_kernels.h,
//    one frame per float lane of the best target, bit-exact with the float
//    min-sum reference of ldpc_reference.h (the scalar decoder this option
//    ran before the kernel existed, so its counts are unchanged).
//  * float, sum-product (and kAuto for sum-product): the scalar one-frame
//    reference of ldpc_reference.h, tanh rule in double with clipping to
//    +-30 (see there), one frame at a time. Kept as it is so that existing
//    configs keep their counts.
//  * float32, sum-product: the float kernel's own float32 rule
//    (blocks/kernels/ldpc_spa_reference.h: probability-domain pairs,
//    polynomial exp2/log2, messages to 43 bits = 29.8 LLR), frames across
//    the float lanes (on targets with a native fused multiply-add; the
//    oracle elsewhere), bit-exact with its scalar oracle on every target and
//    about 58x faster than the double path (tests/bench/ldpc_bench.cc,
//    docs/performance_notes.md); its decisions differ from the
//    double path's in rare frames (a different rounding of the same
//    algorithm), so it is a value of its own. Float32 with min-sum is the
//    same decoder as float. Refused for codes with a check of degree above
//    128 (kLdpcSpaMaxRowDegree).
//
// Immutable after Create(); one instance may be shared by all threads, each
// with its own Workspace. Decode allocates nothing and makes no virtual call.
#ifndef CAPGAP_BLOCKS_FEC_LDPC_DECODER_H_
#define CAPGAP_BLOCKS_FEC_LDPC_DECODER_H_

#include <cstddef>
#include <cstdint>
#include <memory>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/ldpc_code.h"
#include "blocks/kernels/ldpc_float_kernels.h"
#include "blocks/kernels/ldpc_kernels.h"

namespace capgap {

enum class LdpcAlgorithm { kSumProduct, kMinSumNormalized, kMinSumOffset };
// "sum_product", "min_sum_normalized", "min_sum_offset".
Result<LdpcAlgorithm> ParseLdpcAlgorithm(std::string_view word);
std::string ToString(LdpcAlgorithm algorithm);

enum class LdpcSchedule { kFlooding, kLayered };
// "flooding", "layered".
Result<LdpcSchedule> ParseLdpcSchedule(std::string_view word);
std::string ToString(LdpcSchedule schedule);

// kAuto: fixed point for min-sum (int8 or int16, see above), float for
// sum-product. kInt8 and kInt16 are refused for sum-product. kFloat32: see
// above (for min-sum the same decoder as kFloat).
enum class LdpcArithmetic { kAuto, kInt8, kInt16, kFloat, kFloat32 };
// "auto", "int8", "int16", "float", "float32".
Result<LdpcArithmetic> ParseLdpcArithmetic(std::string_view word);
std::string ToString(LdpcArithmetic arithmetic);

struct LdpcDecoderOptions {
  LdpcAlgorithm algorithm = LdpcAlgorithm::kMinSumNormalized;
  LdpcSchedule schedule = LdpcSchedule::kLayered;
  int max_iterations = 50;      // in [1, 10000]
  float normalization = 0.75f;  // normalised min-sum factor, (0, 1]
  float offset = 0.5f;          // offset min-sum, in LLR units, in [0, 100]
  bool early_stop = true;       // stop a frame when its syndrome is zero
  LdpcArithmetic arithmetic = LdpcArithmetic::kAuto;
};

class LdpcDecoder {
 public:
  static constexpr float kInt8LlrScale = 4.0f;
  static constexpr int kInt8ChannelClip = 31;
  static constexpr float kInt16LlrScale = 16.0f;
  static constexpr int kInt16ChannelClip = 1023;
  static constexpr int kInt16MessageClipMax = 2047;
  static constexpr int kAutoInt8MaxVariableDegree = 4;
  static constexpr int kInt8MinMessageClip = 8;

  // All mutable state of Decode; made once per thread by MakeWorkspace.
  class Workspace {
   public:
    Workspace() = default;

   private:
    friend class LdpcDecoder;
    std::vector<std::uint8_t> fixed_;  // kernel workspace (fixed-point path)
    std::vector<std::uint8_t> lanes_;  // kernel workspace (float lane path)
    std::vector<float> float_;         // one frame (scalar double sum-product)
    std::vector<double> double_;
  };

  // {int iterations = 0 (full iterations run); bool converged = false (zero
  // syndrome at exit)}: the kernel's type, so the kernel writes results in
  // place.
  using FrameResult = LdpcFrameResult;

  // Validates the options; messages name the option, its value and the rule.
  static Result<LdpcDecoder> Create(std::shared_ptr<const LdpcCode> code,
                                    const LdpcDecoderOptions& options);

  Workspace MakeWorkspace() const;

  const LdpcCode& code() const { return *code_; }
  const LdpcDecoderOptions& options() const { return options_; }
  // True when a fixed-point path runs (min-sum with kAuto, kInt8, kInt16).
  bool fixed_point() const { return fixed_; }
  // The fixed-point kernel's arguments (lane type, clips; meaningful when
  // fixed_point()).
  const LdpcFixedArgs& fixed_args() const { return fixed_args_; }
  // True when the float lane kernel runs (min-sum in float or float32,
  // sum-product in float32).
  bool float_lanes() const { return float_lanes_; }
  // The float lane kernel's arguments (meaningful when float_lanes()).
  const LdpcFloatKernelArgs& float_args() const { return float_args_; }
  // Frames decoded at once (SIMD lanes of the fixed-point or float lane
  // path, else 1).
  // Decode streams any number of frames through the lanes, so this is a
  // hint: pass at least a few times as many frames per call to keep the
  // lanes busy. Changes if ForceScalarKernels is toggled.
  int batch_frames() const;
  // E.g. "AVX3 int8 x64 lanes", "AVX2 int16 x16 lanes", "AVX3 float x16
  // lanes", "AVX3 float32 x16 lanes" (sum-product float32), "scalar int8",
  // "scalar float".
  std::string kernel_target() const;

  // llrs: frames * n channel LLRs, frame-major (frame f at [f n, (f+1) n)).
  // decided: frames * n hard decisions (0/1); results: one per frame, which
  // fixes frames >= 1. Any frame count.
  // REQUIRES: ws made by this decoder's MakeWorkspace().
  void Decode(std::span<const float> llrs, std::span<Bit> decided, std::span<FrameResult> results,
              Workspace& ws) const;

 private:
  LdpcDecoder() = default;

  std::shared_ptr<const LdpcCode> code_;
  LdpcDecoderOptions options_;
  bool fixed_ = true;
  bool float_lanes_ = false;
  LdpcFixedArgs fixed_args_;
  LdpcFloatKernelArgs float_args_;
};

// The kernel's view of a code (pointers into `code`, which must outlive it;
// largest row and column degrees computed).
LdpcGraph LdpcGraphOf(const LdpcCode& code);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_DECODER_H_
