// Mapper tests: the labelling and scaling promised in mapper.h (Gray
// neighbours, unit energy, distinct points, the stated point positions) and
// that Map() is exactly a label -> points() lookup on every length.
#include "blocks/mapping/mapper.h"

#include <gtest/gtest.h>

#include <bit>
#include <cmath>
#include <complex>
#include <numbers>
#include <string>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/mapping/modulation.h"
#include "blocks/source/bit_source.h"

namespace capgap {
namespace {

const char* const kWords[] = {"bpsk", "qpsk",  "8psk",  "16psk",  "32psk",  "64psk",
                              "4qam", "16qam", "64qam", "256qam", "1024qam"};

Mapper MakeMapper(const char* word) {
  const Result<Modulation> modulation = ParseModulation(word);
  EXPECT_TRUE(modulation.ok()) << word;
  Result<Mapper> mapper = Mapper::Create(modulation.value());
  EXPECT_TRUE(mapper.ok()) << word << ": " << mapper.status().message();
  return std::move(mapper).value();
}

int HammingDistance(unsigned a, unsigned b) { return std::popcount(a ^ b); }

double Distance(cf32 a, cf32 b) {
  return std::abs(std::complex<double>(a) - std::complex<double>(b));
}

TEST(Mapper, AverageSymbolEnergyIsOne) {
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    double energy = 0.0;
    for (cf32 x : mapper.points()) energy += std::norm(std::complex<double>(x));
    energy /= static_cast<double>(mapper.order());
    EXPECT_NEAR(energy, 1.0, 1e-6) << word;
  }
}

TEST(Mapper, PointsAreDistinct) {
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto points = mapper.points();
    ASSERT_EQ(points.size(), static_cast<std::size_t>(mapper.order())) << word;
    for (std::size_t a = 0; a < points.size(); ++a) {
      for (std::size_t b = a + 1; b < points.size(); ++b) {
        // The closest pair of 1024-QAM is 2 / sqrt(682) = 0.077 apart.
        EXPECT_GT(Distance(points[a], points[b]), 0.05) << word << " labels " << a << ", " << b;
      }
    }
  }
}

// Gray labelling: every pair of points at the minimum distance (the nearest
// neighbours: left/right/up/down in QAM, the two circle neighbours in PSK)
// differs in exactly one label bit, and every point has such a neighbour.
TEST(Mapper, NearestNeighboursDifferInExactlyOneBit) {
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto points = mapper.points();
    double d_min = 1e9;
    for (std::size_t a = 0; a < points.size(); ++a) {
      for (std::size_t b = a + 1; b < points.size(); ++b) {
        d_min = std::min(d_min, Distance(points[a], points[b]));
      }
    }
    for (std::size_t a = 0; a < points.size(); ++a) {
      int neighbours = 0;
      for (std::size_t b = 0; b < points.size(); ++b) {
        if (a == b || Distance(points[a], points[b]) > d_min * (1.0 + 1e-4)) continue;
        ++neighbours;
        EXPECT_EQ(HammingDistance(static_cast<unsigned>(a), static_cast<unsigned>(b)), 1)
            << word << " labels " << a << " and " << b;
      }
      EXPECT_GE(neighbours, 1) << word << " label " << a;
      // QAM: 2 to 4 neighbours; PSK (M >= 4): exactly 2; BPSK: 1.
      if (mapper.modulation().family == ModulationFamily::kPsk && mapper.order() >= 4) {
        EXPECT_EQ(neighbours, 2) << word << " label " << a;
      }
    }
  }
}

TEST(Mapper, BpskIsPlusOneForZeroMinusOneForOne) {
  const Mapper mapper = MakeMapper("bpsk");
  EXPECT_EQ(mapper.points()[0], cf32(1.0f, 0.0f));
  EXPECT_EQ(mapper.points()[1], cf32(-1.0f, 0.0f));
}

// mapper.h: PSK point k at angle (2k + 1) pi / M carries label Gray(k).
TEST(Mapper, PskPointKSitsAtOddMultipleOfPiOverMWithGrayLabel) {
  for (const char* word : {"qpsk", "8psk", "16psk", "32psk", "64psk"}) {
    const Mapper mapper = MakeMapper(word);
    const int order = mapper.order();
    for (int k = 0; k < order; ++k) {
      const unsigned label = static_cast<unsigned>(k ^ (k >> 1));
      const double angle = std::numbers::pi * (2.0 * k + 1.0) / order;
      const cf32 x = mapper.points()[label];
      EXPECT_NEAR(x.real(), std::cos(angle), 1e-6) << word << " k = " << k;
      EXPECT_NEAR(x.imag(), std::sin(angle), 1e-6) << word << " k = " << k;
    }
  }
  // QPSK in words: 00 -> (1+j)/sqrt2, 01 -> (-1+j)/sqrt2, 11 -> (-1-j)/sqrt2,
  // 10 -> (1-j)/sqrt2, i.e. b0 = 1 iff Im < 0 and b1 = 1 iff Re < 0.
  const Mapper qpsk = MakeMapper("qpsk");
  const float h = 1.0f / std::numbers::sqrt2_v<float>;
  EXPECT_NEAR(std::abs(qpsk.points()[0] - cf32(h, h)), 0.0f, 1e-6f);
  EXPECT_NEAR(std::abs(qpsk.points()[1] - cf32(-h, h)), 0.0f, 1e-6f);
  EXPECT_NEAR(std::abs(qpsk.points()[3] - cf32(-h, -h)), 0.0f, 1e-6f);
  EXPECT_NEAR(std::abs(qpsk.points()[2] - cf32(h, -h)), 0.0f, 1e-6f);
}

