// The two small non-cryptographic hashes of the project, written once:
//
// FNV-1a, 64 bit (G. Fowler, L. C. Noll, K.-P. Vo, the Fowler-Noll-Vo hash;
// offset basis 0xcbf29ce484222325 and prime 0x100000001b3 as published by
// its authors, from memory): h = basis; for each byte b: h = (h ^ b) * prime.
// Used to turn a scheme name into key material (DeriveKey, rng_stream.h) and
// as the checksum of the checkpoint file (sim/checkpoint.cc).
//
// SplitMix64 (G. L. Steele, D. Lea, C. H. Flood, "Fast splittable
// pseudorandom number generators", OOPSLA 2014; constants as in S. Vigna's
// public-domain splitmix64.c, from memory): a Weyl sequence with increment
// 0x9E3779B97F4A7C15 (2^64 / golden ratio) through a 64-bit finaliser. Used to
// mix the run seed into a Philox key and, as a small seeded generator, to
// break ties in the LDPC constructions.
//
// Both are pure functions of their input on every platform: anything derived
// from them (keys, constructed codes, checksums) is reproducible.
#ifndef CAPGAP_BLOCKS_CORE_HASH_H_
#define CAPGAP_BLOCKS_CORE_HASH_H_

#include <cstdint>
#include <string_view>

namespace capgap {

inline constexpr std::uint64_t kFnv1a64OffsetBasis = 0xcbf29ce484222325ull;
inline constexpr std::uint64_t kFnv1a64Prime = 0x100000001b3ull;

// FNV-1a 64 of the bytes of `bytes` (each char taken as an unsigned byte).
constexpr std::uint64_t Fnv1a64(std::string_view bytes) {
  std::uint64_t h = kFnv1a64OffsetBasis;
  for (char ch : bytes) {
    h ^= static_cast<unsigned char>(ch);
    h *= kFnv1a64Prime;
  }
  return h;
}

inline constexpr std::uint64_t kSplitMix64Gamma = 0x9E3779B97F4A7C15ull;

// The SplitMix64 output for state x: finaliser of (x + gamma). Equal to the
// first number of a SplitMix64Generator seeded with x.
constexpr std::uint64_t SplitMix64(std::uint64_t x) {
  x += kSplitMix64Gamma;
  x = (x ^ (x >> 30)) * 0xBF58476D1CE4E5B9ull;
  x = (x ^ (x >> 27)) * 0x94D049BB133111EBull;
  return x ^ (x >> 31);
}

// The SplitMix64 sequence from a seed: Next() returns SplitMix64(seed),
// SplitMix64(seed + gamma), SplitMix64(seed + 2 gamma), ...
class SplitMix64Generator {
 public:
  explicit constexpr SplitMix64Generator(std::uint64_t seed) : state_(seed) {}
  constexpr std::uint64_t Next() {
    const std::uint64_t x = state_;
    state_ += kSplitMix64Gamma;
    return SplitMix64(x);
  }
  // Uniform in [0, bound) by multiply-shift of the top 32 bits (bias below
  // bound / 2^32: fine for tie breaking and shuffles, not for statistics).
  // REQUIRES 0 < bound < 2^31.
  constexpr int Below(int bound) {
    const std::uint64_t hi = Next() >> 32;
    return static_cast<int>((hi * static_cast<std::uint64_t>(bound)) >> 32);
  }

 private:
  std::uint64_t state_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_HASH_H_
