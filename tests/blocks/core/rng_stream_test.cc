// Tests of the counter-based random streams (blocks/core/rng_stream.h):
// Philox4x32-10 known-answer vectors, the counter layout, stream independence
// and key derivation.
#include "blocks/core/rng_stream.h"

#include <gtest/gtest.h>

#include <bit>
#include <cstdint>
#include <set>
#include <string>
#include <utility>

namespace capgap {
namespace {

// Known-answer vectors of Philox4x32-10 (Salmon et al. SC'11 / Random123
// known-answer vectors, from memory). Counter and output words are listed as
// (c0, c1, c2, c3), key as (k0, k1).
TEST(Philox4x32, ZeroCounterZeroKeyMatchesKnownAnswer) {
  const PhiloxBlock b = Philox4x32_10({0u, 0u, 0u, 0u}, PhiloxKey{0u, 0u});
  EXPECT_EQ(b, (PhiloxBlock{0x6627e8d5u, 0xe169c58du, 0xbc57ac4cu, 0x9b00dbd8u}));
}

TEST(Philox4x32, AllOnesCounterAndKeyMatchesKnownAnswer) {
  const PhiloxBlock b = Philox4x32_10({0xffffffffu, 0xffffffffu, 0xffffffffu, 0xffffffffu},
                                      PhiloxKey{0xffffffffu, 0xffffffffu});
  EXPECT_EQ(b, (PhiloxBlock{0x408f276du, 0x41c83b0eu, 0xa20bc7c6u, 0x6d5451fdu}));
}

TEST(Philox4x32, PiDigitsCounterAndKeyMatchKnownAnswer) {
  const PhiloxBlock b = Philox4x32_10({0x243f6a88u, 0x85a308d3u, 0x13198a2eu, 0x03707344u},
                                      PhiloxKey{0xa4093822u, 0x299f31d0u});
  EXPECT_EQ(b, (PhiloxBlock{0xd16cfe09u, 0x94fdccebu, 0x5001e420u, 0x24126ea1u}));
}

// Flipping any single input bit flips each output bit with probability 1/2
// for a good block cipher-like mixer. 128 input bits x 16 random inputs x 128
// output bits = 262144 bit trials, Binomial(262144, 1/2): mean 131072, sd 256;
// the band is +-5 sd (two-sided tail probability ~6e-7).
TEST(Philox4x32, SingleBitFlipChangesHalfTheOutputBits) {
  std::uint64_t flips = 0;
  std::uint64_t trials = 0;
  for (std::uint32_t t = 0; t < 16; ++t) {
    const PhiloxCounter base = Philox4x32_10({t, 1u, 2u, 3u}, PhiloxKey{7u, 9u});
    const PhiloxKey key{0x12345678u + t, 0x9abcdef0u};
    const PhiloxBlock ref = Philox4x32_10(base, key);
    for (int bit = 0; bit < 128; ++bit) {
      PhiloxCounter c = base;
      c[static_cast<std::size_t>(bit / 32)] ^= 1u << (bit % 32);
      const PhiloxBlock out = Philox4x32_10(c, key);
      for (std::size_t w = 0; w < 4; ++w) {
        flips += static_cast<std::uint64_t>(std::popcount(out[w] ^ ref[w]));
      }
      trials += 128;
    }
  }
  ASSERT_EQ(trials, 262144u);
  EXPECT_NEAR(static_cast<double>(flips), 131072.0, 5.0 * 256.0);
}

TEST(RngStream, CounterLayoutIsBlockSubstreamUnitPoint) {
  const RngStream s(PhiloxKey{1u, 2u}, /*point_index=*/11u, /*unit_index=*/22u, Substream::kNoise);
  EXPECT_EQ(s.counter(),
            (PhiloxCounter{0u, static_cast<std::uint32_t>(Substream::kNoise), 22u, 11u}));
  EXPECT_EQ(s.block_index(), 0u);
}

TEST(RngStream, NextBlockIsPhiloxOfTheCounterAndAdvancesByOne) {
  const PhiloxKey key{0xdeadbeefu, 0x01234567u};
  RngStream s(key, 3u, 5u, Substream::kBits);
  for (std::uint32_t j = 0; j < 5; ++j) {
    const PhiloxBlock expected = Philox4x32_10({j, 0u, 5u, 3u}, key);
    EXPECT_EQ(s.NextBlock(), expected) << "block " << j;
    EXPECT_EQ(s.block_index(), j + 1);
  }
}

TEST(RngStream, NextU64CombinesWordsOneAndZero) {
  const PhiloxKey key{4u, 8u};
  RngStream s(key, 0u, 0u, Substream::kCode);
  const PhiloxBlock b = Philox4x32_10({0u, 3u, 0u, 0u}, key);
  EXPECT_EQ(s.NextU64(), (static_cast<std::uint64_t>(b[1]) << 32) | b[0]);
  EXPECT_EQ(s.block_index(), 1u);
}

TEST(RngStream, AdvanceSkipsExactlyTheGivenNumberOfBlocks) {
  const PhiloxKey key{17u, 19u};
  RngStream drawn(key, 1u, 2u, Substream::kNoise);
  RngStream skipped = drawn;
  for (int i = 0; i < 37; ++i) drawn.NextBlock();
  skipped.Advance(37u);
  EXPECT_EQ(skipped.counter(), drawn.counter());
  EXPECT_EQ(skipped.NextBlock(), drawn.NextBlock());
}

TEST(RngStream, BlockIndexWrapsModulo2To32WithinItsWord) {
  const PhiloxKey key{5u, 6u};
  RngStream s(key, 9u, 8u, Substream::kNoise);
  s.Advance(0xffffffffu);
  EXPECT_EQ(s.NextBlock(), Philox4x32_10({0xffffffffu, 1u, 8u, 9u}, key));
  EXPECT_EQ(s.counter(), (PhiloxCounter{0u, 1u, 8u, 9u}));  // no carry into c1
}

// Streams that differ in point, unit or substream must not share blocks. The
// chance that two distinct Philox outputs collide in all 128 bits is 2^-128,
// so any equality here is a layout bug.
TEST(RngStream, DifferentPointUnitOrSubstreamGiveDifferentBlocks) {
  const PhiloxKey key = DeriveKey(2024u, "scheme");
  std::set<PhiloxBlock> seen;
  int drawn = 0;
  for (std::uint32_t point = 0; point < 3; ++point) {
    for (std::uint32_t unit = 0; unit < 3; ++unit) {
      for (Substream sub :
           {Substream::kBits, Substream::kNoise, Substream::kChannel, Substream::kCode}) {
        RngStream s(key, point, unit, sub);
        for (int j = 0; j < 8; ++j) {
          seen.insert(s.NextBlock());
          ++drawn;
        }
      }
    }
  }
  EXPECT_EQ(seen.size(), static_cast<std::size_t>(drawn));
}

// The substream numbers are part of every recorded count: a renumbering would
// silently change every curve. Pinned here (values as first released).
TEST(Substream, ValuesAreFixed) {
  EXPECT_EQ(static_cast<std::uint32_t>(Substream::kBits), 0u);
  EXPECT_EQ(static_cast<std::uint32_t>(Substream::kNoise), 1u);
  EXPECT_EQ(static_cast<std::uint32_t>(Substream::kChannel), 2u);
  EXPECT_EQ(static_cast<std::uint32_t>(Substream::kCode), 3u);
  EXPECT_EQ(static_cast<std::uint32_t>(Substream::kFading), 4u);
}

TEST(RngStream, FadingSubstreamSharesNoBlockWithTheOthers) {
  const PhiloxKey key = DeriveKey(2024u, "scheme");
  std::set<PhiloxBlock> others;
  for (Substream sub :
       {Substream::kBits, Substream::kNoise, Substream::kChannel, Substream::kCode}) {
    RngStream s(key, 0u, 0u, sub);
    for (int j = 0; j < 64; ++j) others.insert(s.NextBlock());
  }
  RngStream fading(key, 0u, 0u, Substream::kFading);
  for (int j = 0; j < 64; ++j) EXPECT_EQ(others.count(fading.NextBlock()), 0u) << j;
}

TEST(ReservedPointIndex, DistinctAndAboveTheFirstReservedIndex) {
  const std::set<std::uint32_t> reserved = {kSpectrumPointIndex, kDisplayPointIndex,
                                            kEyePointIndex};
  EXPECT_EQ(reserved.size(), 3u);
  for (std::uint32_t p : reserved) EXPECT_GE(p, kFirstReservedPointIndex);
  // The values sim/ used before they were named here (keeps the displays'
  // streams, and so the written spectra and eyes, unchanged).
  EXPECT_EQ(kSpectrumPointIndex, 0xFFFFFFFFu);
  EXPECT_EQ(kDisplayPointIndex, 0xFFFFFFFEu);
  EXPECT_EQ(kEyePointIndex, 0xFFFFFFFDu);
}

TEST(RngStream, DifferentKeysGiveDifferentStreams) {
  RngStream a(DeriveKey(1u, "x"), 0u, 0u, Substream::kNoise);
  RngStream b(DeriveKey(2u, "x"), 0u, 0u, Substream::kNoise);
  EXPECT_NE(a.NextBlock(), b.NextBlock());
}

TEST(DeriveKey, IsDeterministic) {
  const PhiloxKey a = DeriveKey(123456789u, "qpsk_conv_k7_r1-2");
  const PhiloxKey b = DeriveKey(123456789u, "qpsk_conv_k7_r1-2");
  EXPECT_EQ(a.k0, b.k0);
  EXPECT_EQ(a.k1, b.k1);
}

// 64 seeds x 6 names = 384 keys; a 64-bit key collision among them has
// probability ~4e-15, so all must be distinct.
TEST(DeriveKey, DiffersForDifferentSeedsAndNames) {
  const char* names[] = {"", "a", "b", "ab", "ba", "qpsk_conv_k7_r1-2"};
  std::set<std::pair<std::uint32_t, std::uint32_t>> keys;
  int made = 0;
  for (std::uint64_t seed = 0; seed < 64; ++seed) {
    for (const char* name : names) {
      const PhiloxKey k = DeriveKey(seed, name);
      keys.insert({k.k0, k.k1});
      ++made;
    }
  }
  EXPECT_EQ(keys.size(), static_cast<std::size_t>(made));
  // Seeds that differ only in the high half are distinct too.
  const PhiloxKey lo = DeriveKey(1u, "s");
  const PhiloxKey hi = DeriveKey((std::uint64_t{1} << 32) | 1u, "s");
  EXPECT_TRUE(lo.k0 != hi.k0 || lo.k1 != hi.k1);
}

}  // namespace
}  // namespace capgap
