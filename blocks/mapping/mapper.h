// Gray-labelled M-PSK and square M-QAM mapper, unit average symbol energy.
//
// Labels: a symbol's m = log2(M) bits b[0..m-1] form the label
// l = b[0] 2^(m-1) + ... + b[m-1] (b[0] is the most significant bit), and
// points()[l] is its constellation point. Gray(k) = k XOR (k >> 1) is the
// binary-reflected Gray code.
//  * BPSK: bit 0 -> +1, bit 1 -> -1 on the real axis.
//  * M-PSK (M >= 4): point k = 0..M-1, counted counter-clockwise, is
//    exp(j (2 pi k / M + pi / M)) and carries label Gray(k), so neighbours on
//    the circle differ in one bit. QPSK is (+-1 +-j)/sqrt 2 with labels 00, 01,
//    11, 10 at 45, 135, 225, 315 degrees: b[0] = 1 iff Im x < 0 and b[1] = 1
//    iff Re x < 0. 8-PSK sits at odd multiples of pi/8.
//  * Square M-QAM, L = sqrt(M), p = m/2: the first p bits are the axis label of
//    the in-phase level, the last p bits that of the quadrature level. On each
//    axis level j = 0..L-1, counted from the most positive, is
//    (L - 1 - 2j) / sqrt(2 (M - 1) / 3) and carries axis label Gray(j), so the
//    most significant axis bit is 0 on the positive side and neighbouring
//    levels differ in one bit. 4-QAM: b[0] = 1 iff Re x < 0, b[1] = 1 iff
//    Im x < 0.
//  * Generic constellations (ModulationFamily::kGeneric): points()[labels[i]]
//    = points[i] of the GenericConstellation (modulation.h).
// All constellations have E|x|^2 = 1 over equiprobable labels.
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
  // (m/2 bits, MSB first), so points()[l] = pam_levels()[l >> p] +
  // j pam_levels()[l & (L - 1)]; empty for PSK and generic constellations.
  std::span<const float> pam_levels() const { return pam_levels_; }

  // Symbol s takes bits[m s .. m s + m - 1] (b[0] first).
  // REQUIRES: bits.size() == bits_per_symbol() * symbols.size(); bits are 0/1
  // (only the lowest bit of each byte is read).
  void Map(std::span<const Bit> bits, std::span<cf32> symbols) const;

 private:
  Modulation modulation_;
  int bits_per_symbol_ = 1;
  std::vector<cf32> points_;
  std::vector<float> pam_levels_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_MAPPING_MAPPER_H_
