// Gray-labelled M-PSK and square M-QAM mapper, unit average symbol energy.
//
// Labels: a symbol's m = log2(M) bits b[0..m-1] form the label
// l = b[0] 2^(m-1) + ... + b[m-1] (b[0] is the most significant bit), and
// points()[l] is its constellation point.
//  * BPSK: bit 0 -> +1, bit 1 -> -1 on the real axis.
//  * M-PSK (M >= 4): point k = exp(j (2 pi k / M + pi / M)) ... rotated so that
//    QPSK is (+-1 +-j)/sqrt 2; label of point k is the binary-reflected Gray
//    code of k, so neighbours on the circle differ in one bit.
//  * Square M-QAM, L = sqrt(M): the first m/2 bits Gray-label the in-phase
//    L-PAM level, the last m/2 the quadrature level; levels are
//    (2i - L + 1) / sqrt(2 (M - 1) / 3), bit value 0 on the positive side of
//    each axis for the most significant bit.
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_MAPPING_MAPPER_H_
#define CAPGAP_BLOCKS_MAPPING_MAPPER_H_

#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/mapping/modulation.h"

namespace capgap {

class Mapper {
 public:
  static Result<Mapper> Create(const Modulation& modulation);

  const Modulation& modulation() const { return modulation_; }
  int bits_per_symbol() const { return bits_per_symbol_; }
  int order() const { return modulation_.order; }
  // Constellation points indexed by label.
  std::span<const cf32> points() const { return points_; }
  // For square QAM: the L-PAM levels of one axis indexed by the axis label
  // (m/2 bits, MSB first); empty for PSK.
  std::span<const float> pam_levels() const { return pam_levels_; }

  // REQUIRES: bits.size() == bits_per_symbol() * symbols.size(); bits are 0/1.
  void Map(std::span<const Bit> bits, std::span<cf32> symbols) const;

 private:
  Modulation modulation_;
  int bits_per_symbol_ = 1;
  std::vector<cf32> points_;
  std::vector<float> pam_levels_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_MAPPER_H_
