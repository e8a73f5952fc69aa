// Tests of the convolutional encoder, puncturing and parsers
// (blocks/fec/conv_code.h).
#include "blocks/fec/conv_code.h"

#include <cstdint>
#include <vector>

#include "gtest/gtest.h"

namespace capgap {
namespace {

ConvCode MakeCode(const char* gens, const char* pattern = "",
                  Termination term = Termination::kTerminated) {
  ConvCodeSpec spec;
  spec.generators = ParseGenerators(gens).value();
  if (pattern[0] != '\0') spec.puncture = ParsePuncturePattern(pattern).value();
  spec.termination = term;
  Result<ConvCode> r = ConvCode::Create(spec);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

// Hand-worked example, K = 3 (5,7), input 1 0 1 1, two zero tail bits.
// State s = (u_{t-1} u_{t-2}), register u_t u_{t-1} u_{t-2};
// c0 = u_t + u_{t-2} (5 = 101), c1 = u_t + u_{t-1} + u_{t-2} (7 = 111):
//   t=0  u=1  s=00  reg=100  c=11  s'=10
//   t=1  u=0  s=10  reg=010  c=01  s'=01
//   t=2  u=1  s=01  reg=101  c=00  s'=10
//   t=3  u=1  s=10  reg=110  c=10  s'=11
//   t=4  u=0  s=11  reg=011  c=10  s'=01   (tail)
//   t=5  u=0  s=01  reg=001  c=11  s'=00   (tail)
TEST(ConvCode, EncodesHandWorkedK3Example) {
  const ConvCode code = MakeCode("5,7");
  EXPECT_EQ(code.constraint_length(), 3);
  const std::vector<Bit> info = {1, 0, 1, 1};
  ASSERT_EQ(code.CodedLength(info.size()), 12u);
  std::vector<Bit> coded(12, 9);
  code.Encode(info, coded);
  EXPECT_EQ(coded, (std::vector<Bit>{1, 1, 0, 1, 0, 0, 1, 0, 1, 0, 1, 1}));
  EXPECT_DOUBLE_EQ(code.EffectiveRate(4), 4.0 / 12.0);
}

// Tail-biting, same code and input: the start state is the last two inputs,
// s = (u_3 u_2) = 11:
//   t=0 u=1 s=11 reg=111 c=01 s'=11;  t=1 u=0 s=11 reg=011 c=10 s'=01;
//   t=2 u=1 s=01 reg=101 c=00 s'=10;  t=3 u=1 s=10 reg=110 c=10 s'=11 (= start).
TEST(ConvCode, EncodesHandWorkedTailBitingExample) {
  const ConvCode code = MakeCode("5,7", "", Termination::kTailBiting);
  const std::vector<Bit> info = {1, 0, 1, 1};
  ASSERT_EQ(code.CodedLength(4), 8u);
  std::vector<Bit> coded(8, 9);
  code.Encode(info, coded);
  EXPECT_EQ(coded, (std::vector<Bit>{0, 1, 1, 0, 0, 0, 1, 0}));
  EXPECT_DOUBLE_EQ(code.EffectiveRate(4), 0.5);
}

// Rate 2/3 by the pattern 10,11 on the mother sequence of the first example
// (11 01 00 10 10 11): steps at phase 1 drop c0: 11 | 1 | 00 | 0 | 10 | 1.
TEST(ConvCode, PuncturesByPatternColumns) {
  const ConvCode code = MakeCode("5,7", "10,11");
  const std::vector<Bit> info = {1, 0, 1, 1};
  ASSERT_EQ(code.CodedLength(4), 9u);
  std::vector<Bit> coded(9, 9);
  code.Encode(info, coded);
  EXPECT_EQ(coded, (std::vector<Bit>{1, 1, 1, 0, 0, 0, 1, 0, 1}));
  EXPECT_DOUBLE_EQ(code.asymptotic_rate(), 2.0 / 3.0);
  EXPECT_DOUBLE_EQ(code.EffectiveRate(4), 4.0 / 9.0);
}

TEST(ConvCode, DepunctureInsertsZeroLlrsAtPuncturedPositions) {
  const ConvCode code = MakeCode("133,171", "110,101");  // IEEE 802.11a rate 3/4
  const std::size_t len = 10;  // 16 steps, 32 mother bits
  const std::size_t coded = code.CodedLength(len);
  EXPECT_EQ(coded, 22u);  // 5 periods x 4 + first step of the 6th (2 kept)
  std::vector<float> llrs(coded);
  for (std::size_t i = 0; i < coded; ++i) llrs[i] = static_cast<float>(i + 1);
  std::vector<float> mother(code.MotherLength(len), -1.0f);
  code.Depuncture(llrs, mother);
  std::size_t next = 1;
  for (std::size_t t = 0; t < 16; ++t) {
    for (int i = 0; i < 2; ++i) {
      const float v = mother[2 * t + static_cast<std::size_t>(i)];
      if (code.Kept(i, t)) {
        EXPECT_EQ(v, static_cast<float>(next++));
      } else {
        EXPECT_EQ(v, 0.0f);
      }
    }
  }
  // Pattern 110 / 101: phase 2 keeps c1 only, phase 1 keeps c0 only.
  EXPECT_FALSE(code.Kept(1, 1));
  EXPECT_FALSE(code.Kept(0, 2));
}

TEST(ConvCode, EffectiveRateCountsTail) {
  // R_eff = L / (n (L + K - 1)) for L information bits of a terminated code
  // (common practice; tail bits counted, conv_code.h).
  const ConvCode code = MakeCode("133,171");
  EXPECT_DOUBLE_EQ(code.EffectiveRate(100), 100.0 / (2.0 * 106.0));
}

TEST(ParseGenerators, ParsesOctalList) {
  Result<std::vector<std::uint32_t>> r = ParseGenerators(" 133, 171 ");
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.value(), (std::vector<std::uint32_t>{0133, 0171}));
  EXPECT_EQ(GeneratorsToString(r.value()), "133,171");
}

TEST(ParseGenerators, ErrorNamesOffendingWord) {
  Result<std::vector<std::uint32_t>> r = ParseGenerators("133,18");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "generators '133,18': '18' is not an octal number");
  r = ParseGenerators("133,,171");
  EXPECT_EQ(r.status().message(), "generators '133,,171': empty word");
  r = ParseGenerators("13333,171");
  EXPECT_EQ(r.status().message(),
            "generators '13333,171': '13333' has more than 4 octal digits (K <= 9)");
}

TEST(ParsePuncturePattern, ParsesRowsAndRejectsBadText) {
  Result<PuncturePattern> r = ParsePuncturePattern("110,101");
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.value().period(), 3);
  EXPECT_EQ(ToString(r.value()), "110,101");
  r = ParsePuncturePattern("11,1x");
  EXPECT_EQ(r.status().message(), "puncture pattern '11,1x': row '1x' may hold only 0 and 1");
  r = ParsePuncturePattern("110,10");
  EXPECT_EQ(r.status().message(),
            "puncture pattern '110,10': row '10' has 2 columns, the first row 3");
  r = ParsePuncturePattern("");
  EXPECT_EQ(r.status().message(), "puncture pattern '': empty row");
}

