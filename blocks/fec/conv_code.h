// Binary convolutional code of rate 1/n (n = 2..4), constraint length
// K = 3..9, optionally punctured, terminated with K-1 zero tail bits or
// tail-biting. The encoder and the shared trellis description used by the
// Viterbi and BCJR decoders and by the distance-spectrum enumeration.
//
// Generator convention (common practice): generator g_i is written in octal;
// as a K-bit number its most significant bit (bit K-1) is the tap on the
// current input bit u_t and its least significant bit (bit 0) the tap on
// u_{t-K+1}. E.g. K=3 (5,7): 5 = 101 gives c0 = u_t + u_{t-2}, 7 = 111 gives
// c1 = u_t + u_{t-1} + u_{t-2} (mod 2).
//
// Trellis. The state is the K-1 previous inputs, s = (u_{t-1} u_{t-2} ...
// u_{t-K+1}) with u_{t-1} as its most significant bit (bit K-2). The encoder
// register is reg = (u_t << (K-1)) | s, the outputs c_i = parity(g_i & reg),
// the next state s' = reg >> 1 = (u_t << (K-2)) | (s >> 1). Hence the input
// that led to s' is its MSB, and the two predecessors of s' are
// ((s' << 1) & (S-1)) | b, b = 0, 1 (S = 2^(K-1) states): states j and
// j + S/2 share the predecessors 2j and 2j+1 (a butterfly).
//
// Output order: trellis step t emits c_0 .. c_{n-1} (generator order), minus
// the punctured ones. Puncturing: an n x P matrix of 0/1; at trellis step t,
// bit c_i is sent iff pattern[i][t mod P] = 1. The pattern runs over the whole
// mother sequence including the tail. Text form (ParsePuncturePattern): one
// row per generator, rows separated by commas, each row a string of '0'/'1'
// of the common period P, e.g. "110,101" (IEEE Std 802.11a-1999, s17.3.5.6,
// rate 3/4; from memory) or "11,10" (rate 2/3).
//
// Effective rate (DEVELOPERS.md, Conventions): EffectiveRate(L) = L / CodedLength(L): the
// tail of a terminated code and puncturing are both included.
//
// Create() rejects catastrophic codes (also those made catastrophic by the
// puncturing): a cycle of zero output weight in the period-P trellis other
// than the all-zero self-loop (the graph test is equivalent to the
// Massey-Sain gcd condition for unpunctured codes).
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_FEC_CONV_CODE_H_
#define CAPGAP_BLOCKS_FEC_CONV_CODE_H_

#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

enum class Termination { kTerminated, kTailBiting };
// Words "tail" (K-1 zero tail bits) and "tailbiting", the words of the config
// key `termination` and of the HDF5 attribute; an error message lists them.
Result<Termination> ParseTermination(std::string_view word);
std::string ToString(Termination termination);

// "133,171" -> {0133, 0171}: comma-separated octal words (spaces around a word
// are ignored). Errors name the offending word, e.g.
//   "generators '133,18': '18' is not an octal number".
Result<std::vector<std::uint32_t>> ParseGenerators(std::string_view text);
// Inverse: "133,171".
std::string GeneratorsToString(std::span<const std::uint32_t> generators);

// Puncture pattern: rows[i][p] != 0 keeps bit c_i at phase p. Empty = none.
struct PuncturePattern {
  std::vector<std::vector<std::uint8_t>> rows;
  bool empty() const { return rows.empty(); }
  int period() const { return rows.empty() ? 1 : static_cast<int>(rows[0].size()); }
};
// "110,101" -> rows {1,1,0}, {1,0,1} (see the header comment). Checks the
// characters and the equal row lengths; the row count and the rate are
// checked by ConvCode::Create against the generators.
Result<PuncturePattern> ParsePuncturePattern(std::string_view text);
std::string ToString(const PuncturePattern& pattern);

struct ConvCodeSpec {
  std::vector<std::uint32_t> generators;  // octal values, e.g. {0133, 0171}
  int constraint_length = 0;              // K; 0 = highest tap of the generators
  PuncturePattern puncture;               // empty = unpunctured
  Termination termination = Termination::kTerminated;
};

class ConvCode {
 public:
  static constexpr int kMinConstraintLength = 3;
  static constexpr int kMaxConstraintLength = 9;
  static constexpr int kMinOutputs = 2;
  static constexpr int kMaxOutputs = 4;

  static Result<ConvCode> Create(const ConvCodeSpec& spec);

  int constraint_length() const { return k_; }
  int num_outputs() const { return n_; }  // n of the mother code
  int num_states() const { return 1 << (k_ - 1); }
  int period() const { return period_; }  // P (1 if unpunctured)
  // Coded bits kept per period (n P if unpunctured).
  int kept_per_period() const { return kept_per_period_; }
  bool punctured() const { return !spec_.puncture.empty(); }
  Termination termination() const { return spec_.termination; }
  const std::vector<std::uint32_t>& generators() const { return spec_.generators; }
  const PuncturePattern& puncture() const { return spec_.puncture; }
  // Rate of the (punctured) code without tail: P / kept_per_period().
  double asymptotic_rate() const { return static_cast<double>(period_) / kept_per_period_; }

  // Trellis steps for L information bits: L + K - 1 terminated, L tail-biting.
  std::size_t TrellisSteps(std::size_t info_bits) const;
  // Mother (unpunctured) coded bits: n TrellisSteps(L).
  std::size_t MotherLength(std::size_t info_bits) const;
  // Transmitted coded bits for L information bits (tail and puncturing in).
  std::size_t CodedLength(std::size_t info_bits) const;
  // L / CodedLength(L).
  double EffectiveRate(std::size_t info_bits) const;

  // Output label of the branch leaving `state` with input `input`: bit i is c_i.
  std::uint32_t BranchLabel(int state, int input) const {
    return labels_[static_cast<std::size_t>((input << (k_ - 1)) | state)];
  }
  int NextState(int state, int input) const { return (input << (k_ - 2)) | (state >> 1); }
  // Is c_i sent at trellis step t?
  bool Kept(int output, std::size_t step) const {
    return punctured() ? spec_.puncture.rows[static_cast<std::size_t>(output)]
                                            [step % static_cast<std::size_t>(period_)] != 0
                       : true;
  }

  // REQUIRES: coded.size() == CodedLength(info.size()); bits 0/1; for
  // tail-biting info.size() >= K - 1 (the start state is the last K-1 bits).
  void Encode(std::span<const Bit> info, std::span<Bit> coded) const;

  // Inserts LLR 0 (an erasure) at every punctured position of the mother
  // sequence. REQUIRES: llrs.size() == CodedLength(L),
  // mother_llrs.size() == MotherLength(L) for the same L.
  void Depuncture(std::span<const float> llrs, std::span<float> mother_llrs) const;

 private:
  ConvCode() = default;
  ConvCodeSpec spec_;
  int k_ = 0;
  int n_ = 0;
  int period_ = 1;
  int kept_per_period_ = 0;
  std::vector<std::uint32_t> labels_;  // by register value (u << (K-1)) | s
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_CONV_CODE_H_
