// Gray-labelled PSK / square QAM mapper: builds the label -> point table once
// in Create() and maps a whole frame by table lookup.
#include "blocks/mapping/mapper.h"

#include <bit>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <numbers>

namespace capgap {
namespace {

constexpr unsigned Gray(unsigned k) { return k ^ (k >> 1); }

// Symbol s: label from bits[kBits s ..] (MSB first), then one table load.
// For kBits <= 8 the label comes from one 8-byte load and one multiply: the
// bytes are read as a little-endian integer x (byte k = b[k] at bit 8k; bytes
// beyond the symbol are masked off), and (x * 0x8040201008040201) >> (64 -
// kBits) moves b[k] to bit kBits-1-k. The multiplier's term 2^(63 - 9j) takes
// byte j to bit 63 - j; every other product b[k] 2^(8k + 63 - 9j), k != j,
// lands above bit 63 (k > j) or below bit 56 (k < j) at a position unique to
// (k, j), so nothing carries into the top byte. The last symbols, whose 8-byte
// window would run past the buffer, take the plain loop. Masking each byte to
// its low bit keeps the table index in range whatever the bytes hold.
template <int kBits>
void MapFixed(const Bit* bits, std::size_t n_symbols, const cf32* table, cf32* symbols) {
  std::size_t s = 0;
  if constexpr (kBits == 1) {
    // BPSK: the table is {+1, -1}; arithmetic instead of a lookup vectorises.
    // std::complex<float> is array-compatible with float[2].
    float* out = reinterpret_cast<float*>(symbols);
    for (; s < n_symbols; ++s) {
      out[2 * s] = 1.0f - 2.0f * static_cast<float>(bits[s] & 1u);
      out[2 * s + 1] = 0.0f;
    }
    static_cast<void>(table);
  } else if constexpr (kBits <= 8 && std::endian::native == std::endian::little) {
    constexpr std::uint64_t kLowBits = 0x0101010101010101ull >> (8 * (8 - kBits));
    constexpr std::uint64_t kGather = 0x8040201008040201ull;
    const std::size_t n_bytes = n_symbols * kBits;
    const std::size_t n_fast = n_bytes >= 8 ? (n_bytes - 8) / kBits + 1 : 0;
    for (; s < n_fast; ++s) {
      std::uint64_t x;
      std::memcpy(&x, bits + s * kBits, 8);
      symbols[s] = table[((x & kLowBits) * kGather) >> (64 - kBits)];
    }
  }
  for (; s < n_symbols; ++s) {
    const Bit* b = bits + s * kBits;
    unsigned label = 0;
    for (int k = 0; k < kBits; ++k) label = (label << 1) | (b[k] & 1u);
    symbols[s] = table[label];
  }
}

}  // namespace

Result<Mapper> Mapper::Create(const Modulation& modulation) {
  if (Status status = ValidateModulation(modulation); !status.ok()) {
    return Status::Error("mapper: " + status.message());
  }
  Mapper mapper;
  mapper.modulation_ = modulation;
  mapper.bits_per_symbol_ = modulation.bits_per_symbol();
  const unsigned order = static_cast<unsigned>(modulation.order);
  mapper.points_.assign(order, cf32(0.0f, 0.0f));

  if (modulation.family == ModulationFamily::kGeneric) {
    const GenericConstellation& c = *modulation.generic;
    for (std::size_t i = 0; i < c.points.size(); ++i) mapper.points_[c.labels[i]] = c.points[i];
  } else if (modulation.family == ModulationFamily::kPsk) {
    if (order == 2) {
      mapper.points_[0] = cf32(1.0f, 0.0f);
      mapper.points_[1] = cf32(-1.0f, 0.0f);
    } else {
      for (unsigned k = 0; k < order; ++k) {
        const double angle =
            2.0 * std::numbers::pi * (static_cast<double>(k) + 0.5) / static_cast<double>(order);
        mapper.points_[Gray(k)] =
            cf32(static_cast<float>(std::cos(angle)), static_cast<float>(std::sin(angle)));
      }
    }
  } else {
    const int p = mapper.bits_per_symbol_ / 2;
    const unsigned levels = 1u << p;  // L
    const double scale = 1.0 / std::sqrt(2.0 * (static_cast<double>(order) - 1.0) / 3.0);
    mapper.pam_levels_.assign(levels, 0.0f);
    for (unsigned j = 0; j < levels; ++j) {
      const double c = static_cast<double>(levels) - 1.0 - 2.0 * static_cast<double>(j);
      mapper.pam_levels_[Gray(j)] = static_cast<float>(c * scale);
    }
    for (unsigned l = 0; l < order; ++l) {
      mapper.points_[l] = cf32(mapper.pam_levels_[l >> p], mapper.pam_levels_[l & (levels - 1)]);
    }
  }
  return mapper;
}

void Mapper::Map(std::span<const Bit> bits, std::span<cf32> symbols) const {
  CAPGAP_DCHECK(bits.size() == static_cast<std::size_t>(bits_per_symbol_) * symbols.size());
  const Bit* b = bits.data();
  const std::size_t n = symbols.size();
  const cf32* table = points_.data();
  cf32* out = symbols.data();
  switch (bits_per_symbol_) {
    case 1:
      MapFixed<1>(b, n, table, out);
      break;
    case 2:
      MapFixed<2>(b, n, table, out);
      break;
    case 3:
      MapFixed<3>(b, n, table, out);
      break;
    case 4:
      MapFixed<4>(b, n, table, out);
      break;
    case 5:
      MapFixed<5>(b, n, table, out);
      break;
    case 6:
      MapFixed<6>(b, n, table, out);
      break;
    case 8:
      MapFixed<8>(b, n, table, out);
      break;
    case 10:
      MapFixed<10>(b, n, table, out);
      break;
    default:
      CAPGAP_DCHECK(false);
      break;  // Create() admits no other m
  }
}

}  // namespace capgap
