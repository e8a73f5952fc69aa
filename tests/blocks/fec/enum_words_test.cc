// The ParseX / ToString pairs of the code families' enums (conv decoder,
// termination, LDPC construction, algorithm, schedule, arithmetic): every
// word round-trips, and an unknown word's message lists the valid ones. The
// config key tables use the same words (sim/families/conv_family.cc,
// ldpc_family.cc), so a scheme's options are parsed once into these enums.
#include <gtest/gtest.h>

#include <string_view>

#include "blocks/fec/conv_channel_code.h"
#include "blocks/fec/conv_code.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_decoder.h"

namespace capgap {
namespace {

template <typename Enum, typename Parse>
void ExpectRoundTrips(std::initializer_list<std::string_view> words, Parse parse) {
  for (std::string_view word : words) {
    const Result<Enum> e = parse(word);
    ASSERT_TRUE(e.ok()) << word << ": " << e.status().message();
    EXPECT_EQ(ToString(e.value()), word);
  }
}

TEST(EnumWords, ConvDecoderKindRoundTripsAndListsWords) {
  ExpectRoundTrips<ConvDecoderKind>({"viterbi_soft", "viterbi_hard", "bcjr"},
                                    [](std::string_view w) { return ParseConvDecoderKind(w); });
  EXPECT_EQ(ParseConvDecoderKind("viterbi").status().message(),
            "valid: viterbi_soft, viterbi_hard, bcjr");
}

// One spelling per value, the config key's words, which the HDF5 attribute
// /<scheme>/code/termination has always held (scripts read "tail").
TEST(EnumWords, TerminationRoundTripsTheConfigWords) {
  ExpectRoundTrips<Termination>({"tail", "tailbiting"},
                                [](std::string_view w) { return ParseTermination(w); });
  EXPECT_FALSE(ParseTermination("terminated").ok());
}

TEST(EnumWords, LdpcConstructionKindRoundTripsAndListsWords) {
  ExpectRoundTrips<LdpcConstructionKind>(
      {"peg", "qc", "file"}, [](std::string_view w) { return ParseLdpcConstructionKind(w); });
  EXPECT_EQ(ParseLdpcConstructionKind("random").status().message(), "valid: peg, qc, file");
}

TEST(EnumWords, LdpcDecoderEnumsRoundTrip) {
  ExpectRoundTrips<LdpcAlgorithm>({"sum_product", "min_sum_normalized", "min_sum_offset"},
                                  [](std::string_view w) { return ParseLdpcAlgorithm(w); });
  ExpectRoundTrips<LdpcSchedule>({"flooding", "layered"},
                                 [](std::string_view w) { return ParseLdpcSchedule(w); });
  ExpectRoundTrips<LdpcArithmetic>({"auto", "int8", "int16", "float", "float32"},
                                   [](std::string_view w) { return ParseLdpcArithmetic(w); });
}

}  // namespace
}  // namespace capgap
