// Tests of the registry's constellation table (sim/chain/registry.h): every
// modulation word goes through ParseConstellation, the PSK/QAM family keeps
// ParseModulation's words and messages, an unclaimed word lists every
// family's choices.
#include "sim/chain/registry.h"

#include <gtest/gtest.h>

#include <string>

#include "blocks/mapping/modulation.h"

namespace capgap {
namespace {

TEST(ConstellationRegistry, PskAndQamWordsParseAsBefore) {
  for (const char* word : {"bpsk", "QPSK", "8psk", "16qam", "1024qam", "64PSK", "4qam"}) {
    const Result<Modulation> a = ParseConstellation(word);
    const Result<Modulation> b = ParseModulation(word);
    ASSERT_TRUE(a.ok()) << word << ": " << a.status().message();
    EXPECT_EQ(a.value(), b.value()) << word;
  }
}

TEST(ConstellationRegistry, ClaimedWordWithABadOrderKeepsTheFamilysMessage) {
  const Result<Modulation> a = ParseConstellation("12qam");
  ASSERT_FALSE(a.ok());
  EXPECT_EQ(a.status().message(), ParseModulation("12qam").status().message());
}

TEST(ConstellationRegistry, UnknownWordListsEveryFamily) {
  const Result<Modulation> a = ParseConstellation("qpsq");
  ASSERT_FALSE(a.ok());
  EXPECT_EQ(a.status().message(), "unknown modulation 'qpsq'; valid: " + ConstellationChoices());
  // The PSK/QAM family's words come first, then the others' in table order.
  EXPECT_EQ(ConstellationChoices().rfind(ModulationChoices(), 0), 0u);
  EXPECT_EQ(std::string(ConstellationSyntax()).rfind("bpsk, qpsk, 8psk", 0), 0u);
}

TEST(ConstellationRegistry, EveryFamilyParsesTheWordsItClaims) {
  for (const ConstellationFamily* f : ConstellationFamilies()) {
    EXPECT_FALSE(f->claims("qpsq")) << f->name;
    EXPECT_FALSE(f->claims("")) << f->name;
  }
}

}  // namespace
}  // namespace capgap
