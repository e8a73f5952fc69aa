// PolarEncoder: the butterfly transform, rate matching and the systematic
// two-transform encoder with its check.
#include "blocks/fec/polar_encoder.h"

#include <algorithm>
#include <bit>
#include <cstdint>
#include <cstring>
#include <utility>
#include <vector>

#include "blocks/core/hash.h"

namespace capgap {

void PolarTransform(std::span<Bit> x) {
  const std::size_t n = x.size();
  CAPGAP_DCHECK((n & (n - 1)) == 0);
  std::size_t first = 1;
  if (n >= 8) {
    // Stages h = 1, 2, 4 inside each 8-byte word (bits are bytes 0/1; byte
    // i + h sits 8 h bits above byte i in a little-endian load, and the
    // masks keep the XOR to the lower byte of each pair), then h >= 8 by
    // whole runs the compiler vectorises.
    static_assert(std::endian::native == std::endian::little);
    for (std::size_t b = 0; b < n; b += 8) {
      std::uint64_t w;
      std::memcpy(&w, x.data() + b, 8);
      w ^= (w >> 8) & 0x00FF00FF00FF00FFull;
      w ^= (w >> 16) & 0x0000FFFF0000FFFFull;
      w ^= (w >> 32) & 0x00000000FFFFFFFFull;
      std::memcpy(x.data() + b, &w, 8);
    }
    first = 8;
  }
  for (std::size_t h = first; h < n; h *= 2) {
    for (std::size_t b = 0; b < n; b += 2 * h) {
      for (std::size_t i = b; i < b + h; ++i) x[i] ^= x[i + h];
    }
  }
}

Result<PolarEncoder> PolarEncoder::Create(const PolarCode& code, bool systematic) {
  PolarEncoder enc(code, systematic);
  if (systematic) {
    const auto n = static_cast<std::size_t>(code.mother_length);
    const auto k = static_cast<std::size_t>(code.message_bits);
    std::vector<Bit> msg(k), back(k), mother(n), coded(static_cast<std::size_t>(code.length));
    SplitMix64Generator rng(0x706f6c6172ull);  // fixed: the check is a property of the set
    for (int trial = 0; trial < 32; ++trial) {
      for (auto& b : msg) b = static_cast<Bit>(rng.Next() & 1u);
      enc.Encode(msg, mother, coded);
      for (std::size_t i = 0; i < k; ++i) {
        back[i] = mother[static_cast<std::size_t>(code.info_positions[i])];
      }
      if (back != msg) {
        return Status::Error(
            "systematic encoding by two transforms does not reproduce the message on this "
            "information set (it is not domination contiguous); use systematic = no");
      }
    }
  }
  return enc;
}

void PolarEncoder::Encode(std::span<const Bit> message, std::span<Bit> mother,
                          std::span<Bit> coded) const {
  CAPGAP_DCHECK(message.size() == static_cast<std::size_t>(code_.message_bits));
  CAPGAP_DCHECK(mother.size() == static_cast<std::size_t>(code_.mother_length));
  CAPGAP_DCHECK(coded.size() == static_cast<std::size_t>(code_.length));
  std::fill(mother.begin(), mother.end(), Bit{0});
  for (std::size_t i = 0; i < message.size(); ++i) {
    mother[static_cast<std::size_t>(code_.info_positions[i])] = message[i];
  }
  PolarTransform(mother);
  if (systematic_) {
    for (std::size_t i = 0; i < mother.size(); ++i) {
      if (code_.frozen[i]) mother[i] = 0;
    }
    PolarTransform(mother);
  }
  const auto first = static_cast<std::size_t>(code_.first_transmitted());
  std::copy_n(mother.begin() + static_cast<std::ptrdiff_t>(first), coded.size(), coded.begin());
}

void PolarEncoder::Message(std::span<const Bit> x, std::span<Bit> scratch,
                           std::span<Bit> message) const {
  std::span<const Bit> src = x;
  if (!systematic_) {
    std::copy(x.begin(), x.end(), scratch.begin());
    PolarTransform(scratch);
    src = scratch;
  }
  for (std::size_t i = 0; i < message.size(); ++i) {
    message[i] = src[static_cast<std::size_t>(code_.info_positions[i])];
  }
}

}  // namespace capgap
