// Turbo code (parallel concatenated convolutional code; C. Berrou, A.
// Glavieux, P. Thitimajshima, ICC 1993): two identical recursive systematic
// convolutional (RSC) constituents, the second fed with the information bits
// through a turbo interleaver, both terminated; rate-1/3 mother code,
// optionally punctured. This file holds the constituent trellis, the
// interleavers and the encoder; turbo_decoder.h decodes.
//
// Polynomial convention (as ConvCode, common practice): octal, most
// significant bit = coefficient of D^0. `feedback` g0 and `feedforward` g1
// have memory m = 2..4 (m + 1 bits); (13, 15) is g0 = 1 + D^2 + D^3, g1 = 1 +
// D + D^3, the 8-state constituent of 3GPP TS 36.212 §5.1.3.2.1. g0 must have
// its D^0 and at least one further term (else the code is not recursive).
//
// Constituent trellis. The state holds the last m feedback-register values
// s = (a_{t-1} ... a_{t-m}) with a_{t-1} as its most significant bit (bit
// m-1). Input u_t gives a_t = u_t + sum_{i>=1} g0_i a_{t-i}, parity
// p_t = sum_{i>=0} g1_i a_{t-i} (mod 2) and the next state
// (a_t << (m-1)) | (s >> 1). The systematic output is u_t.
// Termination (3GPP TS 36.212 §5.1.3.2.2; common practice): m more steps with
// u_t = sum_{i>=1} g0_i a_{t-i}, i.e. a_t = 0, which drive the register to
// zero; the tail's systematic and parity bits are sent.
//
// Streams and order of the transmitted bits: for t = 0..K-1 the systematic
// bit x_t, the parity z1_t of encoder 1, the parity z2_t of encoder 2 (each
// only if kept by the puncture pattern); then encoder 1's tail x1_j, z1_j and
// encoder 2's tail x2_j, z2_j for j = 0..m-1 (never punctured). Coded length
// = kept(K) + 4m; rate() = K / coded length (tail counted in the rate).
// Encoder 2 sees u'_t = u_{pi(t)} (TurboInterleaver convention below).
//
// Puncturing: ConvCode's text form with three rows (x, z1, z2) of a common
// period P, e.g. "11,10,01" keeps every x and alternates z1/z2 (rate 1/2 up
// to the tail). Bit of stream r at step t is sent iff rows[r][t mod P] = 1.
//
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_FEC_TURBO_CODE_H_
#define CAPGAP_BLOCKS_FEC_TURBO_CODE_H_

#include <array>
#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/conv_code.h"

namespace capgap {

class RscCode {
 public:
  static constexpr int kMinMemory = 2;
  static constexpr int kMaxMemory = 4;
  static constexpr int kMaxStates = 1 << kMaxMemory;

  static Result<RscCode> Create(std::uint32_t feedback, std::uint32_t feedforward);

  std::uint32_t feedback() const { return feedback_; }
  std::uint32_t feedforward() const { return feedforward_; }
  int memory() const { return m_; }
  int num_states() const { return 1 << m_; }
  int NextState(int state, int input) const { return next_[Index(state, input)]; }
  int Parity(int state, int input) const { return parity_[Index(state, input)]; }
  // The input that drives a_t = 0 (termination) from `state`.
  int TailInput(int state) const { return tail_input_[static_cast<std::size_t>(state)]; }

  // Encodes `info` from state 0 (systematic = info), writes the parity and
  // returns the final state. REQUIRES: parity.size() == info.size().
  int Encode(std::span<const Bit> info, std::span<Bit> parity) const;
  // From `state`, m tail steps: tail_sys[j], tail_par[j]. Returns the final
  // state (0). REQUIRES: both spans have memory() entries.
  int Terminate(int state, std::span<Bit> tail_sys, std::span<Bit> tail_par) const;

