// Tests of the max-log BCJR decoder (blocks/fec/bcjr_decoder.h) against the
// whole-frame float Viterbi decoder, and of its LLR sign convention.
#include "blocks/fec/bcjr_decoder.h"

#include <cmath>
#include <cstdint>
#include <random>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/fec/viterbi_decoder.h"
#include "blocks/kernels/awgn_kernels.h"
#include "gtest/gtest.h"

namespace capgap {
namespace {

ConvCode MakeCode(const char* gens, const char* pattern = "") {
  ConvCodeSpec spec;
  spec.generators = ParseGenerators(gens).value();
  if (pattern[0] != '\0') spec.puncture = ParsePuncturePattern(pattern).value();
  return ConvCode::Create(spec).value();
}

// Noiseless (LLR +-4) and noisy frames at Eb/N0 = 2 and 5 dB: the max-log
// BCJR hard decisions (1 iff L < 0) maximise the same path metric as
// maximum-likelihood sequence decoding, so they equal the whole-frame float
// Viterbi decisions (exact ties have probability zero). 3 codes x 3 SNRs x
// 30 frames of 300 bits.
TEST(BcjrDecoder, HardDecisionsEqualViterbiDecisions) {
  std::mt19937_64 rng(21);
  const PhiloxKey key = DeriveKey(21, "bcjr");
  std::uint32_t unit = 0;
  for (const auto& [gens, pattern] : {std::pair{"5,7", ""}, std::pair{"133,171", ""},
                                      std::pair{"133,171", "110,101"}}) {
    const ConvCode code = MakeCode(gens, pattern);
    const BcjrDecoder bcjr = BcjrDecoder::Create(code).value();
    ViterbiOptions o;
    o.metric = ViterbiMetric::kFloat;
    o.traceback_length = 0;
    const ViterbiDecoder vit = ViterbiDecoder::Create(code, o).value();
    BcjrDecoder::Workspace wb = bcjr.MakeWorkspace(300);
    ViterbiDecoder::Workspace wv = vit.MakeWorkspace(300);
    for (double ebno_db : {-100.0, 2.0, 5.0}) {  // -100: noiseless marker
      for (int f = 0; f < 30; ++f) {
        std::vector<Bit> info(300), coded(code.CodedLength(300)), vout(300);
        for (auto& b : info) b = static_cast<Bit>(rng() & 1u);
        code.Encode(info, coded);
        std::vector<float> llr(coded.size());
        for (std::size_t i = 0; i < coded.size(); ++i) llr[i] = coded[i] ? -1.0f : 1.0f;
        if (ebno_db > -50.0) {
          const double n0 = 1.0 / (code.EffectiveRate(300) * std::pow(10.0, ebno_db / 10.0));
          RngStream stream(key, 0, unit++, Substream::kNoise);
          AddRealNoise(llr, static_cast<float>(std::sqrt(n0 / 2)), stream);
          for (auto& v : llr) v = static_cast<float>(4.0 * v / n0);
        } else {
          for (auto& v : llr) v *= 4.0f;
        }
        std::vector<float> out(300, std::nanf(""));
        bcjr.Decode(llr, out, wb);
        vit.Decode(llr, vout, wv);
        std::vector<Bit> hard(300);
        for (std::size_t i = 0; i < 300; ++i) {
          ASSERT_FALSE(std::isnan(out[i]));
          hard[i] = out[i] < 0.0f ? 1 : 0;
        }
        EXPECT_EQ(hard, vout) << gens << " " << pattern << " " << ebno_db << " dB frame " << f;
        if (ebno_db < -50.0) {
          EXPECT_EQ(hard, info);
        }
      }
    }
  }
}

// Sign convention: L > 0 favours 0. Noiseless all-zero frame: every output
// positive; all-ones information: every output negative. Magnitude on a
// noiseless frame with channel LLRs +-A: with gamma = (1/2) sum (1 - 2c) L a
// path loses A per coded bit where it differs from the sent codeword, and the
// best path with the other value of u_t differs in at least d_free = 5 bits
// (K = 3; Proakis & Salehi 5th ed. ch. 8, from memory), so |L| >= 5 A.
TEST(BcjrDecoder, OutputLlrSignConventionAndNoiselessMagnitude) {
  const ConvCode code = MakeCode("5,7");
  const BcjrDecoder bcjr = BcjrDecoder::Create(code).value();
  BcjrDecoder::Workspace ws = bcjr.MakeWorkspace(50);
  for (Bit value : {Bit{0}, Bit{1}}) {
    std::vector<Bit> info(50, value), coded(code.CodedLength(50));
    code.Encode(info, coded);
    std::vector<float> llr(coded.size());
    for (std::size_t i = 0; i < coded.size(); ++i) llr[i] = coded[i] ? -2.0f : 2.0f;
    std::vector<float> out(50);
    bcjr.Decode(llr, out, ws);
    for (float l : out) {
      if (value == 0) {
        EXPECT_GE(l, 5 * 2.0f);
      } else {
        EXPECT_LE(l, -5 * 2.0f);
      }
    }
  }
}

TEST(BcjrDecoder, CreateRejectsTailBiting) {
  ConvCodeSpec spec;
  spec.generators = {05, 07};
  spec.termination = Termination::kTailBiting;
  EXPECT_EQ(BcjrDecoder::Create(ConvCode::Create(spec).value()).status().message(),
            "bcjr: termination = tailbiting: only terminated codes are supported");
}

}  // namespace
}  // namespace capgap
