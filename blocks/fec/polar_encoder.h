// Polar encoder for a PolarCode (polar_construction.h: x = u G_N, no
// bit-reversal permutation, rate matching by puncturing the first or
// shortening the last N - E coded bits).
//
// Non-systematic: u carries the K message bits at the information
// positions (ascending order), zeros elsewhere; x = u G_N.
// Systematic (systematic = yes, same frozen set): the two-transform method
// of G. Sarkis, I. Tal, P. Giard, A. Vardy, C. Thibeault, W. J. Gross,
// "Flexible and low-complexity encoding and decoding of systematic polar
// codes", IEEE Trans. Commun. 64(7), 2016: v = message at the information
// positions, w = v G_N, zero w's frozen positions, x = w G_N. Then x holds
// the message at the information positions whenever G_AA is an involution
// (true for domination-contiguous information sets, as reliability
// constructions give); Create checks it on 32 random messages and refuses
// the set otherwise (a failing set passes one message with probability at
// most 1/2, so the check misses with probability <= 2^-32).
#ifndef CAPGAP_BLOCKS_FEC_POLAR_ENCODER_H_
#define CAPGAP_BLOCKS_FEC_POLAR_ENCODER_H_

#include <span>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/polar_construction.h"

namespace capgap {

// x <- x G_N in place, N = x.size() a power of two: for each h = 1, 2, 4,
// ..., x_i ^= x_{i+h} where bit h of i is clear. G_N G_N = I over GF(2).
void PolarTransform(std::span<Bit> x);

class PolarEncoder {
 public:
  static Result<PolarEncoder> Create(const PolarCode& code, bool systematic);

  const PolarCode& code() const { return code_; }
  bool systematic() const { return systematic_; }

  // REQUIRES: message.size() == K, mother.size() == N (scratch, left
  // holding the mother codeword x), coded.size() == E.
  void Encode(std::span<const Bit> message, std::span<Bit> mother, std::span<Bit> coded) const;

  // The message a mother codeword estimate x carries: x at the information
  // positions (systematic) or those of u = x G_N. REQUIRES: x.size() ==
  // scratch.size() == N, message.size() == K.
  void Message(std::span<const Bit> x, std::span<Bit> scratch, std::span<Bit> message) const;

 private:
  PolarEncoder(PolarCode code, bool systematic) : code_(std::move(code)), systematic_(systematic) {}
  PolarCode code_;
  bool systematic_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_POLAR_ENCODER_H_
