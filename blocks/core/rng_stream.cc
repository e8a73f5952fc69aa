// Philox4x32-10 scalar reference and key derivation.
#include "blocks/core/rng_stream.h"

#include "blocks/core/hash.h"

namespace capgap {
namespace {

constexpr std::uint32_t kPhiloxM0 = 0xD2511F53u;
constexpr std::uint32_t kPhiloxM1 = 0xCD9E8D57u;
constexpr std::uint32_t kPhiloxW0 = 0x9E3779B9u;  // golden ratio
constexpr std::uint32_t kPhiloxW1 = 0xBB67AE85u;  // sqrt(3) - 1

}  // namespace

PhiloxBlock Philox4x32_10(const PhiloxCounter& counter, PhiloxKey key) {
  std::uint32_t c0 = counter[0], c1 = counter[1], c2 = counter[2], c3 = counter[3];
  std::uint32_t k0 = key.k0, k1 = key.k1;
  for (int round = 0; round < 10; ++round) {
    const std::uint64_t p0 = static_cast<std::uint64_t>(kPhiloxM0) * c0;
    const std::uint64_t p1 = static_cast<std::uint64_t>(kPhiloxM1) * c2;
    const auto hi0 = static_cast<std::uint32_t>(p0 >> 32);
    const auto lo0 = static_cast<std::uint32_t>(p0);
    const auto hi1 = static_cast<std::uint32_t>(p1 >> 32);
    const auto lo1 = static_cast<std::uint32_t>(p1);
    c0 = hi1 ^ c1 ^ k0;
    c1 = lo1;
    c2 = hi0 ^ c3 ^ k1;
    c3 = lo0;
    k0 += kPhiloxW0;
    k1 += kPhiloxW1;
  }
  return {c0, c1, c2, c3};
}

PhiloxKey DeriveKey(std::uint64_t seed, std::string_view scheme_name) {
  const std::uint64_t k = SplitMix64(SplitMix64(seed) ^ Fnv1a64(scheme_name));
  return PhiloxKey{static_cast<std::uint32_t>(k), static_cast<std::uint32_t>(k >> 32)};
}

}  // namespace capgap
