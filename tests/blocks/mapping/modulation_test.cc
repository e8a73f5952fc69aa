// Tests of the modulation words: every accepted spelling, the canonical
// round trip, and the exact error messages (they are part of the interface:
// config and CLI show them to the user).
#include "blocks/mapping/modulation.h"

#include <gtest/gtest.h>

#include <string>
#include <vector>

namespace capgap {
namespace {

const char kChoices[] =
    "bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, <M>psk (M = 2..64, power of 2), "
    "<M>qam (M = 4..1024, power of 4)";

// Every modulation the header admits: PSK M = 2..64, QAM M = 4..1024 (4^k).
std::vector<Modulation> AllModulations() {
  std::vector<Modulation> all;
  for (int m = 2; m <= 64; m *= 2) all.push_back({ModulationFamily::kPsk, m});
  for (int m = 4; m <= 1024; m *= 4) all.push_back({ModulationFamily::kQam, m});
  return all;
}

TEST(ParseModulation, AcceptsTheNamedWords) {
  struct Case {
    const char* word;
    ModulationFamily family;
    int order;
  };
  const Case cases[] = {
      {"bpsk", ModulationFamily::kPsk, 2},   {"qpsk", ModulationFamily::kPsk, 4},
      {"8psk", ModulationFamily::kPsk, 8},   {"16qam", ModulationFamily::kQam, 16},
      {"64qam", ModulationFamily::kQam, 64}, {"256qam", ModulationFamily::kQam, 256},
      {"2psk", ModulationFamily::kPsk, 2},   {"4psk", ModulationFamily::kPsk, 4},
      {"32psk", ModulationFamily::kPsk, 32}, {"64psk", ModulationFamily::kPsk, 64},
      {"4qam", ModulationFamily::kQam, 4},   {"1024qam", ModulationFamily::kQam, 1024},
      {"16QAM", ModulationFamily::kQam, 16}, {"BPSK", ModulationFamily::kPsk, 2},
  };
  for (const Case& c : cases) {
    const Result<Modulation> r = ParseModulation(c.word);
    ASSERT_TRUE(r.ok()) << c.word << ": " << r.status().message();
    EXPECT_EQ(r.value().family, c.family) << c.word;
    EXPECT_EQ(r.value().order, c.order) << c.word;
  }
}

TEST(ParseModulation, RoundTripsEveryCanonicalWord) {
  for (const Modulation& m : AllModulations()) {
    const std::string word = ToString(m);
    const Result<Modulation> r = ParseModulation(word);
    ASSERT_TRUE(r.ok()) << word << ": " << r.status().message();
    EXPECT_EQ(r.value(), m) << word;
    EXPECT_TRUE(ValidateModulation(m).ok()) << word;
  }
}

TEST(ToString, UsesTheFirstSpelling) {
  EXPECT_EQ(ToString({ModulationFamily::kPsk, 2}), "bpsk");
  EXPECT_EQ(ToString({ModulationFamily::kPsk, 4}), "qpsk");
  EXPECT_EQ(ToString({ModulationFamily::kPsk, 8}), "8psk");
  EXPECT_EQ(ToString({ModulationFamily::kQam, 4}), "4qam");
  EXPECT_EQ(ToString({ModulationFamily::kQam, 16}), "16qam");
  EXPECT_EQ(ToString({ModulationFamily::kQam, 1024}), "1024qam");
}

TEST(ParseModulation, UnknownWordListsTheValidWords) {
  const Result<Modulation> r = ParseModulation("qpsq");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(),
            "unknown modulation 'qpsq'; valid: bpsk, qpsk, 8psk, 16qam, 64qam, 256qam, "
            "<M>psk (M = 2..64, power of 2), <M>qam (M = 4..1024, power of 4)");
  EXPECT_EQ(ModulationChoices(), kChoices);
}

TEST(ParseModulation, RejectsMalformedWords) {
  for (const char* word : {"", "psk", "qam", "16", "016qam", "04psk", "-4psk", "+4psk", "16 qam",
                           "16qamx", "qam16", "1e2qam", "99999999999qam"}) {
    const Result<Modulation> r = ParseModulation(word);
    ASSERT_FALSE(r.ok()) << "'" << word << "' was accepted";
    EXPECT_EQ(r.status().message(),
              "unknown modulation '" + std::string(word) + "'; valid: " + kChoices);
  }
}

TEST(ParseModulation, RejectsUnsupportedOrdersNamingTheRule) {
  struct Case {
    const char* word;
    const char* message;
  };
  const Case cases[] = {
      {"32qam", "unsupported modulation '32qam': M = 32 must be a power of 4 in 4..1024"},
      {"2qam", "unsupported modulation '2qam': M = 2 must be a power of 4 in 4..1024"},
      {"4096qam", "unsupported modulation '4096qam': M = 4096 must be a power of 4 in 4..1024"},
      {"12qam", "unsupported modulation '12qam': M = 12 must be a power of 4 in 4..1024"},
      {"1psk", "unsupported modulation '1psk': M = 1 must be a power of 2 in 2..64"},
      {"6psk", "unsupported modulation '6psk': M = 6 must be a power of 2 in 2..64"},
      {"128psk", "unsupported modulation '128psk': M = 128 must be a power of 2 in 2..64"},
  };
  for (const Case& c : cases) {
    const Result<Modulation> r = ParseModulation(c.word);
    ASSERT_FALSE(r.ok()) << c.word;
    EXPECT_EQ(r.status().message(), std::string(c.message) + "; valid: " + kChoices);
  }
}

TEST(ValidateModulation, NamesFamilyOrderAndRule) {
  EXPECT_EQ(ValidateModulation({ModulationFamily::kQam, 32}).message(),
            "modulation qam: M = 32: must be a power of 4 in 4..1024");
  EXPECT_EQ(ValidateModulation({ModulationFamily::kPsk, 0}).message(),
            "modulation psk: M = 0: must be a power of 2 in 2..64");
  EXPECT_FALSE(ValidateModulation({ModulationFamily::kPsk, 128}).ok());
}

TEST(Modulation, BitsPerSymbolIsLog2OfTheOrder) {
  for (const Modulation& m : AllModulations()) {
    EXPECT_EQ(1 << m.bits_per_symbol(), m.order) << ToString(m);
  }
  EXPECT_EQ((Modulation{ModulationFamily::kPsk, 2}).bits_per_symbol(), 1);
  EXPECT_EQ((Modulation{ModulationFamily::kQam, 1024}).bits_per_symbol(), 10);
}

}  // namespace
}  // namespace capgap