// 16-QAM levels {+-1, +-3} / sqrt(10) (mean energy of the odd-integer grid is
// 2 (M - 1) / 3 = 10: common practice), axis labels Gray from the top:
// 00 -> +3, 01 -> +1, 11 -> -1, 10 -> -3.
TEST(Mapper, SixteenQamLevelsAndAxisLabels) {
  const Mapper mapper = MakeMapper("16qam");
  const auto levels = mapper.pam_levels();
  ASSERT_EQ(levels.size(), 4u);
  const double s = 1.0 / std::sqrt(10.0);
  EXPECT_NEAR(levels[0b00], 3 * s, 1e-7);
  EXPECT_NEAR(levels[0b01], 1 * s, 1e-7);
  EXPECT_NEAR(levels[0b11], -1 * s, 1e-7);
  EXPECT_NEAR(levels[0b10], -3 * s, 1e-7);
  // Label b0 b1 b2 b3 = 0 1 1 0: I level of 01 (+1), Q level of 10 (-3).
  EXPECT_NEAR(mapper.points()[0b0110].real(), 1 * s, 1e-7);
  EXPECT_NEAR(mapper.points()[0b0110].imag(), -3 * s, 1e-7);
}

// Square QAM: points()[l] = pam[l >> p] + j pam[l & (L-1)]; the most
// significant bit of each axis label is 1 exactly on the negative side.
TEST(Mapper, QamSeparatesIntoTwoGrayPamAxes) {
  for (const char* word : {"4qam", "16qam", "64qam", "256qam", "1024qam"}) {
    const Mapper mapper = MakeMapper(word);
    const int m = mapper.bits_per_symbol();
    const int p = m / 2;
    const unsigned levels = 1u << p;
    ASSERT_EQ(mapper.pam_levels().size(), levels) << word;
    for (unsigned l = 0; l < static_cast<unsigned>(mapper.order()); ++l) {
      const cf32 x = mapper.points()[l];
      EXPECT_EQ(x.real(), mapper.pam_levels()[l >> p]) << word;
      EXPECT_EQ(x.imag(), mapper.pam_levels()[l & (levels - 1)]) << word;
      EXPECT_EQ((l >> (m - 1)) & 1u, x.real() < 0 ? 1u : 0u) << word << " label " << l;
      EXPECT_EQ((l >> (p - 1)) & 1u, x.imag() < 0 ? 1u : 0u) << word << " label " << l;
    }
    // Levels: the odd integers L-1, L-3, ..., 1-L times 1 / sqrt(2 (M-1) / 3).
    const double s = 1.0 / std::sqrt(2.0 * (mapper.order() - 1) / 3.0);
    for (unsigned j = 0; j < levels; ++j) {
      const unsigned label = j ^ (j >> 1);
      EXPECT_NEAR(mapper.pam_levels()[label], (static_cast<double>(levels) - 1 - 2.0 * j) * s, 1e-6)
          << word << " level " << j;
    }
  }
}

TEST(Mapper, PskHasNoPamLevels) {
  EXPECT_TRUE(MakeMapper("8psk").pam_levels().empty());
  EXPECT_TRUE(MakeMapper("bpsk").pam_levels().empty());
}

// Map() against the definition, on lengths around the fast path's 8-byte
// window and on a long random frame.
TEST(Mapper, MapEqualsTableLookupOfTheLabel) {
  RngStream stream(PhiloxKey{7, 11}, 0, 0, Substream::kBits);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const int m = mapper.bits_per_symbol();
    for (std::size_t n_symbols :
         std::vector<std::size_t>{0, 1, 2, 3, 4, 7, 8, 9, 15, 16, 17, 1001}) {
      std::vector<Bit> bits(n_symbols * static_cast<std::size_t>(m));
      GenerateRandomBits(bits, stream);
      std::vector<cf32> symbols(n_symbols, cf32(NAN, NAN));
      mapper.Map(bits, symbols);
      for (std::size_t s = 0; s < n_symbols; ++s) {
        unsigned label = 0;
        for (std::size_t k = 0; k < static_cast<std::size_t>(m); ++k) {
          label = 2 * label + bits[s * static_cast<std::size_t>(m) + k];
        }
        ASSERT_EQ(symbols[s], mapper.points()[label])
            << word << " n = " << n_symbols << " symbol " << s;
      }
    }
  }
}

// mapper.h: only the lowest bit of each byte is read.
TEST(Mapper, MapReadsOnlyTheLowestBitOfEachByte) {
  RngStream stream(PhiloxKey{3, 5}, 0, 0, Substream::kBits);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const std::size_t n_symbols = 40;
    std::vector<Bit> bits(n_symbols * static_cast<std::size_t>(mapper.bits_per_symbol()));
    GenerateRandomBits(bits, stream);
    std::vector<Bit> noisy = bits;
    for (std::size_t i = 0; i < noisy.size(); ++i) noisy[i] |= static_cast<Bit>(0x10 * (i % 16));
    std::vector<cf32> clean_symbols(n_symbols), noisy_symbols(n_symbols);
    mapper.Map(bits, clean_symbols);
    mapper.Map(noisy, noisy_symbols);
    EXPECT_EQ(clean_symbols, noisy_symbols) << word;
  }
}

TEST(Mapper, CreateRejectsUnsupportedModulation) {
  const Result<Mapper> qam32 = Mapper::Create({ModulationFamily::kQam, 32});
  ASSERT_FALSE(qam32.ok());
  EXPECT_EQ(qam32.status().message(),
            "mapper: modulation qam: M = 32: must be a power of 4 in 4..1024");
  EXPECT_FALSE(Mapper::Create({ModulationFamily::kPsk, 3}).ok());
  EXPECT_FALSE(Mapper::Create({ModulationFamily::kPsk, 128}).ok());
}

}  // namespace
}  // namespace capgap
