// BlockCode: the built-in codes' weight enumerators against published
// values, the input-output enumerator against an independent enumeration
// and a symmetry argument, encoding (linearity, systematic positions, zero
// syndrome under a parity-check matrix built here), and the Create() rules
// with their messages.
#include "blocks/fec/block_code.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <bit>
#include <cstdint>
#include <random>
#include <vector>

namespace capgap {
namespace {

BlockCode MustBuiltIn(const char* name) {
  Result<BlockCode> r = BlockCode::BuiltIn(name);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

// A random full-rank k x n generator (rows redrawn until independent).
std::vector<Bit> RandomGenerator(int n, int k, std::mt19937_64& rng) {
  std::vector<Bit> g(static_cast<std::size_t>(n * k));
  do {
    for (Bit& b : g) b = static_cast<Bit>(rng() & 1u);
  } while (BlockCode::FirstDependentRow(n, k, g) >= 0);
  return g;
}

// u G computed directly from the generator bits (independent of the
// codeword tables).
std::vector<Bit> DirectEncode(const BlockCode& c, std::uint32_t u) {
  const auto n = static_cast<std::size_t>(c.n());
  std::vector<Bit> cw(n, 0);
  for (int t = 0; t < c.k(); ++t) {
    if (((u >> t) & 1u) == 0) continue;
    for (std::size_t i = 0; i < n; ++i) cw[i] ^= c.generator()[static_cast<std::size_t>(t) * n + i];
  }
  return cw;
}

std::vector<std::uint64_t> Expected(int n, std::initializer_list<std::pair<int, std::uint64_t>> a) {
  std::vector<std::uint64_t> v(static_cast<std::size_t>(n) + 1, 0);
  for (const auto& [w, count] : a) v[static_cast<std::size_t>(w)] = count;
  return v;
}

TEST(BlockCode, GolayWeightEnumeratorMatchesPublishedValues) {
  // Extended Golay (24, 12): A_0 = 1, A_8 = 759, A_12 = 2576, A_16 = 759,
  // A_24 = 1, all others 0 (F. J. MacWilliams and N. J. A. Sloane, The Theory
  // of Error-Correcting Codes, 1977, ch. 2 section 6 and ch. 20; from
  // memory).
  const BlockCode c = MustBuiltIn("golay24");
  EXPECT_EQ(c.n(), 24);
  EXPECT_EQ(c.k(), 12);
  EXPECT_EQ(c.weight_enumerator().codewords,
            Expected(24, {{0, 1}, {8, 759}, {12, 2576}, {16, 759}, {24, 1}}));
  EXPECT_EQ(c.min_distance(), 8);
}

TEST(BlockCode, ExtendedHammingWeightEnumeratorMatchesPublishedValues) {
  // Extended Hamming (8, 4): A_0 = 1, A_4 = 14, A_8 = 1 (MacWilliams &
  // Sloane, 1977, ch. 1; S. Lin and D. J. Costello, Error Control Coding,
  // 2nd ed., 2004, ch. 4; from memory).
  const BlockCode c = MustBuiltIn("hamming8");
  EXPECT_EQ(c.n(), 8);
  EXPECT_EQ(c.k(), 4);
  EXPECT_EQ(c.weight_enumerator().codewords, Expected(8, {{0, 1}, {4, 14}, {8, 1}}));
  EXPECT_EQ(c.min_distance(), 4);
}

TEST(BlockCode, InfoWeightEnumeratorOfTransitiveCodesIsKOverNWAw) {
  // Both built-ins are systematic on positions 0..k-1 and their automorphism
  // groups are transitive on the coordinates (M24 for Golay, AGL(3, 2) for
  // the extended Hamming code; MacWilliams & Sloane, 1977, ch. 20 and ch. 13,
  // from memory), so among the codewords of weight w every coordinate is 1
  // equally often: B_w = (k / n) w A_w (arithmetic).
  for (const char* name : {"hamming8", "golay24"}) {
    const BlockCode c = MustBuiltIn(name);
    const BlockWeightEnumerator& e = c.weight_enumerator();
    for (int w = 0; w <= c.n(); ++w) {
      const auto uw = static_cast<std::size_t>(w);
      EXPECT_EQ(e.info_weight[uw] * static_cast<std::uint64_t>(c.n()),
                static_cast<std::uint64_t>(c.k()) * static_cast<std::uint64_t>(w) * e.codewords[uw])
          << name << " w=" << w;
    }
  }
}

TEST(BlockCode, EnumeratorsEqualADirectEnumerationForARandomCode) {
  std::mt19937_64 rng(4016u);
  const std::vector<Bit> g = RandomGenerator(40, 16, rng);
  Result<BlockCode> r = BlockCode::Create(40, 16, g, "random40");
  ASSERT_TRUE(r.ok()) << r.status().message();
  const BlockCode& c = r.value();
  std::vector<std::uint64_t> a(41, 0), b(41, 0);
  for (std::uint32_t u = 0; u < (1u << 16); ++u) {
    const std::vector<Bit> cw = DirectEncode(c, u);
    int w = 0;
    for (const Bit x : cw) w += x;
    a[static_cast<std::size_t>(w)] += 1;
    b[static_cast<std::size_t>(w)] += static_cast<std::uint64_t>(std::popcount(u));
  }
  EXPECT_EQ(c.weight_enumerator().codewords, a);
  EXPECT_EQ(c.weight_enumerator().info_weight, b);
  int d = 0;
  for (int w = 1; w <= 40 && d == 0; ++w) d = a[static_cast<std::size_t>(w)] > 0 ? w : 0;
  EXPECT_EQ(c.min_distance(), d);
  // Each of the k information bits is 1 in half of the 2^k words.
  std::uint64_t total = 0;
  for (const std::uint64_t x : c.weight_enumerator().info_weight) total += x;
  EXPECT_EQ(total, 16u * (1u << 15));
}

TEST(BlockCode, EncodeIsLinearAndEqualsUTimesG) {
  std::mt19937_64 rng(7u);
  std::vector<BlockCode> codes = {MustBuiltIn("hamming8"), MustBuiltIn("golay24")};
  Result<BlockCode> r = BlockCode::Create(40, 16, RandomGenerator(40, 16, rng), "random40");
  ASSERT_TRUE(r.ok());
  codes.push_back(std::move(r).value());
  for (const BlockCode& c : codes) {
    const auto n = static_cast<std::size_t>(c.n());
    const auto k = static_cast<std::size_t>(c.k());
    const std::size_t frames = 300;
    std::vector<Bit> u1(frames * k), u2(frames * k), u3(frames * k);
    for (std::size_t i = 0; i < u1.size(); ++i) {
      u1[i] = static_cast<Bit>(rng() & 1u);
      u2[i] = static_cast<Bit>(rng() & 1u);
      u3[i] = static_cast<Bit>(u1[i] ^ u2[i]);
    }
    std::vector<Bit> c1(frames * n, 9), c2(frames * n, 9), c3(frames * n, 9);
    c.Encode(u1, c1);
    c.Encode(u2, c2);
    c.Encode(u3, c3);
    for (std::size_t i = 0; i < c1.size(); ++i) {
      ASSERT_EQ(c3[i], c1[i] ^ c2[i]) << c.name() << " bit " << i;
    }
    for (std::size_t f = 0; f < frames; ++f) {
      const std::uint32_t j = c.InfoToIndex(std::span<const Bit>(u1).subspan(f * k, k));
      const std::vector<Bit> direct = DirectEncode(c, j);
      ASSERT_EQ(std::vector<Bit>(c1.begin() + static_cast<std::ptrdiff_t>(f * n),
                                 c1.begin() + static_cast<std::ptrdiff_t>((f + 1) * n)),
                direct)
          << c.name() << " frame " << f;
      std::vector<Bit> back(k);
      c.IndexToInfo(j, back);
      ASSERT_TRUE(
          std::equal(back.begin(), back.end(), u1.begin() + static_cast<std::ptrdiff_t>(f * k)));
    }
  }
}

TEST(BlockCode, BuiltInsAreSystematicAndEveryCodewordHasZeroSyndrome) {
  for (const char* name : {"hamming8", "golay24"}) {
    const BlockCode c = MustBuiltIn(name);
    const int n = c.n(), k = c.k(), m = n - k;
    auto g = [&](int t, int i) { return c.generator()[static_cast<std::size_t>(t * n + i)]; };
    // G = [I_k | P].
    for (int t = 0; t < k; ++t) {
      for (int i = 0; i < k; ++i) ASSERT_EQ(g(t, i), t == i ? 1 : 0) << name;
    }
    std::vector<int> positions(static_cast<std::size_t>(k));
    for (int t = 0; t < k; ++t) positions[static_cast<std::size_t>(t)] = t;
    EXPECT_EQ(c.systematic_positions(), positions);
    // H = [P^T | I_{n-k}] (standard form; Lin & Costello, 2nd ed., ch. 3):
    // row r of H checks P column r and parity bit k + r.
    std::vector<Bit> cw(static_cast<std::size_t>(n));
    for (std::uint32_t j = 0; j < c.num_codewords(); ++j) {
      std::vector<Bit> u(static_cast<std::size_t>(k));
      c.IndexToInfo(j, u);
      c.Encode(u, cw);
      for (int r = 0; r < m; ++r) {
        int s = cw[static_cast<std::size_t>(k + r)];
        for (int t = 0; t < k; ++t) s ^= g(t, k + r) & cw[static_cast<std::size_t>(t)];
        ASSERT_EQ(s, 0) << name << " codeword " << j << " check " << r;
      }
      for (int i = 0; i < n; ++i) ASSERT_EQ(c.CodewordBit(j, i), cw[static_cast<std::size_t>(i)]);
    }
  }
}

TEST(BlockCode, NonSystematicGeneratorHasNoSystematicPositions) {
  // Rows 110 and 011: column 0 is e_0 and column 2 is e_1, so u sits at
  // positions (0, 2). Rows 110 and 111: columns (1,1), (1,1), (0,1); row 0
  // has no unit column.
  Result<BlockCode> sys = BlockCode::Create(3, 2, std::vector<Bit>{1, 1, 0, 0, 1, 1});
  ASSERT_TRUE(sys.ok());
  EXPECT_EQ(sys.value().systematic_positions(), (std::vector<int>{0, 2}));
  Result<BlockCode> non = BlockCode::Create(3, 2, std::vector<Bit>{1, 1, 0, 1, 1, 1});
  ASSERT_TRUE(non.ok());
  EXPECT_TRUE(non.value().systematic_positions().empty());
}

TEST(BlockCode, CreateRefusesInvalidParametersWithMessages) {
  const std::vector<Bit> g8(8, 1);
  auto msg = [](const Result<BlockCode>& r) {
    return r.ok() ? std::string("OK") : r.status().message();
  };
  EXPECT_EQ(msg(BlockCode::Create(0, 1, {}, "x")), "block code 'x': n = 0: must be in [1, 256]");
  EXPECT_EQ(msg(BlockCode::Create(257, 1, std::vector<Bit>(257, 1), "x")),
            "block code 'x': n = 257: must be in [1, 256]");
  EXPECT_EQ(msg(BlockCode::Create(8, 0, {}, "x")),
            "block code 'x': k = 0: must be in [1, 16] (the ML decoder visits all 2^k codewords)");
  EXPECT_EQ(msg(BlockCode::Create(40, 17, std::vector<Bit>(680, 0), "x")),
            "block code 'x': k = 17: must be in [1, 16] (the ML decoder visits all 2^k "
            "codewords)");
  EXPECT_EQ(msg(BlockCode::Create(2, 3, std::vector<Bit>(6, 1), "x")),
            "block code 'x': k = 3: must be <= n = 2");
  EXPECT_EQ(msg(BlockCode::Create(8, 1, std::vector<Bit>(7, 1), "x")),
            "block code 'x': generator size = 7: must be k n = 8");
  std::vector<Bit> bad = g8;
  bad[5] = 2;
  EXPECT_EQ(msg(BlockCode::Create(4, 2, bad, "x")),
            "block code 'x': generator[1][1] = 2: must be 0 or 1");
  // Row 2 = row 0 + row 1: rank 2 < k = 3.
  const std::vector<Bit> dependent = {1, 0, 1, 0, 0, 1, 1, 0, 1, 1, 0, 0};
  EXPECT_EQ(msg(BlockCode::Create(4, 3, dependent, "x")),
            "block code 'x': generator row 2: is a GF(2) sum of earlier rows; the k rows must be "
            "linearly independent (rank k)");
  EXPECT_EQ(BlockCode::FirstDependentRow(4, 3, dependent), 2);
  const std::vector<Bit> zero_row = {0, 0, 0, 0, 1, 0, 0, 1};
  EXPECT_EQ(BlockCode::FirstDependentRow(4, 2, zero_row), 0);
  EXPECT_EQ(msg(BlockCode::BuiltIn("golay23")),
            "block code 'golay23': unknown; built-in codes: hamming8, golay24");
}

}  // namespace
}  // namespace capgap
