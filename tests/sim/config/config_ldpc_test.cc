// LDPC keys of a scheme: defaults, the construction- and decoder-dependent
// keys, the shared `decoder` key, and exact messages for bad values.
#include <gtest/gtest.h>

#include "sim/chain/registry.h"
#include "tests/sim/config/later_families.h"

#include "sim/config/config.h"

namespace capgap {
namespace {

std::string Scheme(const std::string& extra) {
  return "[sweep]\nebno_db = 0 to 2 by 1\n\n[scheme.a]\nmodulation = qpsk\ncode = ldpc\n" + extra;
}

std::string ErrorOf(const std::string& text) {
  auto r = ParseRunConfig(text, "dir/test.ini", {});
  return r.ok() ? "OK" : r.status().message();
}

TEST(ConfigLdpc, DefaultsArePegRateHalfLayeredNormalisedMinSum) {
  auto r = ParseRunConfig(Scheme(""), "dir/test.ini", {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  const LdpcSchemeConfig& c = r.value().schemes[0].ldpc;
  EXPECT_EQ(c.construction, LdpcConstructionKind::kPeg);
  EXPECT_EQ(c.length, 2016);
  EXPECT_DOUBLE_EQ(c.rate, 0.5);
  EXPECT_EQ(c.degrees, "3");
  EXPECT_EQ(c.decoder, LdpcAlgorithm::kMinSumNormalized);
  EXPECT_EQ(c.schedule, LdpcSchedule::kLayered);
  EXPECT_EQ(c.max_iterations, 50);
  EXPECT_DOUBLE_EQ(c.normalization, 0.75);
  EXPECT_EQ(c.config_dir, "dir");
  EXPECT_EQ(c.ResolvePath("codes/x.txt"), "dir/codes/x.txt");
  EXPECT_EQ(c.ResolvePath("/abs/x.txt"), "/abs/x.txt");
  // The resolved text lists the LDPC keys that apply and no conv or qc key.
  const std::string text = r.value().ResolvedText();
  EXPECT_NE(text.find("\nnormalization = 0.75"), std::string::npos);
  EXPECT_EQ(text.find("\noffset ="), std::string::npos);
  EXPECT_EQ(text.find("generators"), std::string::npos);
  EXPECT_EQ(text.find("base_matrix"), std::string::npos);
  EXPECT_EQ(text.find("frame_bits"), std::string::npos);
  // Automatic work units: a multiple of 64 codewords.
  EXPECT_EQ(r.value().schemes[0].ResolvedUnitFrames() % 64, 0u);
}

TEST(ConfigLdpc, QcConstructionTakesBaseMatrixAndLifting) {
  auto r = ParseRunConfig(Scheme("construction = qc\nbase_matrix = codes/b.txt\nlifting = 84\n"),
                          "dir/test.ini", {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().schemes[0].ldpc.base_matrix, "codes/b.txt");
  EXPECT_EQ(r.value().schemes[0].ldpc.lifting, 84);
  EXPECT_EQ(ErrorOf(Scheme("construction = qc\n")),
            "dir/test.ini: missing required key 'scheme.a.base_matrix' (path of a base-matrix "
            "file (relative to the config file), e.g. codes/qc_r1-2_24x12.txt)");
}

TEST(ConfigLdpc, KeysOfAnotherConstructionOrDecoderAreRefused) {
  EXPECT_EQ(ErrorOf(Scheme("construction = qc\nbase_matrix = b.txt\nlength = 1000\n")),
            "dir/test.ini: scheme.a.length applies only with construction = peg (this scheme has "
            "construction = qc)");
  EXPECT_EQ(ErrorOf(Scheme("offset = 0.3\n")),
            "dir/test.ini: scheme.a.offset applies only with decoder = min_sum_offset (this "
            "scheme has decoder = min_sum_normalized)");
  EXPECT_EQ(ErrorOf(Scheme("frame_bits = 1000\n")),
            "dir/test.ini: scheme.a.frame_bits does not apply with code = ldpc (a frame is one "
            "codeword; the code sets its information bits)");
  EXPECT_EQ(ErrorOf(Scheme("generators = 5,7\n")),
            "dir/test.ini: scheme.a.generators applies only with code = conv (this scheme has "
            "code = ldpc)");
}

TEST(ConfigLdpc, DecoderWordsDependOnTheCode) {
  EXPECT_EQ(ErrorOf(Scheme("decoder = viterbi_soft\n")),
            "dir/test.ini: scheme.a.decoder = 'viterbi_soft': valid with code = ldpc: sum_product, "
            "min_sum_normalized, min_sum_offset");
  EXPECT_EQ(ErrorOf(Scheme("decoder = sum_product\nschedule = flooding\n")), "OK");
  EXPECT_EQ(ErrorOf(Scheme("decoder = min_sum_offset\noffset = 0.25\n")), "OK");
  // A conv scheme keeps its own decoder words.
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\n[scheme.c]\nmodulation = bpsk\ncode = conv\n"
                    "decoder = sum_product\n"),
            "dir/test.ini: scheme.c.decoder = 'sum_product': valid: viterbi_soft, viterbi_hard, bcjr");
}

TEST(ConfigLdpc, BadValuesNameKeyValueAndRule) {
  EXPECT_EQ(ErrorOf(Scheme("rate = 1\n")), "dir/test.ini: scheme.a.rate = '1': must be in (0, 1)");
  EXPECT_EQ(ErrorOf(Scheme("length = 2017\n")),
            "dir/test.ini: scheme.a.length = '2017': must be a multiple of 2 (bits per symbol of "
            "qpsk)");
  EXPECT_EQ(ErrorOf(Scheme("schedule = serial\n")),
            "dir/test.ini: scheme.a.schedule = 'serial': valid: flooding, layered");
  EXPECT_EQ(ErrorOf(Scheme("max_iterations = 0\n")),
            "dir/test.ini: scheme.a.max_iterations = '0': must be an integer in [1, 1000]");
  EXPECT_EQ(ErrorOf(Scheme("normalization = 1.5\n")),
            "dir/test.ini: scheme.a.normalization = '1.5': must be in (0, 1]");
  EXPECT_EQ(ErrorOf(Scheme("decoder = sum_product\narithmetic = int8\n")),
            "dir/test.ini: scheme.a.arithmetic = 'int8': sum_product runs in float only (valid "
            "with it: auto, float)");
  EXPECT_EQ(ErrorOf(Scheme("arithmetic = int16\n")), "OK");
  EXPECT_EQ(ErrorOf(Scheme("construction = random\n")),
            "dir/test.ini: scheme.a.construction = 'random': valid: peg, qc, file");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\n[scheme.a]\nmodulation = qpsk\ncode = fountain\n"),
            "dir/test.ini: scheme.a.code = 'fountain': valid: none, conv, ldpc" + LaterCodeWords());
}

// stop_frame_errors and target_fer: sweep keys with per-scheme overrides;
// at least one error target per scheme.
TEST(ConfigLdpc, FrameTargetsHaveSchemeOverridesAndOneErrorTargetIsRequired) {
  const std::string text =
      "[sweep]\nebno_db = 0 to 10 by 2\nstop_frame_errors = 50\ntarget_fer = 1e-3\n"
      "[scheme.u]\nmodulation = qpsk\n"
      "[scheme.c]\nmodulation = qpsk\ncode = ldpc\nstop_frame_errors = 200\ntarget_fer = 1e-2\n";
  auto r = ParseRunConfig(text, "t.ini", {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().SweepFor(0).stop_frame_errors, 50u);
  EXPECT_EQ(r.value().SweepFor(0).target_fer, 1e-3);
  EXPECT_EQ(r.value().SweepFor(1).stop_frame_errors, 200u);
  EXPECT_EQ(r.value().SweepFor(1).target_fer, 1e-2);
  EXPECT_EQ(r.value().SweepFor(1).stop_bit_errors, 116u);  // default kept
  // Defaults: no frame target, target_fer 1e-4.
  auto d = ParseRunConfig("[sweep]\nebno_db = 0\n[scheme.a]\nmodulation = qpsk\n", "t.ini", {});
  ASSERT_TRUE(d.ok());
  EXPECT_EQ(d.value().SweepFor(0).stop_frame_errors, 0u);
  EXPECT_EQ(d.value().SweepFor(0).target_fer, 1e-4);
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\nstop_bit_errors = 0\n[scheme.a]\nmodulation = qpsk\n"),
            "dir/test.ini: sweep.stop_bit_errors = '0' and no stop_frame_errors for scheme a: a "
            "point needs an error target (set sweep.stop_bit_errors >= 1 or stop_frame_errors in "
            "[sweep] or [scheme.a])");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\nstop_bit_errors = 0\n[scheme.a]\nmodulation = qpsk\n"
                    "stop_frame_errors = 10\n"),
            "OK");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\nstop_frame_errors = 0\n[scheme.a]\nmodulation = qpsk\n"),
            "dir/test.ini: sweep.stop_frame_errors = '0': must be an integer > 0");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\n[scheme.a]\nmodulation = qpsk\ntarget_fer = 1\n"),
            "dir/test.ini: scheme.a.target_fer = '1': must be in (0, 1)");
}

