// Interleavers: permutation property, inverse, row-column layout, refusals.
#include "blocks/fec/interleaver.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <vector>

namespace capgap {
namespace {

constexpr PhiloxKey kKey{7u, 11u};

InterleaverSpec Spec(InterleaverKind kind, std::uint32_t rows = 0) {
  InterleaverSpec s;
  s.kind = kind;
  s.rows = rows;
  return s;
}

TEST(Interleaver, RandomIsAPermutationAndDeinterleaveInvertsIt) {
  for (const std::size_t n : {1u, 2u, 7u, 1000u, 4095u}) {
    auto il = Interleaver::Create(Spec(InterleaverKind::kRandom), n, kKey).value();
    std::vector<std::uint32_t> p(il.permutation().begin(), il.permutation().end());
    std::sort(p.begin(), p.end());
    for (std::size_t i = 0; i < n; ++i) ASSERT_EQ(p[i], i);
    std::vector<Bit> bits(n), mixed(n);
    for (std::size_t i = 0; i < n; ++i) bits[i] = static_cast<Bit>((i * 7 + i / 3) % 2);
    il.Interleave(bits, mixed);
    std::vector<float> llr(n), back(n, -99.0f);
    for (std::size_t i = 0; i < n; ++i) llr[i] = mixed[i] ? -1.0f - float(i) : 1.0f + float(i);
    il.Deinterleave(llr, back);
    for (std::size_t i = 0; i < n; ++i) EXPECT_EQ(back[i] < 0 ? 1 : 0, bits[i]) << i;
  }
}

TEST(Interleaver, RandomDependsOnKeyOnly) {
  auto a = Interleaver::Create(Spec(InterleaverKind::kRandom), 500, kKey).value();
  auto b = Interleaver::Create(Spec(InterleaverKind::kRandom), 500, kKey).value();
  auto c = Interleaver::Create(Spec(InterleaverKind::kRandom), 500, PhiloxKey{8u, 11u}).value();
  EXPECT_TRUE(std::equal(a.permutation().begin(), a.permutation().end(), b.permutation().begin()));
  EXPECT_FALSE(std::equal(a.permutation().begin(), a.permutation().end(), c.permutation().begin()));
  // Not the identity: fewer than 1 % fixed points expected (about 1 of 500).
  int fixed = 0;
  for (std::size_t i = 0; i < 500; ++i) fixed += a.permutation()[i] == i;
  EXPECT_LT(fixed, 6);
}

// 3 rows x 4 columns: written by rows 0..11, read by columns gives
// 0 4 8 1 5 9 2 6 10 3 7 11 (definition of the row-column interleaver).
TEST(Interleaver, RowsReadsColumns) {
  auto il = Interleaver::Create(Spec(InterleaverKind::kRows, 3), 12, kKey).value();
  const std::uint32_t want[] = {0, 4, 8, 1, 5, 9, 2, 6, 10, 3, 7, 11};
  for (std::size_t i = 0; i < 12; ++i) EXPECT_EQ(il.permutation()[i], want[i]);
}

TEST(Interleaver, RefusesRowsThatDoNotDivide) {
  auto r = Interleaver::Create(Spec(InterleaverKind::kRows, 5), 12, kKey);
  ASSERT_FALSE(r.ok());
  EXPECT_NE(r.status().message().find("interleaver_rows = 5"), std::string::npos);
  EXPECT_FALSE(Interleaver::Create(Spec(InterleaverKind::kNone), 12, kKey).ok());
}

}  // namespace
}  // namespace capgap
