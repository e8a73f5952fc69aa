// Bit source tests: the random-bit block mapping of bit_source.h reproduced
// from the Philox reference, a binomial check of the bits, and the PRBS
// generators against an independent register, their exact periods, Golomb's
// balance and run properties, and the GF(2) jump.
#include "blocks/source/bit_source.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdint>
#include <map>
#include <random>
#include <vector>

#include "blocks/core/rng_stream.h"

namespace capgap {
namespace {

// ------------------------------------------------------------- random bits

TEST(GenerateRandomBits, ReproducesTheDocumentedBlockMapping) {
  const PhiloxKey key = DeriveKey(42, "bits-test");
  for (std::size_t n : std::vector<std::size_t>{0, 1, 31, 32, 127, 128, 129, 255, 256, 1000}) {
    RngStream stream(key, 3, 17, Substream::kBits);
    stream.Advance(5);  // start inside the stream, not at block 0
    const PhiloxCounter start = stream.counter();
    std::vector<Bit> bits(n, 7);
    GenerateRandomBits(bits, stream);
    for (std::size_t i = 0; i < n; ++i) {
      PhiloxCounter c = start;
      c[0] += static_cast<std::uint32_t>(i / 128);
      const PhiloxBlock block = Philox4x32_10(c, key);
      const std::uint32_t word = block[(i % 128) / 32];
      ASSERT_EQ(bits[i], (word >> (i % 32)) & 1u) << "n = " << n << " bit " << i;
    }
    // ceil(n / 128) blocks consumed.
    EXPECT_EQ(stream.block_index(), start[0] + static_cast<std::uint32_t>((n + 127) / 128))
        << "n = " << n;
  }
}

TEST(GenerateRandomBits, ConsecutiveCallsContinueTheStream) {
  const PhiloxKey key = DeriveKey(1, "continue");
  RngStream a(key, 0, 0, Substream::kBits);
  std::vector<Bit> whole(512);
  GenerateRandomBits(whole, a);
  RngStream b(key, 0, 0, Substream::kBits);
  std::vector<Bit> first(256), second(256);
  GenerateRandomBits(first, b);
  GenerateRandomBits(second, b);
  EXPECT_TRUE(std::equal(first.begin(), first.end(), whole.begin()));
  EXPECT_TRUE(std::equal(second.begin(), second.end(), whole.begin() + 256));
}

// n = 2^20 fair bits: the number of ones is Binomial(n, 1/2), mean n/2,
// sigma = sqrt(n)/2 = 512. A +-4 sigma band (two-sided false-alarm
// probability 6.3e-5, common practice) on the ones and on the number of
// equal neighbours (b_i == b_{i+1}, also Binomial(n-1, 1/2) for i.i.d. bits).
TEST(GenerateRandomBits, FractionOfOnesWithinFourSigma) {
  constexpr std::size_t kN = std::size_t{1} << 20;
  RngStream stream(DeriveKey(2024, "balance"), 0, 0, Substream::kBits);
  std::vector<Bit> bits(kN);
  GenerateRandomBits(bits, stream);
  std::size_t ones = 0, equal_neighbours = 0;
  for (std::size_t i = 0; i < kN; ++i) {
    ASSERT_LE(bits[i], 1);
    ones += bits[i];
    if (i + 1 < kN && bits[i] == bits[i + 1]) ++equal_neighbours;
  }
  const double sigma = std::sqrt(static_cast<double>(kN)) / 2.0;
  EXPECT_NEAR(static_cast<double>(ones), kN / 2.0, 4.0 * sigma);
  EXPECT_NEAR(static_cast<double>(equal_neighbours), (kN - 1) / 2.0, 4.0 * sigma);
}

// -------------------------------------------------------------------- PRBS

struct PrbsSpec {
  PrbsOrder order;
  int n;
  int tap;
  bool inverted;
};
// ITU-T O.150 (from memory, as in bit_source.h): x^9 + x^5 + 1;
// x^15 + x^14 + 1, x^23 + x^18 + 1, x^31 + x^28 + 1 inverted.
const PrbsSpec kSpecs[] = {{PrbsOrder::k9, 9, 5, false},
                           {PrbsOrder::k15, 15, 14, true},
                           {PrbsOrder::k23, 23, 18, true},
                           {PrbsOrder::k31, 31, 28, true}};

PrbsGenerator MakePrbs(PrbsOrder order) {
  Result<PrbsGenerator> g = PrbsGenerator::Create(order);
  EXPECT_TRUE(g.ok());
  return std::move(g).value();
}

std::vector<Bit> Sequence(const PrbsGenerator& g, std::size_t n) {
  std::vector<Bit> bits(n);
  PrbsGenerator::State state = g.StateAt(0);
  g.Generate(bits, state);
  return bits;
}

// Independent reference, written as the register drawn in O.150: stages
// 1..n in a std::vector<bool>, all ones at the start; each clock the outputs
// of stage n and stage `tap` are added modulo 2, every stage shifts one place
// towards stage n, the sum enters stage 1 and is the output (inverted for the
// inverted sequences).
std::vector<Bit> ReferenceFibonacci(const PrbsSpec& spec, std::size_t count) {
  std::vector<bool> stage(static_cast<std::size_t>(spec.n) + 1, true);  // stage[1..n]
  std::vector<Bit> out;
  for (std::size_t i = 0; i < count; ++i) {
    const bool feedback =
        stage[static_cast<std::size_t>(spec.n)] != stage[static_cast<std::size_t>(spec.tap)];
    for (std::size_t s = static_cast<std::size_t>(spec.n); s > 1; --s) stage[s] = stage[s - 1];
    stage[1] = feedback;
    out.push_back(static_cast<Bit>(feedback != spec.inverted));
  }
  return out;
}

TEST(PrbsGenerator, FirstBitsMatchAnIndependentRegister) {
  for (const PrbsSpec& spec : kSpecs) {
    const PrbsGenerator g = MakePrbs(spec.order);
    EXPECT_EQ(g.order(), spec.n);
    EXPECT_EQ(g.period(), (std::uint64_t{1} << spec.n) - 1);
    EXPECT_EQ(Sequence(g, 5000), ReferenceFibonacci(spec, 5000)) << ToString(spec.order);
  }
}

// bit_source.h quotes the start of PRBS9; checked against the reference too.
TEST(PrbsGenerator, Prbs9StartsAsTheHeaderSays) {
  EXPECT_EQ(Sequence(MakePrbs(PrbsOrder::k9), 10),
            (std::vector<Bit>{0, 0, 0, 0, 0, 1, 1, 1, 1, 0}));
}

// Any split of a request gives the same bits (word-parallel body and the
// one-bit tail must agree).
TEST(PrbsGenerator, GenerateInPiecesEqualsOneCall) {
  std::mt19937 rng(3);
  for (const PrbsSpec& spec : kSpecs) {
    const PrbsGenerator g = MakePrbs(spec.order);
    const std::vector<Bit> whole = Sequence(g, 3000);
    std::vector<Bit> pieces;
    PrbsGenerator::State state = g.StateAt(0);
    while (pieces.size() < whole.size()) {
      const std::size_t len = std::min<std::size_t>(
          std::uniform_int_distribution<std::size_t>(0, 40)(rng), whole.size() - pieces.size());
      std::vector<Bit> chunk(len);
      g.Generate(chunk, state);
      pieces.insert(pieces.end(), chunk.begin(), chunk.end());
    }
    EXPECT_EQ(pieces, whole) << ToString(spec.order);
  }
}

// The output sequence repeats after exactly 2^n - 1 bits: s[i + P] = s[i]
// over a whole period, and no shorter period, i.e. s is not P/q-periodic for
// any prime q | P (511 = 7 * 73, 32767 = 7 * 31 * 151, 8388607 = 47 * 178481;
// checked by the static_asserts).
TEST(PrbsGenerator, PeriodIsExactlyTwoToTheNMinusOne) {
  static_assert(7 * 73 == 511 && 7 * 31 * 151 == 32767 && 47 * 178481 == 8388607);
  const std::map<int, std::vector<std::uint64_t>> prime_factors = {
      {9, {7, 73}}, {15, {7, 31, 151}}, {23, {47, 178481}}};
  for (const PrbsSpec& spec : kSpecs) {
    if (spec.n > 23) continue;  // 2^31 bits: see StateAtPeriodReturnsToStart
    const PrbsGenerator g = MakePrbs(spec.order);
    const std::uint64_t period = g.period();
    const std::vector<Bit> s = Sequence(g, 2 * period);
    for (std::uint64_t i = 0; i < period; ++i) {
      ASSERT_EQ(s[i], s[i + period]) << ToString(spec.order) << " i = " << i;
    }
    for (std::uint64_t q : prime_factors.at(spec.n)) {
      const std::uint64_t d = period / q;
      bool d_periodic = true;
      for (std::uint64_t i = 0; i + d < 2 * period && d_periodic; ++i)
        d_periodic = s[i] == s[i + d];
      EXPECT_FALSE(d_periodic) << ToString(spec.order) << " has period " << d;
    }
  }
}

// Golomb's randomness postulates for a maximal-length sequence of degree n
// (S. W. Golomb, "Shift Register Sequences", 1967; from memory): over one
// period (cyclically) there are 2^(n-1) ones and 2^(n-1) - 1 zeros; of the
// 2^(n-1) runs, for 1 <= k <= n-2 there are 2^(n-k-2) runs of ones and as
// many runs of zeros of length k, one run of n ones and one run of n-1 zeros.
// The inverted sequences swap ones and zeros (so O.150's inverted PRBS15 has
// its longest run, 15, of zeros).
TEST(PrbsGenerator, BalanceAndRunsFollowGolombsPostulates) {
  for (const PrbsSpec& spec : kSpecs) {
    if (spec.n > 23) continue;
    const PrbsGenerator g = MakePrbs(spec.order);
    const std::uint64_t period = g.period();
    std::vector<Bit> s = Sequence(g, period);
    if (spec.inverted) {
      for (Bit& b : s) b ^= 1;  // back to the register's own sequence
    }
    std::uint64_t ones = 0;
    for (Bit b : s) ones += b;
    EXPECT_EQ(ones, std::uint64_t{1} << (spec.n - 1)) << ToString(spec.order);

    // Runs, counted cyclically: start at a position where the bit changes.
    std::uint64_t start = 0;
    while (s[start] == s[(start + period - 1) % period]) ++start;
    std::map<int, std::uint64_t> runs[2];
    std::uint64_t total_runs = 0;
    for (std::uint64_t i = 0; i < period;) {
      const Bit value = s[(start + i) % period];
      int length = 0;
      while (i < period && s[(start + i) % period] == value) {
        ++length;
        ++i;
      }
      ++runs[value][length];
      ++total_runs;
    }
    EXPECT_EQ(total_runs, std::uint64_t{1} << (spec.n - 1)) << ToString(spec.order);
    for (int k = 1; k <= spec.n - 2; ++k) {
      const std::uint64_t expected = std::uint64_t{1} << (spec.n - k - 2);
      EXPECT_EQ(runs[1][k], expected) << ToString(spec.order) << " ones, length " << k;
      EXPECT_EQ(runs[0][k], expected) << ToString(spec.order) << " zeros, length " << k;
    }
    EXPECT_EQ(runs[1][spec.n], 1u) << ToString(spec.order);
    EXPECT_EQ(runs[0][spec.n - 1], 1u) << ToString(spec.order);
    EXPECT_EQ(runs[1][spec.n - 1], 0u) << ToString(spec.order);
    EXPECT_EQ(runs[0][spec.n], 0u) << ToString(spec.order);
  }
}

// StateAt(k) is the state after k steps from the all-ones register.
TEST(PrbsGenerator, StateAtEqualsStepping) {
  for (const PrbsSpec& spec : kSpecs) {
    const PrbsGenerator g = MakePrbs(spec.order);
    const PrbsGenerator::State start = g.StateAt(0);
    EXPECT_EQ(start.reg, (std::uint32_t{1} << spec.n) - 1) << ToString(spec.order);
    PrbsGenerator::State stepped = start;
    for (std::uint64_t k = 1; k <= 700; ++k) {
      Bit one;
      g.Generate(std::span<Bit>(&one, 1), stepped);
      ASSERT_EQ(g.StateAt(k).reg, stepped.reg) << ToString(spec.order) << " k = " << k;
    }
  }
}

// StateAt(a + b) equals generating b bits from StateAt(a), for far indices
// (work units deep into a sweep point), and the bits agree too.
TEST(PrbsGenerator, JumpThenGenerateEqualsJumpFurther) {
  std::mt19937_64 rng(99);
  for (const PrbsSpec& spec : kSpecs) {
    const PrbsGenerator g = MakePrbs(spec.order);
    for (int trial = 0; trial < 20; ++trial) {
      // Half the trials near the start (bits checked against the sequence),
      // half up to 2^44.
      const std::uint64_t a = trial < 10 ? rng() % 15000 : rng() >> 20;
      const std::uint64_t b = rng() % 3000;
      PrbsGenerator::State state = g.StateAt(a);
      std::vector<Bit> bits(b);
      g.Generate(bits, state);
      ASSERT_EQ(state.reg, g.StateAt(a + b).reg) << ToString(spec.order) << " a = " << a;
      // The bits after StateAt(a) are bits a, a+1, ... of the sequence.
      if (a + b <= 20000) {
        const std::vector<Bit> s = Sequence(g, a + b);
        ASSERT_TRUE(
            std::equal(bits.begin(), bits.end(), s.begin() + static_cast<std::ptrdiff_t>(a)));
      }
    }
  }
}

// The orbit of the all-ones register has length exactly P = 2^n - 1:
// A^P s0 = s0 and A^(P/q) s0 != s0 for each prime q | P. 2^31 - 1 is prime
// (a Mersenne prime; Euler 1772, from memory), so for PRBS31 it suffices that
// StateAt(1) != StateAt(0). StateAt does not reduce its index (bit_source.h),
// so this evaluates the full matrix power.
TEST(PrbsGenerator, StateAtPeriodReturnsToStart) {
  const std::map<int, std::vector<std::uint64_t>> prime_factors = {
      {9, {7, 73}}, {15, {7, 31, 151}}, {23, {47, 178481}}, {31, {2147483647}}};
  for (const PrbsSpec& spec : kSpecs) {
    const PrbsGenerator g = MakePrbs(spec.order);
    const std::uint64_t period = g.period();
    EXPECT_EQ(g.StateAt(period).reg, g.StateAt(0).reg) << ToString(spec.order);
    EXPECT_EQ(g.StateAt(5 * period + 12).reg, g.StateAt(12).reg) << ToString(spec.order);
    for (std::uint64_t q : prime_factors.at(spec.n)) {
      EXPECT_NE(g.StateAt(period / q).reg, g.StateAt(0).reg)
          << ToString(spec.order) << " q = " << q;
    }
  }
}

TEST(ParsePrbsOrder, AcceptsTheWordsAndRoundTrips) {
  for (const PrbsSpec& spec : kSpecs) {
    const Result<PrbsOrder> r = ParsePrbsOrder(ToString(spec.order));
    ASSERT_TRUE(r.ok());
    EXPECT_EQ(r.value(), spec.order);
  }
  EXPECT_EQ(ToString(PrbsOrder::k23), "prbs23");
  EXPECT_TRUE(ParsePrbsOrder("PRBS9").ok());
}

TEST(ParsePrbsOrder, UnknownWordListsTheValidWords) {
  const Result<PrbsOrder> r = ParsePrbsOrder("prbs7");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "unknown PRBS 'prbs7'; valid: prbs9, prbs15, prbs23, prbs31");
}

TEST(PrbsGenerator, CreateRejectsAnUnknownOrder) {
  const Result<PrbsGenerator> g = PrbsGenerator::Create(static_cast<PrbsOrder>(11));
  ASSERT_FALSE(g.ok());
  EXPECT_EQ(g.status().message(), "prbs: unknown order 11; valid: 9, 15, 23, 31");
}

}  // namespace
}  // namespace capgap
