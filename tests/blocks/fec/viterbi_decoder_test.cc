// Tests of the Viterbi decoder (blocks/fec/viterbi_decoder.h) and its int16
// ACS kernel against the scalar oracle (blocks/kernels/viterbi_reference.h).
#include "blocks/fec/viterbi_decoder.h"

#include <cmath>
#include <cstdint>
#include <cstring>
#include <random>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/fec/distance_spectrum.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/viterbi_kernels.h"
#include "blocks/kernels/viterbi_reference.h"
#include "gtest/gtest.h"

namespace capgap {
namespace {

ConvCode MakeCode(const char* gens, const char* pattern = "",
                  Termination term = Termination::kTerminated) {
  ConvCodeSpec spec;
  spec.generators = ParseGenerators(gens).value();
  if (pattern[0] != '\0') spec.puncture = ParsePuncturePattern(pattern).value();
  spec.termination = term;
  return ConvCode::Create(spec).value();
}

ViterbiDecoder MakeDecoder(const ConvCode& code, ViterbiMetric metric, int traceback = -1) {
  ViterbiOptions o;
  o.metric = metric;
  o.traceback_length = traceback;
  Result<ViterbiDecoder> r = ViterbiDecoder::Create(code, o);
  EXPECT_TRUE(r.ok()) << r.status().message();
  return std::move(r).value();
}

std::vector<Bit> RandomBits(std::size_t n, std::mt19937_64& rng) {
  std::vector<Bit> b(n);
  for (auto& x : b) x = static_cast<Bit>(rng() & 1u);
  return b;
}

// BPSK (0 -> +1) over AWGN at Eb/N0 (R = effective rate), LLR = 4 y / N0.
std::vector<float> NoisyLlrs(const std::vector<Bit>& coded, double ebno_db, double rate,
                             RngStream& stream) {
  const double n0 = 1.0 / (rate * std::pow(10.0, ebno_db / 10.0));
  std::vector<float> y(coded.size());
  for (std::size_t i = 0; i < coded.size(); ++i) y[i] = coded[i] ? -1.0f : 1.0f;
  AddRealNoise(y, static_cast<float>(std::sqrt(n0 / 2.0)), stream);
  for (auto& v : y) v = static_cast<float>(4.0 * v / n0);
  return y;
}

// K = 3 (5,7), d_free = 5 (Proakis & Salehi 5th ed. ch. 8; from memory):
// ML decoding of a terminated frame corrects every pattern of up to
// floor((5 - 1) / 2) = 2 errors. Exhaustive: all 2^6 info words of 6 bits,
// all 1 + 16 + 120 patterns of <= 2 errors in the 16 coded bits, hard and
// soft (+-1 LLRs), int16 and float metrics, whole-frame and default traceback.
TEST(ViterbiDecoder, K3CorrectsEveryPatternOfUpToTwoErrors) {
  const ConvCode code = MakeCode("5,7");
  const std::size_t len = 6;
  const std::size_t nc = code.CodedLength(len);
  ASSERT_EQ(nc, 16u);
  for (ViterbiMetric metric : {ViterbiMetric::kInt16, ViterbiMetric::kFloat}) {
    for (int tb : {0, -1}) {
      const ViterbiDecoder dec = MakeDecoder(code, metric, tb);
      ViterbiDecoder::Workspace ws = dec.MakeWorkspace(len);
      std::vector<Bit> coded(nc), rx(nc), out(len);
      std::vector<float> llr(nc);
      int failures = 0, cases = 0;
      for (unsigned word = 0; word < 64; ++word) {
        std::vector<Bit> info(len);
        for (std::size_t i = 0; i < len; ++i) info[i] = static_cast<Bit>((word >> i) & 1u);
        code.Encode(info, coded);
        for (std::size_t e1 = 0; e1 <= nc; ++e1) {
          for (std::size_t e2 = e1; e2 <= nc; ++e2) {
            if (e2 == e1 && e1 != nc) continue;  // e1 == e2 == nc: no error
            rx = coded;
            if (e1 < nc) rx[e1] ^= 1;
            if (e2 < nc && e2 != e1) rx[e2] ^= 1;
            dec.DecodeHard(rx, out, ws);
            failures += out != info;
            for (std::size_t i = 0; i < nc; ++i) llr[i] = rx[i] ? -1.0f : 1.0f;
            dec.Decode(llr, out, ws);
            failures += out != info;
            ++cases;
          }
        }
      }
      EXPECT_EQ(cases, 64 * (1 + 16 + 120));
      EXPECT_EQ(failures, 0);
    }
  }
}

// K = 7 (133,171), d_free = 10: every pattern of up to 4 errors is corrected.
// Random sample: 3000 frames of 200 info bits, each with 4 errors at random
// distinct positions (fixed seed), int16 and float metrics, default
// traceback (35 steps) and whole frame.
TEST(ViterbiDecoder, K7CorrectsRandomPatternsOfFourErrors) {
  const ConvCode code = MakeCode("133,171");
  const std::size_t len = 200;
  const std::size_t nc = code.CodedLength(len);
  std::mt19937_64 rng(7);
  for (ViterbiMetric metric : {ViterbiMetric::kInt16, ViterbiMetric::kFloat}) {
    for (int tb : {0, -1}) {
      const ViterbiDecoder dec = MakeDecoder(code, metric, tb);
      ViterbiDecoder::Workspace ws = dec.MakeWorkspace(len);
      std::vector<Bit> coded(nc), out(len);
      int failures = 0;
      for (int f = 0; f < 750; ++f) {
        const std::vector<Bit> info = RandomBits(len, rng);
        code.Encode(info, coded);
        std::vector<std::size_t> pos;
        while (pos.size() < 4) {
          const std::size_t p = rng() % nc;
          if (std::find(pos.begin(), pos.end(), p) == pos.end()) pos.push_back(p);
        }
        for (std::size_t p : pos) coded[p] ^= 1;
        dec.DecodeHard(coded, out, ws);
        failures += out != info;
      }
      EXPECT_EQ(failures, 0) << "metric " << static_cast<int>(metric) << " tb " << tb;
    }
  }
}

// Noiseless round trips through every configuration: K = 3..9, n = 2..4,
// punctured, tail-biting.
TEST(ViterbiDecoder, NoiselessRoundTripForEveryConfiguration) {
  struct Case {
    const char* gens;
    const char* pattern;
    Termination term;
  };
  const Case cases[] = {
      {"5,7", "", Termination::kTerminated},
      {"15,17", "", Termination::kTerminated},
      {"23,35", "", Termination::kTailBiting},
      {"53,75", "", Termination::kTerminated},
      {"133,171", "", Termination::kTailBiting},
      {"133,171", "110,101", Termination::kTerminated},
      {"133,171", "11,10", Termination::kTailBiting},
      {"247,371", "", Termination::kTerminated},
      {"561,753", "", Termination::kTerminated},
      {"561,753", "", Termination::kTailBiting},
      {"133,145,175", "", Termination::kTerminated},
      {"135,135,147,163", "", Termination::kTailBiting},
      {"557,663,711", "", Termination::kTailBiting},
  };
  std::mt19937_64 rng(11);
  for (const Case& c : cases) {
    const ConvCode code = MakeCode(c.gens, c.pattern, c.term);
    for (ViterbiMetric metric : {ViterbiMetric::kInt16, ViterbiMetric::kFloat}) {
      const ViterbiDecoder dec = MakeDecoder(code, metric);
      ViterbiDecoder::Workspace ws = dec.MakeWorkspace(500);
      for (std::size_t len : {8u, 9u, 64u, 333u, 500u}) {
        const std::vector<Bit> info = RandomBits(len, rng);
        std::vector<Bit> coded(code.CodedLength(len)), out(len, 7);
        code.Encode(info, coded);
        std::vector<float> llr(coded.size());
        for (std::size_t i = 0; i < coded.size(); ++i) llr[i] = coded[i] ? -2.5f : 2.5f;
        dec.Decode(llr, out, ws);
        EXPECT_EQ(out, info) << c.gens << " " << c.pattern << " len " << len;
        std::fill(out.begin(), out.end(), 7);
        dec.DecodeHard(coded, out, ws);
        EXPECT_EQ(out, info) << c.gens << " hard len " << len;
      }
    }
  }
}

// The dispatched int16 ACS equals the scalar oracle bit for bit (metrics and
// decision bytes) for every K and n, on random LLRs of full range, over
// awkward step counts, and from unequal start metrics.
TEST(ViterbiKernels, DispatchedAcsMatchesScalarOracle) {
  std::mt19937_64 rng(3);
  for (int k = 3; k <= 9; ++k) {
    for (int n = 2; n <= 4; ++n) {
      const std::size_t s = std::size_t{1} << (k - 1), h = s / 2;
      const std::size_t row = std::max<std::size_t>(1, s / 8);
      std::vector<std::int16_t> signs(4 * static_cast<std::size_t>(n) * h);
      for (auto& v : signs) v = (rng() & 1u) ? 1 : -1;
      ViterbiAcsArgs args{k, n, signs.data()};
      for (std::size_t steps : {1u, 3u, 7u, 63u, 64u, 65u, 1001u}) {
        std::vector<std::int16_t> q(steps * static_cast<std::size_t>(n));
        for (auto& v : q) v = static_cast<std::int16_t>(static_cast<int>(rng() % 255) - 127);
        std::vector<std::int16_t> m1(s), m2(s);
        for (std::size_t i = 0; i < s; ++i) {
          m1[i] = m2[i] = i == 0 ? 0 : static_cast<std::int16_t>(rng() % 2 ? kViterbiStartPenalty
                                                                              : -static_cast<int>(rng() % 3000));
        }
        std::vector<std::uint8_t> d1(steps * row, 0xAA), d2(steps * row, 0x55);
        ViterbiAcsInt16(args, m1.data(), q.data(), steps, d1.data());
        reference::ViterbiAcsInt16(args, m2.data(), q.data(), steps, d2.data());
        EXPECT_EQ(m1, m2) << "K=" << k << " n=" << n << " steps=" << steps;
        EXPECT_EQ(d1, d2) << "K=" << k << " n=" << n << " steps=" << steps;
      }
    }
  }
}

// The dispatched LLR quantiser equals its scalar reference exactly on
// awkward lengths, misaligned starts and out-of-range values.
TEST(ViterbiKernels, DispatchedQuantiserMatchesReference) {
  std::mt19937_64 rng(4);
  std::vector<float> x(1100);
  for (auto& v : x) v = static_cast<float>(static_cast<double>(rng() % 200001) / 1000.0 - 100.0);
  x[5] = 0.5f / 3.0f;  // exact half after scaling by 3: rounds away from zero
  x[6] = -0.5f / 3.0f;
  for (std::size_t n : {1u, 3u, 7u, 15u, 16u, 17u, 1001u}) {
    for (std::size_t off : {0u, 1u, 3u}) {
      std::vector<std::int16_t> a(n, 999), b(n, -999);
      ViterbiQuantise(x.data() + off, n, 3.0f, a.data());
      reference::ViterbiQuantise(x.data() + off, n, 3.0f, b.data());
      EXPECT_EQ(a, b) << "n=" << n << " off=" << off;
      for (std::int16_t v : a) EXPECT_LE(std::abs(static_cast<int>(v)), kViterbiMaxQ);
    }
  }
}

// Vectorised and forced-scalar int16 decoders give identical decisions on
// noisy frames (K = 7 and 9, several lengths, punctured and tail-biting).
TEST(ViterbiDecoder, VectorisedAndScalarDecisionsAreIdentical) {
  struct Case {
    const char* gens;
    const char* pattern;
    Termination term;
  };
  const Case cases[] = {{"133,171", "", Termination::kTerminated},
                        {"133,171", "110,101", Termination::kTerminated},
                        {"561,753", "", Termination::kTailBiting},
                        {"53,75", "", Termination::kTerminated}};
  const PhiloxKey key = DeriveKey(5, "viterbi");
  std::mt19937_64 rng(5);
  std::uint32_t unit = 0;
  for (const Case& c : cases) {
    const ConvCode code = MakeCode(c.gens, c.pattern, c.term);
    const ViterbiDecoder dec = MakeDecoder(code, ViterbiMetric::kInt16);
    ViterbiDecoder::Workspace ws = dec.MakeWorkspace(2000);
    for (std::size_t len : {17u, 100u, 999u, 2000u}) {
      for (int f = 0; f < 20; ++f) {
        const std::vector<Bit> info = RandomBits(len, rng);
        std::vector<Bit> coded(code.CodedLength(len)), a(len), b(len);
        code.Encode(info, coded);
        RngStream stream(key, 0, unit++, Substream::kNoise);
        const std::vector<float> llr = NoisyLlrs(coded, 2.0, code.EffectiveRate(len), stream);
        dec.Decode(llr, a, ws);
        const bool prev = ForceScalarKernels(true);
        dec.Decode(llr, b, ws);
        ForceScalarKernels(prev);
        ASSERT_EQ(a, b) << c.gens << " " << c.pattern << " len " << len << " frame " << f;
      }
    }
  }
  std::printf("ACS target for K=7: %s\n", ViterbiKernelTarget(7));
}

// int16 quantisation (mean |q| = 16) against the float reference: not
// bit-identical in general (rounding moves near-ties), so the check is on
// errors: 400 frames of 1000 bits at Eb/N0 = 3 dB (4e5 bits; measured BER
// ~ 4.5e-4, ~180 errors), int16 errors within 10 % + 20 of the float errors (engineering
// tolerance: 8-bit quantisation costs well under 0.1 dB).
TEST(ViterbiDecoder, Int16QuantisationLosesNegligiblyAgainstFloat) {
  const ConvCode code = MakeCode("133,171");
  const ViterbiDecoder di = MakeDecoder(code, ViterbiMetric::kInt16);
  const ViterbiDecoder df = MakeDecoder(code, ViterbiMetric::kFloat);
  ViterbiDecoder::Workspace wi = di.MakeWorkspace(1000), wf = df.MakeWorkspace(1000);
  const PhiloxKey key = DeriveKey(9, "quant");
  std::mt19937_64 rng(9);
  long ei = 0, ef = 0;
  for (std::uint32_t f = 0; f < 400; ++f) {
    const std::vector<Bit> info = RandomBits(1000, rng);
    std::vector<Bit> coded(code.CodedLength(1000)), a(1000), b(1000);
    code.Encode(info, coded);
    RngStream stream(key, 0, f, Substream::kNoise);
    const std::vector<float> llr = NoisyLlrs(coded, 3.0, code.EffectiveRate(1000), stream);
    di.Decode(llr, a, wi);
    df.Decode(llr, b, wf);
    for (std::size_t i = 0; i < 1000; ++i) {
      ei += a[i] != info[i];
      ef += b[i] != info[i];
    }
  }
  std::printf("errors at 3 dB: int16 %ld float %ld\n", ei, ef);
  EXPECT_GT(ef, 100);
  EXPECT_LE(ei, ef + ef / 10 + 20);
}

// Tail-biting round trip under light noise, and the tail-biting decoder
// against the terminated one on the same information (both near error-free
// at 5 dB).
TEST(ViterbiDecoder, TailBitingRoundTripUnderNoise) {
  const ConvCode code = MakeCode("133,171", "", Termination::kTailBiting);
  const ViterbiDecoder dec = MakeDecoder(code, ViterbiMetric::kInt16);
  ViterbiDecoder::Workspace ws = dec.MakeWorkspace(120);
  const PhiloxKey key = DeriveKey(13, "tb");
  std::mt19937_64 rng(13);
  int frame_errors = 0;
  for (std::uint32_t f = 0; f < 300; ++f) {
    const std::vector<Bit> info = RandomBits(120, rng);
    std::vector<Bit> coded(code.CodedLength(120)), out(120);
    code.Encode(info, coded);
    RngStream stream(key, 0, f, Substream::kNoise);
    const std::vector<float> llr = NoisyLlrs(coded, 6.0, 0.5, stream);
    dec.Decode(llr, out, ws);
    frame_errors += out != info;
  }
  // At 6 dB the K = 7 FER of a 120-bit frame is ~ 120 x 1e-7-ish events:
  // essentially 0; allow 2 of 300 frames.
  EXPECT_LE(frame_errors, 2);
}

TEST(ViterbiDecoder, CreateRejectsBadOptions) {
  const ConvCode code = MakeCode("133,171");
  ViterbiOptions o;
  o.traceback_length = 3;
  EXPECT_EQ(ViterbiDecoder::Create(code, o).status().message(),
            "viterbi: traceback_length = 3: must be >= K = 7");
  o.traceback_length = -2;
  EXPECT_EQ(ViterbiDecoder::Create(code, o).status().message(),
            "viterbi: traceback_length = -2: must be -1 (default), 0 (whole frame) or in [1, "
            "2^20]");
  EXPECT_EQ(MakeDecoder(code, ViterbiMetric::kInt16).traceback_length(), 35);
  EXPECT_EQ(MakeDecoder(MakeCode("133,171", "110,101"), ViterbiMetric::kInt16).traceback_length(),
            70);
}

// Soft Viterbi BER over BPSK-AWGN at Eb/N0 = 4 dB (R = 1/2, tail charged to
// Eb through the effective rate 1000/2012) against the soft-decision union
// bound of the first ten spectrum terms (distance_spectrum.h), with the same
// effective rate. Sample: 3000 frames of 1000 bits = 3e6 bits, fixed seed;
// the bound is ~2e-5 here, so ~60 errors expected at the bound. Bit errors
// come in bursts (an error event flips ~ beta/a ~ 3 bits), so the binomial
// sigma is inflated by sqrt(4) (burst length, conservative): the test checks
// BER <= bound + 4 sigma_burst.
TEST(ViterbiDecoder, SoftBerAt4dBIsBelowUnionBound) {
  const ConvCode code = MakeCode("133,171");
  const ViterbiDecoder dec = MakeDecoder(code, ViterbiMetric::kInt16);
  ViterbiDecoder::Workspace ws = dec.MakeWorkspace(1000);
  const double rate = code.EffectiveRate(1000);
  const DistanceSpectrum spec = ComputeDistanceSpectrum(code).value();
  const double bound = UnionBoundBer(spec, 4.0, rate);
  const PhiloxKey key = DeriveKey(17, "ber");
  std::mt19937_64 rng(17);
  long errors = 0;
  const long frames = 3000;
  for (long f = 0; f < frames; ++f) {
    const std::vector<Bit> info = RandomBits(1000, rng);
    std::vector<Bit> coded(code.CodedLength(1000)), out(1000);
    code.Encode(info, coded);
    RngStream stream(key, 0, static_cast<std::uint32_t>(f), Substream::kNoise);
    const std::vector<float> llr = NoisyLlrs(coded, 4.0, rate, stream);
    dec.Decode(llr, out, ws);
    for (std::size_t i = 0; i < 1000; ++i) errors += out[i] != info[i];
  }
  const double bits = static_cast<double>(frames) * 1000.0;
  const double ber = static_cast<double>(errors) / bits;
  const double sigma = std::sqrt(4.0 * bound / bits);
  std::printf("4 dB: BER %.3e (%ld errors), union bound %.3e\n", ber, errors, bound);
  EXPECT_LE(ber, bound + 4.0 * sigma);
  EXPECT_GT(errors, 0);
}

}  // namespace
}  // namespace capgap