TEST(ConvCode, CreateRejectsBadSpecsWithExactMessages) {
  ConvCodeSpec spec;
  spec.generators = {05};
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (5): number of generators = 1: must be in [2, 4] (rate 1/n)");
  spec.generators = {01, 03};
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (1,3): constraint length K = 2: must be in [3, 9]");
  spec.generators = {05, 07};
  spec.constraint_length = 4;
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (5,7): no generator taps the current input (the code has a smaller K)");
  spec.constraint_length = 0;
  spec.puncture = ParsePuncturePattern("11").value();
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (5,7): puncture pattern '11' has 1 rows: must have one per generator (2)");
  spec.puncture = ParsePuncturePattern("100,001").value();
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (5,7): puncture pattern '100,001' keeps 2 bits per 3 information bits: "
            "rate must be <= 1");
}

// (6,5) = (110, 101): g0 = 1 + D, g1 = 1 + D^2 = (1 + D)^2 share the factor
// 1 + D, so the code is catastrophic (Massey-Sain; the classic example of
// Lin & Costello, Error Control Coding, 2nd ed., ch. 11; from memory): the
// all-ones input gives the finite-weight output 11 01 00 00 ...
TEST(ConvCode, CreateRejectsCatastrophicCode) {
  ConvCodeSpec spec;
  spec.generators = {06, 05};
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (6,5): catastrophic code (a zero-weight trellis cycle)");
  // Puncturing can make a good code catastrophic: (5,7) keeping c0 only
  // ("1,0", rate 1) leaves g0 = 1 + D^2, and the all-ones input gives
  // c0 = u_t + u_{t-2} = 0 from step 2 on, a zero-weight loop at state 11.
  spec.generators = {05, 07};
  spec.puncture = ParsePuncturePattern("1,0").value();
  EXPECT_EQ(ConvCode::Create(spec).status().message(),
            "conv code (5,7): catastrophic with puncture pattern '1,0' (a zero-weight trellis "
            "cycle)");
  // "11,10" too: the alternating input 1 0 1 0 ... loops 01 -> 10 -> 01 with
  // outputs 00 (phase 0) and 01 with c1 punctured (phase 1). "10,11" is not.
  spec.puncture = ParsePuncturePattern("11,10").value();
  EXPECT_FALSE(ConvCode::Create(spec).ok());
  spec.puncture = ParsePuncturePattern("10,11").value();
  EXPECT_TRUE(ConvCode::Create(spec).ok());
}

TEST(ParseTermination, RoundTripsAndListsWords) {
  EXPECT_EQ(ParseTermination("tailbiting").value(), Termination::kTailBiting);
  EXPECT_EQ(ToString(Termination::kTerminated), "tail");
  EXPECT_EQ(ParseTermination("zero").status().message(),
            "unknown termination 'zero'; valid: tail, tailbiting");
}

}  // namespace
}  // namespace capgap
