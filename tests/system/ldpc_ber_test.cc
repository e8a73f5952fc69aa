// End-to-end LDPC schemes through the engine: real random codewords (no
// all-zero shortcut), the demapper's LLRs into the decoder, counts and
// iteration statistics bit-identical across thread counts, BER against the
// (3,6) ensemble's threshold and the capacity limits.
//
// References. BP threshold of the regular (3,6) ensemble on the binary-input
// AWGN channel: sigma* = 0.8809, Eb/N0 = 1.10 dB at rate 1/2 (T. Richardson,
// A. Shokrollahi, R. Urbanke, IEEE Trans. Inf. Theory 47(2), 2001). A
// length-2000 (3,6)-like code with sum-product or layered normalised
// min-sum (50 iterations) reaches BER 1e-4 within about 1.2 dB of it, and
// min-sum lies within about 0.3 dB of sum-product (common practice).
// Confidence: each BER bound below is a one-sided 99.9 % Clopper-Pearson
// bound (sample sizes in the comments).
#include <gtest/gtest.h>

#include <filesystem>

#include "analysis/capacity.h"
#include "analysis/uncoded_theory.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "sim/engine/engine.h"
#include "sim/chain/scheme_result.h"

namespace capgap {
namespace {

SchemeConfig Ldpc(const char* modulation, const char* decoder, const char* schedule = "layered") {
  SchemeConfig s;
  s.name = std::string("ldpc_") + modulation + "_" + decoder;
  s.modulation = ParseModulation(modulation).value();
  s.demapper = DemapMethod::kMaxLog;
  s.code = "ldpc";
  s.ldpc.construction = LdpcConstructionKind::kPeg;
  s.ldpc.length = 2016;
  s.ldpc.rate = 0.5;
  s.ldpc.degrees = "3";
  s.ldpc.decoder = ParseLdpcAlgorithm(decoder).value();
  s.ldpc.schedule = ParseLdpcSchedule(schedule).value();
  s.ldpc.max_iterations = 50;
  return s;
}

SweepConfig Sweep(std::uint64_t stop_bit_errors, std::uint64_t stop_bits) {
  SweepConfig sweep;
  sweep.ebno_db = {0};
  sweep.stop_bit_errors = stop_bit_errors;
  sweep.stop_bits = stop_bits;
  sweep.ber_floor = 0;
  sweep.seed = 11;
  return sweep;
}

PointResult RunAt(const Chain& chain, double ebno_db, std::uint64_t stop_bit_errors,
                std::uint64_t stop_bits, int threads = 2) {
  EngineOptions eo;
  eo.threads = threads;
  return RunPoint(chain, Sweep(stop_bit_errors, stop_bits), 0, ebno_db, eo);
}

TEST(LdpcChain, CountsAndIterationStatisticsIdenticalForOneTwoAndThreeThreads) {
  auto chain = Chain::Create(Ldpc("qpsk", "min_sum_normalized"), 11);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  const PointResult one = RunAt(chain.value(), 1.6, 300, 4000000, 1);
  const PointResult two = RunAt(chain.value(), 1.6, 300, 4000000, 2);
  const PointResult three = RunAt(chain.value(), 1.6, 300, 4000000, 3);
  EXPECT_GT(one.counts.bit_errors, 0u);
  EXPECT_GT(one.counts.decoder_iterations, one.counts.frames);  // the decoder worked
  EXPECT_EQ(one.counts, two.counts);
  EXPECT_EQ(one.counts, three.counts);
  EXPECT_LE(one.counts.undetected_frame_errors, one.counts.frame_errors);
  EXPECT_LE(one.counts.max_decoder_iterations, 50u);
}

TEST(LdpcChain, FrameIsOneCodewordOfTheCodesInformationBits) {
  auto chain = Chain::Create(Ldpc("qpsk", "min_sum_normalized"), 11);
  ASSERT_TRUE(chain.ok());
  EXPECT_EQ(chain.value().scheme().frame_bits, 1008u);  // k = n - rank H of the PEG (2016, 1008)
  EXPECT_EQ(chain.value().coded_bits(), 2016u);
  EXPECT_DOUBLE_EQ(chain.value().code_rate(), 0.5);
  EXPECT_EQ(chain.value().unit_frames() % 64, 0u);
}

// Threshold + 1.2 dB = 2.30 dB: BER 1e-4 must be reached (the 99.9 % upper
// bound below it) for sum-product and layered normalised min-sum.
TEST(LdpcChain, SumProductAndLayeredMinSumReach1e4Within1p2DbOfThreshold) {
  for (const char* decoder : {"min_sum_normalized", "sum_product"}) {
    auto chain = Chain::Create(Ldpc("qpsk", decoder), 11);
    ASSERT_TRUE(chain.ok()) << chain.status().message();
    // 2e6 bits (about 2000 codewords): an upper bound of 1e-4 needs fewer
    // than ~170 bit errors.
    const PointResult r = RunAt(chain.value(), 1.10 + 1.2, 1000000, 2000000);
    const Interval ci = ClopperPearson(r.counts.bit_errors, r.counts.bits, 0.998);
    EXPECT_LT(ci.high, 1e-4) << decoder << ": " << r.counts.bit_errors << " errors in "
                             << r.counts.bits << " bits";
  }
}

// Min-sum within 0.3 dB of sum-product: normalised min-sum at x + 0.3 dB does
// at least as well as sum-product at x (x = 1.6 dB, in the waterfall).
// Each side runs to 400 bit errors or 8e6 bits; the test compares the 99.9 %
// bounds (min-sum upper at x + 0.3 below sum-product lower at x).
TEST(LdpcChain, MinSumWithinAThirdOfADbOfSumProduct) {
  auto sp = Chain::Create(Ldpc("qpsk", "sum_product"), 11);
  auto ms = Chain::Create(Ldpc("qpsk", "min_sum_normalized"), 11);
  ASSERT_TRUE(sp.ok() && ms.ok());
  const PointResult a = RunAt(sp.value(), 1.6, 400, 8000000);
  const PointResult b = RunAt(ms.value(), 1.9, 400, 8000000);
  const Interval ca = ClopperPearson(a.counts.bit_errors, a.counts.bits, 0.998);
  const Interval cb = ClopperPearson(b.counts.bit_errors, b.counts.bits, 0.998);
  EXPECT_LT(cb.high, ca.low) << "sum-product BER " << a.ber() << " at 1.6 dB, min-sum " << b.ber()
                             << " at 1.9 dB";
  // And min-sum is not better than sum-product at the same Eb/N0 (BP is the
  // better approximation of the bitwise MAP decoder; common practice).
  const PointResult c = RunAt(ms.value(), 1.6, 400, 8000000);
  const Interval cc = ClopperPearson(c.counts.bit_errors, c.counts.bits, 0.998);
  EXPECT_GT(cc.high, ca.low);
}

// 16-QAM BICM with real codewords: the curve must stay right of the BICM
// capacity limit at rho = 2 (2.27 dB; analysis/capacity.h) — a rate or
// bits-per-symbol slip in the Eb/N0 bookkeeping (3 dB for R = 1 instead of
// 1/2) would push it left of the limit — and fall below 1e-4 by 2.6 dB above
// that limit (a (3,6) code at n = 2016 is about 1.1 dB from its threshold on
// binary channels; BICM adds little at rate 1/2; common practice).
TEST(LdpcChain, SixteenQamBicmSitsRightOfItsCapacityLimit) {
  auto chain = Chain::Create(Ldpc("16qam", "min_sum_normalized"), 11);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  const double limit = analysis::BicmMinEbnoDb(chain.value().mapper().points(), 2.0);
  EXPECT_NEAR(limit, 2.27, 0.01);
  // At the limit itself the frame error rate is near 1: 64 frames suffice.
  const PointResult at_limit = RunAt(chain.value(), limit, 1, 2016 * 64);
  EXPECT_GT(at_limit.fer(), 0.9);
  const PointResult above = RunAt(chain.value(), limit + 2.6, 1000000, 2000000);
  const Interval ci = ClopperPearson(above.counts.bit_errors, above.counts.bits, 0.998);
  EXPECT_LT(ci.high, 1e-4) << above.counts.bit_errors << " errors in " << above.counts.bits;
}

// The results of an LDPC scheme carry the threshold beside the curve: the
// (3,6) BP threshold 1.10 dB (within 0.02 dB, the quantised method's
// tolerance) above the binary-input capacity limit 0.19 dB.
TEST(LdpcChain, ResultsCarryTheThresholdAndTheBinaryInputLimit) {
  auto chain = Chain::Create(Ldpc("qpsk", "min_sum_normalized"), 11);
  ASSERT_TRUE(chain.ok());
  SweepConfig sweep = Sweep(200, 4000000);
  sweep.ebno_db = {1.5, 2.0, 2.5};
  sweep.target_ber = 1e-4;
  EngineOptions eo;
  eo.threads = 2;
  const SchemeResult r = AnalyseScheme(chain.value(), sweep, RunSweep(chain.value(), sweep, eo));
  ASSERT_TRUE(r.code.present);
  ASSERT_NE(r.code.Find("girth"), nullptr);
  EXPECT_GE(std::get<int>(*r.code.Find("girth")), 6);
  EXPECT_NEAR(r.limits.threshold_ebno_db, 1.10, 0.02);
  EXPECT_EQ(r.limits.threshold_method, "quantized");
  EXPECT_NEAR(r.limits.binary_input_ebno_db, 0.19, 0.01);
  ASSERT_TRUE(std::isfinite(r.summary.ebno_at_target_db));
  EXPECT_DOUBLE_EQ(r.summary.gap_to_threshold_db,
                   r.summary.ebno_at_target_db - r.limits.threshold_ebno_db);
  EXPECT_GT(r.summary.gap_to_threshold_db, 0.0);
  EXPECT_LT(r.summary.gap_to_threshold_db, 1.2);
}

// Every modulation (and a shaped chain) carries LDPC codewords: at the Eb/N0
// where the uncoded modulation has BER 1e-3 (analysis/uncoded_theory.h) the
// rate-1/2 code has several dB of margin over its waterfall, so one unit
// (64 codewords) decodes without error (2016 = 2^5 * 63 divides by every
// bits-per-symbol count here).
TEST(LdpcChain, RunsOnEveryModulationAndWithShaping) {
  for (const char* mod : {"bpsk", "qpsk", "8psk", "16qam", "64qam", "256qam"}) {
    for (bool shaped : {false, true}) {
      if (shaped && std::string(mod) != "16qam") continue;
      SchemeConfig s = Ldpc(mod, "min_sum_normalized");
      if (shaped) {
        s.shaping = PulseShape::kRootRaisedCosine;
        s.span = 8;
        s.samples_per_symbol = 4;
      }
      auto chain = Chain::Create(s, 11);
      ASSERT_TRUE(chain.ok()) << mod << ": " << chain.status().message();
      const double ebno = analysis::UncodedEbnoDbAtBer(s.modulation, 1e-3);
      const PointResult r = RunAt(chain.value(), ebno, 1, 1);  // exactly one unit
      EXPECT_EQ(r.counts.frames, chain.value().unit_frames()) << mod;
      EXPECT_EQ(r.counts.bit_errors, 0u) << mod << (shaped ? " shaped" : "") << " at " << ebno << " dB";
    }
  }
}

// construction = file: a code saved in the sparse text format and loaded by
// the chain is the same code, so the counts equal the PEG scheme's exactly.
TEST(LdpcChain, MatrixFileConstructionGivesThePegSchemesCounts) {
  PegSpec spec;
  spec.length = 2016;
  spec.checks = ChecksForRate(2016, 0.5);
  spec.degrees = ParseVariableDegrees("3").value();
  spec.seed = 1;
  auto code = BuildPegCode(spec);
  ASSERT_TRUE(code.ok());
  const std::filesystem::path dir = std::filesystem::temp_directory_path() / "capgap_ldpc_file_test";
  std::filesystem::create_directories(dir);
  ASSERT_TRUE(WriteLdpcMatrixFile((dir / "peg.txt").string(), code.value()).ok());
  SchemeConfig peg = Ldpc("qpsk", "min_sum_normalized");
  SchemeConfig file = peg;
  file.ldpc.construction = LdpcConstructionKind::kFile;
  file.ldpc.matrix_file = "peg.txt";
  file.ldpc.config_dir = dir.string();  // relative paths resolve against the config's directory
  auto a = Chain::Create(peg, 11);
  auto b = Chain::Create(file, 11);
  ASSERT_TRUE(a.ok() && b.ok()) << b.status().message();
  const PointResult ra = RunAt(a.value(), 1.6, 200, 2000000);
  const PointResult rb = RunAt(b.value(), 1.6, 200, 2000000);
  EXPECT_GT(ra.counts.bit_errors, 0u);
  EXPECT_EQ(ra.counts, rb.counts);
  std::filesystem::remove_all(dir);
}

}  // namespace
}  // namespace capgap
