// Demappers for the Mapper's constellations: hard decision, exact log-MAP LLRs
// (log-sum-exp over the constellation) and max-log LLRs.
//
// LLR convention (the whole project): L(b) = ln P(b=0 | y) / P(b=1 | y) for
// equiprobable symbols; L > 0 favours bit 0. For BPSK (0 -> +1) L = 4 y / N0,
// computed from Re y only. The hard decision of an LLR is 1 when L < 0, else 0.
// With complex noise variance n0 (N0) the exact LLR is
//   ln sum_{x: b=0} exp(-|y-x|^2/N0) - ln sum_{x: b=1} exp(-|y-x|^2/N0);
// max-log keeps the largest term of each sum (common practice; DEVELOPERS.md, Conventions).
// Paths:
//  * BPSK, QPSK: the exact LLR is linear (L = 4 Re y / N0; QPSK
//    L(b0) = 2 sqrt2 Im y / N0, L(b1) = 2 sqrt2 Re y / N0), so kMaxLog and
//    kLogMap give the same, exact, values.
//  * Square Gray QAM separates into two L-PAM problems (I bits from Re y, Q
//    bits from Im y: the other axis' factor cancels between the two sums), so
//    the sums run over the L levels of one axis, not the M points; the results
//    equal the full 2-D sums.
//  * M-PSK, M >= 8: the full sums over the M points.
//  * Generic constellations (points and labels as data, modulation.h): the
//    brute-force reference GenericDemapSymbol (generic_demapper.h) with
//    h = 1, in double precision, scalar (no kernel, no dispatch).
// Log-MAP evaluates exp and log with branch-free polynomial approximations
// (errors about 1e-7, see blocks/kernels/demap_reference.h); every sum is
// shifted by its own largest term, so nothing overflows or underflows for any
// y, N0. The inner loops are the kernels of blocks/kernels/demap_kernels.h
// (Highway dispatch chosen once per process, DemapKernelTarget(); --scalar
// runs their scalar oracle), bit-identical on every target.
// With a per-symbol channel state (y = h x + n, noise variance N0 per symbol,
// coherent detection with known h, common practice) the metric is
// |y - h x|^2 / N0, evaluated by brute force over the M points
// (generic_demapper.h): exact but slow. A state with gain 1 and per-symbol
// N0 (an equalised combiner output, fading_channel.h) keeps the fast
// kernels: max-log LLRs at N0 = 1 scaled by 1 / N0 per symbol (max-log is
// linear in 1 / N0), log-MAP one kernel call per symbol.
// Hard decisions are the label of the nearest point (per-axis slicer for QAM,
// signs for BPSK/QPSK, the angular sector for M-PSK); ties, which have
// probability zero under noise, are broken arbitrarily.
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_
#define CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_

#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/channel/channel_state.h"
#include "blocks/kernels/demap_kernels.h"
#include "blocks/mapping/mapper.h"

namespace capgap {

enum class DemapMethod { kHard, kMaxLog, kLogMap };
// Words hard, maxlog, logmap; an error message lists them.
Result<DemapMethod> ParseDemapMethod(std::string_view word);
std::string ToString(DemapMethod method);
std::string DemapMethodChoices();

class Demapper {
 public:
  static Result<Demapper> Create(const Mapper& mapper, DemapMethod method);

  DemapMethod method() const { return method_; }
  int bits_per_symbol() const { return bits_per_symbol_; }

  // Soft output with the configured method (kHard gives +-1 "LLRs" of the
  // nearest point's label: +1 for bit 0, -1 for bit 1).
  // LLRs of symbol s go to llrs[m s .. m s + m - 1] (bit b[0] first).
  // REQUIRES: llrs.size() == bits_per_symbol() * received.size(); n0 > 0 and a
  // normal float (1 / n0 finite).
  void Demap(std::span<const cf32> received, float n0, std::span<float> llrs) const;

  // The same with a per-symbol channel state: symbol s has gain
  // state.gain[s] (1 when empty) and noise variance state.n0[s]
  // (state.n0_uniform when empty). With both spans empty this is exactly
  // Demap(received, state.n0_uniform, llrs). REQUIRES: non-empty spans have
  // received.size() entries; every N0 > 0 and normal; gains non-zero.
  void Demap(std::span<const cf32> received, const ChannelStateView& state,
             std::span<float> llrs) const;

  // Nearest-point (minimum distance) decisions, label bits of that point.
  // REQUIRES: bits.size() == bits_per_symbol() * received.size().
  void HardDecide(std::span<const cf32> received, std::span<Bit> bits) const;

  // The constellation tables the demap kernels read (valid while this
  // Demapper lives); for tests and benchmarks of blocks/kernels. Not used
  // (and not meaningful) for generic constellations.
  DemapKernelArgs kernel_args() const;

 private:
  Demapper() = default;
  DemapMethod method_ = DemapMethod::kMaxLog;
  Modulation modulation_;
  int bits_per_symbol_ = 1;
  std::vector<cf32> points_;
  std::vector<float> pam_levels_;
  DemapKernelPath path_ = DemapKernelPath::kBpsk;
  int axis_bits_ = 0;         // p = m / 2 for square QAM
  float level_scale_ = 1.0f;  // s: the QAM levels are s (L - 1 - 2j)
  // M-PSK (M >= 8): points by label split into Re and Im, and the directions
  // of the M/2 sector boundary lines 2 pi i / M.
  std::vector<float> point_re_, point_im_;
  std::vector<float> boundary_cos_, boundary_sin_;
  // Generic constellation: every call goes through GenericDemapSymbol.
  bool generic_ = false;
  static constexpr std::size_t kMaxGenericBits = 6;  // M <= 64 (modulation.h)
};

// Hard decisions of LLRs: bit = (llr < 0). REQUIRES equal sizes.
void LlrToBits(std::span<const float> llrs, std::span<Bit> bits);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_DEMAPPER_H_