// A scheme may sweep its own Eb/N0 points (an LDPC waterfall needs a finer
// grid than an uncoded curve in the same run); without the key it uses the
// sweep's, and the resolved text does not list it.
TEST(ConfigLdpc, SchemeMaySweepItsOwnPoints) {
  const std::string text =
      "[sweep]\nebno_db = 0 to 10 by 2\n[scheme.u]\nmodulation = qpsk\n"
      "[scheme.c]\nmodulation = qpsk\ncode = ldpc\nebno_db = 1 to 2 by 0.25\n";
  auto r = ParseRunConfig(text, "t.ini", {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().schemes[0].ebno_db, (std::vector<double>{0, 2, 4, 6, 8, 10}));
  EXPECT_EQ(r.value().schemes[1].ebno_db, (std::vector<double>{1, 1.25, 1.5, 1.75, 2}));
  EXPECT_EQ(r.value().SweepFor(1).ebno_db, r.value().schemes[1].ebno_db);
  EXPECT_EQ(r.value().SweepFor(1).stop_bit_errors, r.value().sweep.stop_bit_errors);
  const std::string resolved = r.value().ResolvedText();
  EXPECT_EQ(resolved.find("[scheme.u]\nmodulation = qpsk\nebno_db"), std::string::npos);
  EXPECT_NE(resolved.find("ebno_db = 1 to 2 by 0.25"), std::string::npos);
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 0\n[scheme.a]\nmodulation = qpsk\nebno_db = 3 to 2 by 1\n"),
            "dir/test.ini: scheme.a.ebno_db = '3 to 2 by 1': TO must be >= FROM");
}

}  // namespace
}  // namespace capgap
