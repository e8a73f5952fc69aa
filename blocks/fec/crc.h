// Cyclic redundancy check of any width 1..24 over a bit sequence, as used by
// CRC-aided polar list decoding (polar_channel_code.h) to pick the final path.
//
// Convention (common practice, the one of 3GPP TS 38.212 §5.1): the
// polynomial g(D) = D^w + p_{w-1} D^{w-1} + ... + p_0 is given by its low w
// coefficients `polynomial` (leading term implied, bit w-1 = p_{w-1}), e.g.
// 0x621 for D^11 + D^10 + D^9 + D^5 + 1. Message bits are taken first bit
// first as the highest-degree coefficients; the register starts at zero, no
// reflection, no final XOR. The parity is the remainder of M(D) D^w divided
// by g(D), appended most significant coefficient first, so message + parity
// is divisible by g(D).
#ifndef CAPGAP_BLOCKS_FEC_CRC_H_
#define CAPGAP_BLOCKS_FEC_CRC_H_

#include <cstdint>
#include <span>

#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

class Crc {
 public:
  static constexpr int kStopBits = 24;
  // 1 <= bits <= 24; polynomial < 2^bits with p_0 = 1 (odd: a generator
  // divisible by D would waste a parity bit).
  static Result<Crc> Create(int bits, std::uint32_t polynomial);

  int bits() const { return bits_; }
  std::uint32_t polynomial() const { return polynomial_; }

  // The remainder as a w-bit number (bit w-1 = coefficient of D^{w-1}).
  std::uint32_t Compute(std::span<const Bit> message) const;
  // REQUIRES: parity.size() == bits(). Writes the remainder, D^{w-1} first.
  void Attach(std::span<const Bit> message, std::span<Bit> parity) const;
  // True when the last bits() bits of `block` are the parity of the rest.
  // REQUIRES: block.size() >= bits().
  bool Check(std::span<const Bit> block) const;

 private:
  Crc(int bits, std::uint32_t polynomial) : bits_(bits), polynomial_(polynomial) {}
  int bits_;
  std::uint32_t polynomial_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_CRC_H_
