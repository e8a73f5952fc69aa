// Crc against published check values and against Boost.CRC (boost/crc.hpp,
// a general-purpose reference) for arbitrary polynomials and widths.
#include "blocks/fec/crc.h"

#include <boost/crc.hpp>
#include <gtest/gtest.h>

#include <cstdint>
#include <random>
#include <string>
#include <vector>

namespace capgap {
namespace {

// Bits of an ASCII string, most significant bit of each byte first.
std::vector<Bit> AsciiBits(const std::string& s) {
  std::vector<Bit> bits;
  for (char ch : s) {
    const auto c = static_cast<unsigned char>(ch);
    for (int i = 7; i >= 0; --i) bits.push_back(static_cast<Bit>((c >> i) & 1));
  }
  return bits;
}

TEST(Crc, Crc11OfOneBitIsThePolynomialItself) {
  // CRC11 of 3GPP TS 38.212 §5.1: g(D) = D^11 + D^10 + D^9 + D^5 + 1 = 0x621.
  // Hand check: the message "1" is M(D) = 1, and D^11 mod g(D) is g(D) - D^11.
  auto crc = Crc::Create(11, 0x621);
  ASSERT_TRUE(crc.ok());
  const std::vector<Bit> one = {1};
  EXPECT_EQ(crc.value().Compute(one), 0x621u);
  // "10": D^12 mod g = D (D^10 + D^9 + D^5 + 1) + g
  //     = (D^11 + D^10 + D^6 + D) + (D^11 + D^10 + D^9 + D^5 + 1)
  //     = D^9 + D^6 + D^5 + D + 1 = 0x263 (hand computation).
  const std::vector<Bit> one_zero = {1, 0};
  EXPECT_EQ(crc.value().Compute(one_zero), 0x263u);
}

TEST(Crc, PublishedCheckValuesOf123456789) {
  // Check values of the ASCII string "123456789" from the catalogue of
  // parametrised CRC algorithms by G. Cook (reveng.sourceforge.io; from
  // memory): CRC-24/LTE-A (the CRC24A of 3GPP TS 38.212 §5.1, 0x864CFB) =
  // 0xCDE703, CRC-24/LTE-B (CRC24B, 0x800063) = 0x23EF52, CRC-16/XMODEM
  // (the CRC16 of TS 38.212, 0x1021) = 0x31C3. All: zero initial register,
  // no reflection, no final XOR.
  const std::vector<Bit> msg = AsciiBits("123456789");
  EXPECT_EQ(Crc::Create(24, 0x864CFB).value().Compute(msg), 0xCDE703u);
  EXPECT_EQ(Crc::Create(24, 0x800063).value().Compute(msg), 0x23EF52u);
  EXPECT_EQ(Crc::Create(16, 0x1021).value().Compute(msg), 0x31C3u);
}

template <std::size_t W>
void CompareWithBoost(std::mt19937& rng, int trials) {
  for (int t = 0; t < trials; ++t) {
    const std::uint32_t poly =
        (static_cast<std::uint32_t>(rng()) & ((W == 32) ? ~0u : ((1u << W) - 1u))) | 1u;
    auto crc = Crc::Create(static_cast<int>(W), poly);
    ASSERT_TRUE(crc.ok());
    const std::size_t len = static_cast<std::size_t>(rng() % 200);
    std::vector<Bit> msg(len);
    using Value = typename boost::crc_basic<W>::value_type;
    boost::crc_basic<W> ref(static_cast<Value>(poly), 0, 0, false, false);
    for (auto& b : msg) {
      b = static_cast<Bit>(rng() & 1u);
      ref.process_bit(b != 0);
    }
    ASSERT_EQ(crc.value().Compute(msg), static_cast<std::uint32_t>(ref.checksum()))
        << "width " << W << " poly 0x" << std::hex << poly << " length " << std::dec << len;
    // Attach then Check: the block is a multiple of g(D).
    std::vector<Bit> block = msg;
    block.resize(len + W);
    crc.value().Attach(msg, std::span<Bit>(block).subspan(len));
    EXPECT_TRUE(crc.value().Check(block));
    if (len > 0) {
      block[rng() % (len + W)] ^= 1;  // any single error is detected (g has D^0 and degree >= 1)
      EXPECT_FALSE(crc.value().Check(block));
    }
  }
}

TEST(Crc, MatchesBoostCrcForRandomPolynomialsOfEveryWidth) {
  // Boost.CRC crc_basic<W>(poly, init 0, xor 0, no reflection) as reference.
  std::mt19937 rng(13);
  CompareWithBoost<1>(rng, 20);
  CompareWithBoost<3>(rng, 50);
  CompareWithBoost<6>(rng, 50);
  CompareWithBoost<8>(rng, 50);
  CompareWithBoost<11>(rng, 50);
  CompareWithBoost<16>(rng, 50);
  CompareWithBoost<17>(rng, 50);
  CompareWithBoost<24>(rng, 50);
}

TEST(Crc, RefusesBadParameters) {
  EXPECT_FALSE(Crc::Create(0, 1).ok());
  EXPECT_FALSE(Crc::Create(25, 1).ok());
  EXPECT_FALSE(Crc::Create(11, 0x1621).ok());  // degree-12 term
  EXPECT_FALSE(Crc::Create(11, 0x620).ok());   // no D^0
  EXPECT_NE(Crc::Create(11, 0x620).status().message().find("D^0"), std::string::npos);
}

}  // namespace
}  // namespace capgap
