// Tests of the systematic LDPC encoder (blocks/fec/ldpc_encoder.h): the
// hand-worked (7,4) Hamming example, H c = 0 for PEG, QC and rank-deficient
// codes, info bits at info_positions(), linearity, and the dual-diagonal
// fast path against the general elimination path.
#include "blocks/fec/ldpc_encoder.h"

#include <algorithm>
#include <cstdint>
#include <memory>
#include <random>
#include <vector>

#include "blocks/fec/ldpc_construction.h"
#include "gtest/gtest.h"

namespace capgap {
namespace {

std::shared_ptr<const LdpcCode> Share(Result<LdpcCode> r) {
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::make_shared<const LdpcCode>(std::move(r).value());
}

std::vector<std::vector<int>> Rows(const LdpcCode& code) {
  std::vector<std::vector<int>> rows(static_cast<std::size_t>(code.checks()));
  for (int r = 0; r < code.checks(); ++r) {
    for (int e = code.row_start()[static_cast<std::size_t>(r)];
         e < code.row_start()[static_cast<std::size_t>(r) + 1]; ++e) {
      rows[static_cast<std::size_t>(r)].push_back(
          code.edge_variable()[static_cast<std::size_t>(e)]);
    }
  }
  return rows;
}

LdpcEncoder MakeEncoder(std::shared_ptr<const LdpcCode> code,
                        LdpcEncoder::Method method = LdpcEncoder::Method::kAuto) {
  Result<LdpcEncoder> r = LdpcEncoder::Create(std::move(code), method);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

// Syndrome check written independently of IsCodeword: a dense row loop.
bool SyndromeIsZero(const std::vector<std::vector<int>>& rows, const std::vector<Bit>& c) {
  for (const auto& row : rows) {
    int s = 0;
    for (int v : row) s += c[static_cast<std::size_t>(v)];
    if (s % 2 != 0) return false;
  }
  return true;
}

// GF(2) rank by plain dense elimination over columns left to right (a
// different order and representation from the encoder's).
int DenseRank(const LdpcCode& code) {
  const auto rows = Rows(code);
  std::vector<std::vector<std::uint8_t>> h(
      rows.size(), std::vector<std::uint8_t>(static_cast<std::size_t>(code.length()), 0));
  for (std::size_t r = 0; r < rows.size(); ++r) {
    for (int v : rows[r]) h[r][static_cast<std::size_t>(v)] = 1;
  }
  std::size_t rank = 0;
  for (std::size_t c = 0; c < static_cast<std::size_t>(code.length()) && rank < h.size(); ++c) {
    std::size_t p = rank;
    while (p < h.size() && !h[p][c]) ++p;
    if (p == h.size()) continue;
    std::swap(h[p], h[rank]);
    // The pivot row is zero left of c (earlier pivots were eliminated from
    // it, skipped columns were zero in all remaining rows).
    const std::uint8_t* pivot = h[rank].data();
    for (std::size_t r = 0; r < h.size(); ++r) {
      if (r != rank && h[r][c]) {
        std::uint8_t* row = h[r].data();
        for (std::size_t j = c; j < h[r].size(); ++j) row[j] ^= pivot[j];
      }
    }
    ++rank;
  }
  return static_cast<int>(rank);
}

std::vector<Bit> RandomBits(std::mt19937_64& rng, int count) {
  std::vector<Bit> b(static_cast<std::size_t>(count));
  for (auto& x : b) x = static_cast<Bit>(rng() & 1u);
  return b;
}

std::vector<Bit> Encode(const LdpcEncoder& enc, const std::vector<Bit>& info) {
  std::vector<Bit> c(static_cast<std::size_t>(enc.length()), 7);  // poisoned
  enc.Encode(info, c);
  return c;
}

// Properties every encoder must have, on `words` random info words: bits
// 0/1, H c = 0 (both checks), info bits at info_positions(), linearity.
void ExpectValidEncoder(const LdpcEncoder& enc, int words, std::uint64_t seed) {
  const LdpcCode& code = enc.code();
  ASSERT_EQ(enc.length(), code.length());
  ASSERT_EQ(static_cast<int>(enc.info_positions().size()), enc.info_bits());
  ASSERT_TRUE(std::is_sorted(enc.info_positions().begin(), enc.info_positions().end()));
  const std::vector<std::vector<int>> rows = Rows(code);
  std::mt19937_64 rng(seed);
  for (int w = 0; w < words; ++w) {
    const std::vector<Bit> a = RandomBits(rng, enc.info_bits());
    const std::vector<Bit> b = RandomBits(rng, enc.info_bits());
    std::vector<Bit> ab(a.size());
    for (std::size_t i = 0; i < a.size(); ++i) ab[i] = a[i] ^ b[i];
    const std::vector<Bit> ca = Encode(enc, a), cb = Encode(enc, b), cab = Encode(enc, ab);
    for (std::size_t j = 0; j < ca.size(); ++j) ASSERT_LE(ca[j], 1) << "position " << j;
    ASSERT_TRUE(enc.IsCodeword(ca)) << "word " << w;
    ASSERT_TRUE(SyndromeIsZero(rows, ca)) << "word " << w;
    for (int i = 0; i < enc.info_bits(); ++i) {
      ASSERT_EQ(ca[static_cast<std::size_t>(enc.info_positions()[static_cast<std::size_t>(i)])],
                a[static_cast<std::size_t>(i)]);
    }
    for (std::size_t j = 0; j < ca.size(); ++j)
      ASSERT_EQ(cab[j], ca[j] ^ cb[j]) << "position " << j;
  }
}

// (7,4) Hamming parity-check matrix in its usual systematic form (common
// practice; from memory): columns 4, 5, 6 are the identity.
std::shared_ptr<const LdpcCode> Hamming() {
  return Share(LdpcCode::FromRows(7, {{0, 1, 3, 4}, {0, 2, 3, 5}, {1, 2, 3, 6}}));
}

TEST(LdpcEncoder, HammingHandWorkedCodeword) {
  const LdpcEncoder enc = MakeEncoder(Hamming());
  EXPECT_EQ(enc.info_bits(), 4);
  EXPECT_EQ(enc.rank(), 3);
  EXPECT_FALSE(enc.uses_dual_diagonal());
  // Pivots are searched from the last column, so parities sit at 4, 5, 6:
  //   c4 = u0 + u1 + u3, c5 = u0 + u2 + u3, c6 = u1 + u2 + u3.
  // u = 1 0 1 1: c4 = 1+0+1 = 0, c5 = 1+1+1 = 1, c6 = 0+1+1 = 0.
  EXPECT_EQ(std::vector<int>(enc.info_positions().begin(), enc.info_positions().end()),
            (std::vector<int>{0, 1, 2, 3}));
  EXPECT_EQ(Encode(enc, {1, 0, 1, 1}), (std::vector<Bit>{1, 0, 1, 1, 0, 1, 0}));
}

TEST(LdpcEncoder, HammingCodeHasMinimumDistanceThree) {
  // d_min = 3 for the Hamming codes (common practice): over all 16 info
  // words the smallest nonzero codeword weight is 3, and 7 codewords have
  // weight 3 (the (7,4) weight enumerator 1 + 7x^3 + 7x^4 + x^7; from memory).
  const LdpcEncoder enc = MakeEncoder(Hamming());
  int min_weight = 8, weight3 = 0;
  for (int u = 1; u < 16; ++u) {
    const std::vector<Bit> info = {static_cast<Bit>(u & 1), static_cast<Bit>((u >> 1) & 1),
                                   static_cast<Bit>((u >> 2) & 1), static_cast<Bit>((u >> 3) & 1)};
    const std::vector<Bit> c = Encode(enc, info);
    ASSERT_TRUE(enc.IsCodeword(c));
    int w = 0;
    for (Bit b : c) w += b;
    min_weight = std::min(min_weight, w);
    weight3 += w == 3 ? 1 : 0;
  }
  EXPECT_EQ(min_weight, 3);
  EXPECT_EQ(weight3, 7);
}

TEST(LdpcEncoder, IsCodewordRejectsAnySingleBitFlip) {
  const LdpcEncoder enc = MakeEncoder(Hamming());
  std::vector<Bit> c = Encode(enc, {0, 1, 1, 0});
  ASSERT_TRUE(enc.IsCodeword(c));
  for (std::size_t j = 0; j < c.size(); ++j) {
    c[j] ^= 1;
    EXPECT_FALSE(enc.IsCodeword(c)) << "flip " << j;
    c[j] ^= 1;
  }
}

PegSpec Spec(int n, const char* degrees) {
  PegSpec s;
  s.length = n;
  s.checks = ChecksForRate(n, 0.5);
  s.degrees = ParseVariableDegrees(degrees).value();
  return s;
}

TEST(LdpcEncoder, PegCodesGiveCodewords) {
  for (const int n : {504, 2016}) {
    const auto code = Share(BuildPegCode(Spec(n, "3")));
    const LdpcEncoder enc = MakeEncoder(code);
    EXPECT_FALSE(enc.uses_dual_diagonal());
    EXPECT_EQ(enc.rank(), DenseRank(*code)) << "n = " << n;
    EXPECT_EQ(enc.info_bits(), n - DenseRank(*code));
    ExpectValidEncoder(enc, 50, static_cast<std::uint64_t>(n));
  }
}

TEST(LdpcEncoder, IrregularPegCodeGivesCodewords) {
  const auto code = Share(BuildPegCode(Spec(1008, "2:0.5,3:0.3,8:0.2")));
  const LdpcEncoder enc = MakeEncoder(code);
  EXPECT_EQ(enc.rank(), DenseRank(*code));
  ExpectValidEncoder(enc, 50, 3);
}

TEST(LdpcEncoder, RankDeficientHDropsRedundantChecks) {
  // A PEG code plus a duplicate of check 0 and the sum of checks 1 and 2:
  // the rank stays that of the PEG code, k = n - rank.
  const auto peg = BuildPegCode(Spec(504, "3")).value();
  std::vector<std::vector<int>> rows = Rows(peg);
  rows.push_back(rows[0]);
  std::vector<int> sum;
  std::set_symmetric_difference(rows[1].begin(), rows[1].end(), rows[2].begin(), rows[2].end(),
                                std::back_inserter(sum));
  rows.push_back(sum);
  const auto code = Share(LdpcCode::FromRows(504, rows));
  const LdpcEncoder enc = MakeEncoder(code);
  const int peg_rank = DenseRank(peg);
  EXPECT_EQ(code->checks(), peg.checks() + 2);
  EXPECT_EQ(enc.rank(), peg_rank);
  EXPECT_EQ(DenseRank(*code), peg_rank);
  EXPECT_EQ(enc.info_bits(), 504 - peg_rank);
  ExpectValidEncoder(enc, 50, 11);
}

TEST(LdpcEncoder, SmallRankDeficientExample) {
  // Checks {0,1}, {1,2}, {0,2}: the third is the sum of the first two, so
  // rank 2, k = 1, and the code is the repetition code {000, 111}.
  const LdpcEncoder enc = MakeEncoder(Share(LdpcCode::FromRows(3, {{0, 1}, {1, 2}, {0, 2}})));
  EXPECT_EQ(enc.rank(), 2);
  ASSERT_EQ(enc.info_bits(), 1);
  EXPECT_EQ(Encode(enc, {1}), (std::vector<Bit>{1, 1, 1}));
  EXPECT_EQ(Encode(enc, {0}), (std::vector<Bit>{0, 0, 0}));
}

std::shared_ptr<const LdpcCode> DesignedQc(int z) {
  const BaseMatrix b =
      ReadBaseMatrixFile(CAPGAP_SOURCE_DIR "/configs/codes/qc_r1-2_24x12.txt").value();
  return Share(LiftBaseMatrix(b, z));
}

TEST(LdpcEncoder, DualDiagonalPathMatchesGeneralPath) {
  const auto code = DesignedQc(84);
  const LdpcEncoder fast = MakeEncoder(code);
  const LdpcEncoder general = MakeEncoder(code, LdpcEncoder::Method::kGeneral);
  ASSERT_TRUE(fast.uses_dual_diagonal());
  ASSERT_FALSE(general.uses_dual_diagonal());
  EXPECT_EQ(fast.info_bits(), 1008);
  EXPECT_EQ(general.info_bits(), 1008);
  EXPECT_EQ(DenseRank(*code), 1008);
  // Both put the info bits in the first k positions (the general path's
  // right-to-left pivot search takes the invertible parity part).
  for (int i = 0; i < 1008; ++i) {
    ASSERT_EQ(fast.info_positions()[static_cast<std::size_t>(i)], i);
    ASSERT_EQ(general.info_positions()[static_cast<std::size_t>(i)], i);
  }
  ExpectValidEncoder(fast, 50, 21);
  std::mt19937_64 rng(22);
  for (int w = 0; w < 100; ++w) {
    const std::vector<Bit> info = RandomBits(rng, 1008);
    ASSERT_EQ(Encode(fast, info), Encode(general, info)) << "word " << w;
  }
  // Unit vectors: each info bit's parity pattern agrees, including the
  // first and last bit of every block.
  for (int i = 0; i < 1008; i += 41) {
    std::vector<Bit> info(1008, 0);
    info[static_cast<std::size_t>(i)] = 1;
    ASSERT_EQ(Encode(fast, info), Encode(general, info)) << "info bit " << i;
  }
}

TEST(LdpcEncoder, DualDiagonalPathWorksAtOtherLiftings) {
  // Shifts taken mod Z: girth drops, but the parity structure remains.
  for (const int z : {5, 42, 96}) {
    const auto code = DesignedQc(z);
    const LdpcEncoder fast = MakeEncoder(code);
    ASSERT_TRUE(fast.uses_dual_diagonal()) << "Z = " << z;
    EXPECT_EQ(fast.info_bits(), 12 * z);
    ExpectValidEncoder(fast, 20, static_cast<std::uint64_t>(z));
    const LdpcEncoder general = MakeEncoder(code, LdpcEncoder::Method::kGeneral);
    std::mt19937_64 rng(static_cast<std::uint64_t>(z) + 1);
    const std::vector<Bit> info = RandomBits(rng, 12 * z);
    EXPECT_EQ(Encode(fast, info), Encode(general, info)) << "Z = " << z;
  }
}

TEST(LdpcEncoder, GeneralMiddleRowAndShiftsUseTheFastPath) {
  // A 4 x 8 base with a = 3, b = 2, x = 2 (not the designed values).
  BaseMatrix b;
  b.rows = 4;
  b.cols = 8;
  b.design_lifting = 7;
  b.source_name = "dd";
  // clang-format off
  b.shifts = { 1,  4, -1,  0,   3,  0, -1, -1,
               2, -1,  5,  6,  -1,  0,  0, -1,
              -1,  3,  1,  2,   2, -1,  0,  0,
               6,  2, -1,  4,   3, -1, -1,  0};
  // clang-format on
  const std::optional<DualDiagonalStructure> dd = FindDualDiagonal(b);
  ASSERT_TRUE(dd.has_value());
  EXPECT_EQ(dd->shift_a, 3);
  EXPECT_EQ(dd->shift_b, 2);
  EXPECT_EQ(dd->middle_row, 2);
  const auto code = Share(LiftBaseMatrix(b, 7));
  const LdpcEncoder fast = MakeEncoder(code);
  ASSERT_TRUE(fast.uses_dual_diagonal());
  ExpectValidEncoder(fast, 50, 5);
  const LdpcEncoder general = MakeEncoder(code, LdpcEncoder::Method::kGeneral);
  std::mt19937_64 rng(6);
  for (int w = 0; w < 20; ++w) {
    const std::vector<Bit> info = RandomBits(rng, fast.info_bits());
    ASSERT_EQ(Encode(fast, info), Encode(general, info));
  }
}

TEST(LdpcEncoder, LiftedCodeWithoutDualDiagonalUsesGeneralPath) {
  BaseMatrix b;
  b.rows = 2;
  b.cols = 4;
  b.design_lifting = 5;
  b.source_name = "plain";
  b.shifts = {0, 1, 2, 3, 4, 0, 1, 2};
  const auto code = Share(LiftBaseMatrix(b, 5));
  const LdpcEncoder enc = MakeEncoder(code);
  EXPECT_FALSE(enc.uses_dual_diagonal());
  EXPECT_EQ(enc.rank(), DenseRank(*code));
  ExpectValidEncoder(enc, 30, 9);
}

TEST(LdpcEncoder, CreateRejectsNullAndFullRank) {
  EXPECT_EQ(LdpcEncoder::Create(nullptr).status().message(), "LDPC encoder: no code");
  const auto identity = Share(LdpcCode::FromRows(3, {{0}, {1}, {2}}));
  EXPECT_EQ(LdpcEncoder::Create(identity).status().message(),
            "LDPC encoder: H has full column rank 3: no information bits");
}

}  // namespace
}  // namespace capgap
