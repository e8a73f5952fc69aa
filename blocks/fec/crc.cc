// Crc: bit-serial division by g(D) (a shift register with feedback taps at
// the polynomial's coefficients).
#include "blocks/fec/crc.h"

#include <string>

namespace capgap {

Result<Crc> Crc::Create(int bits, std::uint32_t polynomial) {
  if (bits < 1 || bits > kStopBits) {
    return Status::Error("CRC width " + std::to_string(bits) + ": must be in [1, 24]");
  }
  if (polynomial >> bits != 0) {
    return Status::Error("CRC polynomial has a term of degree >= " + std::to_string(bits) +
                         " (the leading term D^" + std::to_string(bits) +
                         " is implied; give the low " + std::to_string(bits) + " coefficients)");
  }
  if ((polynomial & 1u) == 0) {
    return Status::Error("CRC polynomial must have the term D^0 (an odd value)");
  }
  return Crc(bits, polynomial);
}

std::uint32_t Crc::Compute(std::span<const Bit> message) const {
  const std::uint32_t mask = (bits_ == 32) ? ~0u : ((1u << bits_) - 1u);
  const int top = bits_ - 1;
  std::uint32_t reg = 0;
  for (Bit b : message) {
    const std::uint32_t feedback = ((reg >> top) & 1u) ^ (b & 1u);
    reg = (reg << 1) & mask;
    if (feedback) reg ^= polynomial_;
  }
  return reg;
}

void Crc::Attach(std::span<const Bit> message, std::span<Bit> parity) const {
  CAPGAP_DCHECK(parity.size() == static_cast<std::size_t>(bits_));
  const std::uint32_t r = Compute(message);
  for (int i = 0; i < bits_; ++i) {
    parity[static_cast<std::size_t>(i)] = static_cast<Bit>((r >> (bits_ - 1 - i)) & 1u);
  }
}

bool Crc::Check(std::span<const Bit> block) const {
  CAPGAP_DCHECK(block.size() >= static_cast<std::size_t>(bits_));
  const std::size_t k = block.size() - static_cast<std::size_t>(bits_);
  const std::uint32_t r = Compute(block.first(k));
  for (int i = 0; i < bits_; ++i) {
    if (block[k + static_cast<std::size_t>(i)] != ((r >> (bits_ - 1 - i)) & 1u)) return false;
  }
  return true;
}

}  // namespace capgap
