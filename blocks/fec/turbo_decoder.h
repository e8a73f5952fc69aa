// Iterative turbo decoder, scalar reference: two soft-in soft-out BCJR
// constituent decoders (L. Bahl, J. Cocke, F. Jelinek, J. Raviv, IEEE Trans.
// Inf. Theory 20(2), 1974) exchanging extrinsic LLRs (C. Berrou, A. Glavieux,
// P. Thitimajshima, ICC 1993), in the log domain with either
//  * max_log_map: max*(a, b) = max(a, b), or
//  * log_map: the exact Jacobian logarithm max*(a, b) = max(a, b) +
//    log1p(exp(-|a - b|)) (P. Robertson, E. Villebrun, P. Hoeher, "A
//    comparison of optimal and sub-optimal MAP decoding algorithms operating
//    in the log domain", ICC 1995).
//
// Convention: L = ln P(b=0) / P(b=1), L > 0 favours 0. Branch metric
// gamma = (1/2) [(1 - 2u)(Ls + La) + (1 - 2p) Lp]; alpha starts in state 0,
// beta ends in state 0 after the m tail steps (whose input is forced by the
// state; their systematic and parity LLRs are the tail's). After each
// constituent decoder the a posteriori L(u_t) gives the extrinsic
// Le = L - Ls - La; the other decoder's a priori is extrinsic_scale * Le
// (through the interleaver: decoder 2's step t is information bit pi(t)).
// Metrics are normalised per step by subtracting alpha/beta of state 0.
//
// Stopping: a half-iteration is one constituent decoder. After each, the
// hard decisions (1 iff L < 0, natural order) are compared with those of the
// previous half-iteration; when they agree the decoder stops (converged),
// else it stops after max_iterations full iterations (2 max_iterations
// half-iterations). The decisions are those of the last half-iteration.
// FrameDecodeResult::iterations = half-iterations run, divided by 2 and
// rounded up (a stop after decoder 1 of iteration i counts i).
//
// Float arithmetic, deterministic (no FMA contraction assumed: the file is
// built like every other, the oracle of any vector kernel). Immutable;
// shared by all threads, each with its own Workspace. Decode allocates
// nothing.
#ifndef CAPGAP_BLOCKS_FEC_TURBO_DECODER_H_
#define CAPGAP_BLOCKS_FEC_TURBO_DECODER_H_

#include <cstddef>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/turbo_code.h"

namespace capgap {

enum class TurboDecoderKind { kMaxLogMap, kLogMap };
// Words "max_log_map", "log_map" (config key `decoder` with code = turbo).
Result<TurboDecoderKind> ParseTurboDecoderKind(std::string_view word);
std::string ToString(TurboDecoderKind kind);
// Common practice: 0.7 for max-log-MAP, 1 (no scaling) for log-MAP.
double DefaultExtrinsicScale(TurboDecoderKind kind);

struct TurboDecoderOptions {
  TurboDecoderKind kind = TurboDecoderKind::kMaxLogMap;
  float extrinsic_scale = 0.7f;
  int max_iterations = 8;
  // false: always run max_iterations full iterations (benchmarks).
  bool early_stop = true;
};

class TurboDecoder {
 public:
  static constexpr int kMaxIterations = 64;

  class Workspace {
   private:
    friend class TurboDecoder;
    std::vector<float> sys, par1, par2, tail;  // depunctured streams
    std::vector<float> sys2;                   // sys through the interleaver
    std::vector<float> apriori, app, extrinsic;
    std::vector<float> alpha;  // (K + m + 1) x S
    std::vector<float> beta, beta_next;
    std::vector<Bit> hard, hard_prev;
  };

  static Result<TurboDecoder> Create(const TurboCode& code, const TurboDecoderOptions& options);
  const TurboCode& code() const { return code_; }
  const TurboDecoderOptions& options() const { return options_; }
  Workspace MakeWorkspace() const;

  // One frame. REQUIRES: llrs.size() == code().coded_bits(),
  // info.size() == code().info_bits().
  FrameDecodeResult Decode(std::span<const float> llrs, std::span<Bit> info,
                           Workspace& ws) const;

  // One constituent (SISO) decoder over K information steps and the m tail
  // steps: a posteriori LLRs app[t] of the K inputs. Exposed for tests.
  // REQUIRES: sys, apriori, par, app have K entries; tail_sys, tail_par m.
  void Siso(std::span<const float> sys, std::span<const float> apriori,
            std::span<const float> par, std::span<const float> tail_sys,
            std::span<const float> tail_par, std::span<float> app, Workspace& ws) const;

 private:
  TurboDecoder(TurboCode code, const TurboDecoderOptions& options)
      : code_(std::move(code)), options_(options) {}
  template <bool kExact>
  void SisoImpl(std::span<const float> sys, std::span<const float> apriori,
                std::span<const float> par, std::span<const float> tail_sys,
                std::span<const float> tail_par, std::span<float> app, Workspace& ws) const;
  TurboCode code_;
  TurboDecoderOptions options_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_TURBO_DECODER_H_