 private:
  RscCode() = default;
  static std::size_t Index(int state, int input) {
    return static_cast<std::size_t>(state * 2 + input);
  }
  std::uint32_t feedback_ = 0;
  std::uint32_t feedforward_ = 0;
  int m_ = 0;
  std::array<std::uint8_t, 2 * kMaxStates> next_{};
  std::array<std::uint8_t, 2 * kMaxStates> parity_{};
  std::array<std::uint8_t, kMaxStates> tail_input_{};
};

enum class TurboInterleaverKind { kQpp, kSRandom };
// Words "qpp", "s_random" (config key `turbo_interleaver`).
Result<TurboInterleaverKind> ParseTurboInterleaverKind(std::string_view word);
std::string ToString(TurboInterleaverKind kind);

// f1, f2 of the QPP interleaver for K from 3GPP TS 36.212 Table 5.1.3-3 for
// the K shipped here (40, 1024, 6144; values from memory, checked to be
// permutations by Create and the tests); {0, 0} when K is not shipped.
std::array<std::uint32_t, 2> QppTableCoefficients(std::uint32_t k);
// The K values QppTableCoefficients knows, for messages: "40, 1024, 6144".
std::string QppTableSizes();

struct TurboInterleaverSpec {
  TurboInterleaverKind kind = TurboInterleaverKind::kQpp;
  std::uint32_t qpp_f1 = 0;  // 0 and 0: from the table
  std::uint32_t qpp_f2 = 0;
  std::uint32_t spread = 0;  // S-random S; 0: automatic, floor(sqrt(K / 2))
};

// Convention: encoder 2 reads u'_t = u_{pi(t)}.
//  * qpp: pi(t) = (f1 t + f2 t^2) mod K (J. Sun and O. Y. Takeshita,
//    "Interleavers for turbo codes using permutation polynomials over integer
//    rings", IEEE Trans. Inf. Theory 51(1), 2005; 3GPP TS 36.212 §5.1.3.2.3).
//  * s_random: a random permutation in which any two positions less than S
//    apart map to values at least S apart (S. Dolinar and D. Divsalar, "Weight
//    distributions for turbo codes using random and nonrandom permutations",
//    JPL TDA Progress Report 42-122, 1995): a random order drawn by
//    Fisher-Yates from RngStream(key, kTurboInterleaverPointIndex, attempt,
//    kCode), then filled position by position with the first remaining
//    candidate that keeps the spread; at a dead end a remaining candidate
//    swaps with an earlier position (scan from a random start) where both
//    keep the spread; if none does, attempt + 1 starts over (at most
//    kMaxSRandomAttempts). Reproducible from (seed, scheme name) for any K.
class TurboInterleaver {
 public:
  static constexpr std::uint32_t kMaxSRandomAttempts = 100;
  static Result<TurboInterleaver> Create(const TurboInterleaverSpec& spec, std::uint32_t k,
                                         PhiloxKey key);
  std::span<const std::uint32_t> permutation() const { return perm_; }
  std::uint32_t spread() const { return spread_; }  // S-random S (0 for QPP)
  std::uint32_t f1() const { return f1_; }
  std::uint32_t f2() const { return f2_; }

 private:
  std::vector<std::uint32_t> perm_;
  std::uint32_t spread_ = 0;
  std::uint32_t f1_ = 0, f2_ = 0;
};

// True when perm holds every value 0..size-1 once.
bool IsPermutation(std::span<const std::uint32_t> perm);

class TurboCode {
 public:
  // puncture: empty or three rows; the frame length K = info_bits >= 8.
  static Result<TurboCode> Create(const RscCode& rsc, TurboInterleaver interleaver,
                                  const PuncturePattern& puncture);

  const RscCode& rsc() const { return rsc_; }
  const TurboInterleaver& interleaver() const { return interleaver_; }
  const PuncturePattern& puncture() const { return puncture_; }
  std::size_t info_bits() const { return k_; }
  std::size_t coded_bits() const { return coded_; }
  std::size_t tail_bits() const { return static_cast<std::size_t>(4 * rsc_.memory()); }
  double rate() const { return static_cast<double>(k_) / static_cast<double>(coded_); }
  // Is stream r (0 = x, 1 = z1, 2 = z2) sent at step t < K?
  bool Kept(int stream, std::size_t t) const {
    return puncture_.empty() ? true
                             : puncture_.rows[static_cast<std::size_t>(stream)]
                                             [t % puncture_.rows[0].size()] != 0;
  }

  // REQUIRES: info.size() == info_bits(), coded.size() == coded_bits(),
  // scratch.size() >= 3 * info_bits() (interleaved input and two parities).
  void Encode(std::span<const Bit> info, std::span<Bit> coded, std::span<Bit> scratch) const;

  // The mother streams of one frame's LLRs, punctured positions 0 (erasure).
  struct Streams {
    std::span<float> sys, par1, par2;                         // K each
    std::span<float> tail1_sys, tail1_par, tail2_sys, tail2_par;  // m each
  };
  // REQUIRES: llrs.size() == coded_bits(); spans sized as above.
  void Depuncture(std::span<const float> llrs, const Streams& out) const;

 private:
  TurboCode(const RscCode& rsc, TurboInterleaver interleaver)
      : rsc_(rsc), interleaver_(std::move(interleaver)) {}
  RscCode rsc_;
  TurboInterleaver interleaver_;
  PuncturePattern puncture_;
  std::size_t k_ = 0;
  std::size_t coded_ = 0;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_TURBO_CODE_H_
