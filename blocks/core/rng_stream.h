// Counter-based random streams (Philox4x32-10; Salmon, Moraes, Dror, Shaw,
// "Parallel Random Numbers: As Easy as 1, 2, 3", SC'11, 2011).
//
// Every random number in a run is a pure function of (key, counter). The key
// comes from (run seed, scheme name); the 128-bit counter is laid out as
//   c0 = block index inside the stream (advances as numbers are drawn),
//   c1 = substream (what the numbers are for: kBits, kNoise, ...),
//   c2 = work-unit index, c3 = sweep-point index.
// So the numbers a work unit sees depend only on (seed, scheme, point, unit)
// and never on which thread or process ran it: counts are bit-identical for
// any thread count.
//
// Consumers document how many blocks a call takes; the rule must not depend
// on the SIMD target so that all targets stay in step.
#ifndef CAPGAP_BLOCKS_CORE_RNG_STREAM_H_
#define CAPGAP_BLOCKS_CORE_RNG_STREAM_H_

#include <array>
#include <cstdint>
#include <string_view>

namespace capgap {

struct PhiloxKey {
  std::uint32_t k0 = 0;
  std::uint32_t k1 = 0;
};
using PhiloxCounter = std::array<std::uint32_t, 4>;
using PhiloxBlock = std::array<std::uint32_t, 4>;

// One Philox4x32 evaluation with 10 rounds (the scalar reference).
PhiloxBlock Philox4x32_10(const PhiloxCounter& counter, PhiloxKey key);

// Key for a (run seed, scheme name) pair: SplitMix64 of the seed mixed with the
// FNV-1a hash of the name. Distinct schemes get unrelated streams.
PhiloxKey DeriveKey(std::uint64_t seed, std::string_view scheme_name);

// Counter word c1: what a stream's numbers are for. The values are part of
// every recorded count (changing one changes every curve): never renumber an
// existing value, only add new ones with values not used before.
enum class Substream : std::uint32_t {
  kBits = 0,      // information bits of the bit source
  kNoise = 1,     // channel noise
  kChannel = 2,   // guard symbols that prime a shaped chain's filters, and the
                  // random symbols of the reserved-point displays below
  kCode = 3,      // anything a code needs at run time (e.g. interleavers)
  kFading = 4,    // channel processes (fading gains, phase noise): the
                  // process stream of blocks/channel/channel.h
};

// Reserved sweep-point indices (counter word c3). Streams drawn outside the
// counted sweep (displays and analysis written beside the curves) use these
// point indices, which no sweep reaches (a sweep has far fewer points), so
// they never share numbers with a counted work unit.
inline constexpr std::uint32_t kSpectrumPointIndex = 0xFFFFFFFFu;  // Welch PSD of a scheme
inline constexpr std::uint32_t kDisplayPointIndex = 0xFFFFFFFEu;   // demapper-input capture
inline constexpr std::uint32_t kEyePointIndex = 0xFFFFFFFDu;       // noise-free eye diagram
inline constexpr std::uint32_t kInterleaverPointIndex = 0xFFFFFFFCu;  // random interleaver (kCode)
inline constexpr std::uint32_t kTurboInterleaverPointIndex = 0xFFFFFFFBu;  // S-random (kCode)
// Every point index from here up is reserved; a sweep must stay below it.
inline constexpr std::uint32_t kFirstReservedPointIndex = 0xFFFFFFF0u;

class RngStream {
 public:
  RngStream(PhiloxKey key, std::uint32_t point_index, std::uint32_t unit_index,
            Substream substream)
      : key_(key),
        counter_{0u, static_cast<std::uint32_t>(substream), unit_index,
                 point_index} {}

  // Next 128-bit block; advances the block index by one.
  PhiloxBlock NextBlock() {
    PhiloxBlock b = Philox4x32_10(counter_, key_);
    ++counter_[0];
    return b;
  }
  // Uniform 64-bit integer from a fresh block (uses words 0 and 1).
  std::uint64_t NextU64() {
    PhiloxBlock b = NextBlock();
    return (static_cast<std::uint64_t>(b[1]) << 32) | b[0];
  }

  PhiloxKey key() const { return key_; }
  // Counter of the next block to be drawn.
  const PhiloxCounter& counter() const { return counter_; }
  std::uint32_t block_index() const { return counter_[0]; }
  // Skips n blocks (used by vector kernels that evaluate blocks themselves).
  void Advance(std::uint32_t n_blocks) { counter_[0] += n_blocks; }

 private:
  PhiloxKey key_;
  PhiloxCounter counter_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_RNG_STREAM_H_
