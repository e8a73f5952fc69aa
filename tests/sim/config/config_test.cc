// Config parsing and validation: every error names the file, the key, the
// value and the rule (exact message checks), and defaults resolve.
#include "sim/config/config.h"

#include <boost/math/distributions/beta.hpp>
#include <gtest/gtest.h>

#include "sim/chain/registry.h"
#include "tests/sim/config/later_families.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

constexpr char kGood[] = R"(
[sweep]
ebno_db = 0 to 8 by 2
stop_bit_errors = 200
seed = 7

[scheme.qpsk]
modulation = qpsk
frame_bits = 1000

[scheme.q16]
modulation = 16qam
demapper = logmap
)";

std::string ErrorOf(const std::string& text, const std::vector<std::string>& overrides = {}) {
  auto r = ParseRunConfig(text, "test.ini", overrides);
  return r.ok() ? "OK" : r.status().message();
}

TEST(Config, ParsesSweepAndSchemesInFileOrder) {
  auto r = ParseRunConfig(kGood, "test.ini", {});
  ASSERT_TRUE(r.ok()) << r.status().message();
  const RunConfig& c = r.value();
  EXPECT_EQ(c.sweep.ebno_db, (std::vector<double>{0, 2, 4, 6, 8}));
  EXPECT_EQ(c.sweep.stop_bit_errors, 200u);
  EXPECT_EQ(c.sweep.seed, 7u);
  EXPECT_EQ(c.sweep.stop_bits, 30000000u);  // default
  ASSERT_EQ(c.schemes.size(), 2u);
  EXPECT_EQ(c.schemes[0].name, "qpsk");
  EXPECT_EQ(c.schemes[0].frame_bits, 1000u);
  EXPECT_EQ(c.schemes[1].name, "q16");
  EXPECT_EQ(c.schemes[1].demapper, DemapMethod::kLogMap);
  EXPECT_EQ(c.schemes[1].frame_bits, 1920u);  // default
}

TEST(Config, OverridesApplyBeforeValidation) {
  auto r = ParseRunConfig(kGood, "test.ini",
                          {"sweep.stop_bit_errors=50", "scheme.q16.frame_bits=400"});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().sweep.stop_bit_errors, 50u);
  EXPECT_EQ(r.value().schemes[1].frame_bits, 400u);
}

TEST(Config, ResolvedTextRoundTrips) {
  auto r = ParseRunConfig(kGood, "test.ini", {"sweep.seed=9"});
  ASSERT_TRUE(r.ok());
  const std::string text = r.value().ResolvedText();
  auto again = ParseRunConfig(text, "resolved", {});
  ASSERT_TRUE(again.ok()) << again.status().message();
  EXPECT_EQ(again.value().ResolvedText(), text);
  EXPECT_EQ(again.value().sweep.seed, 9u);
}

TEST(Config, BadValuesNameFileKeyValueAndRule) {
  EXPECT_EQ(ErrorOf(kGood, {"sweep.stop_bit_errors=-3"}),
            "test.ini: sweep.stop_bit_errors = '-3': must be an integer >= 0 (0: no bit-error target)");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.stop_bit_errors=abc"}),
            "test.ini: sweep.stop_bit_errors = 'abc': not an integer; must be an integer >= 0 (0: no bit-error target)");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.ebno_db=0 to 4 by 0"}),
            "test.ini: sweep.ebno_db = '0 to 4 by 0': STEP must be > 0");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.ebno_db=0 to 4"}),
            "test.ini: sweep.ebno_db = '0 to 4': expected FROM to TO by STEP (numbers, in dB, "
            "e.g. '0 to 12 by 0.5') or a comma list");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.frame_bits=999"}),
            "test.ini: scheme.qpsk.frame_bits = '999': must be a multiple of 2 (bits per symbol "
            "of qpsk)");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.demapper=soft"}),
            "test.ini: scheme.qpsk.demapper = 'soft': " + ParseDemapMethod("soft").status().message());
  EXPECT_EQ(ErrorOf(kGood, {"sweep.target_ber=0.7"}),
            "test.ini: sweep.target_ber = '0.7': must be in (0, 0.5)");
}

TEST(Config, UnknownModulationListsValidWords) {
  const std::string msg = ErrorOf(kGood, {"scheme.qpsk.modulation=qpsq"});
  EXPECT_EQ(msg.rfind("test.ini: scheme.qpsk.modulation = 'qpsq': ", 0), 0u) << msg;
  EXPECT_NE(msg.find("16qam"), std::string::npos) << msg;
}

TEST(Config, UnknownKeysAndSectionsAreRejected) {
  EXPECT_EQ(ErrorOf(std::string(kGood) + "\n[scheme.qpsk]\nroll_off = 0.3\n"),
            "test.ini: unknown key 'scheme.qpsk.roll_off' (did you mean 'rolloff'?); 'capgap run "
            "--help' lists the [scheme.NAME] keys");
  EXPECT_EQ(ErrorOf(std::string(kGood) + "\n[scheme.qpsk]\nframe_bitz = 8\n"),
            "test.ini: unknown key 'scheme.qpsk.frame_bitz' (did you mean 'frame_bits'?); "
            "'capgap run --help' lists the [scheme.NAME] keys");
  EXPECT_EQ(ErrorOf(std::string(kGood) + "\n[channel]\nx = 1\n"),
            "test.ini: unknown section [channel]; sections: [sweep], [scheme.NAME]");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.bpsk.frame_bits=100"}),
            "--set scheme.bpsk.frame_bits: no scheme 'bpsk' in test.ini; schemes: qpsk, q16");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.targets=100"}),
            "test.ini: unknown key '--set sweep.targets'; 'capgap run --help' lists the [sweep] "
            "keys");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.seed"}),
            "--set 'sweep.seed': expected KEY=VALUE, e.g. sweep.stop_bit_errors=500");
}

TEST(Config, MissingRequiredKeysAreNamed) {
  EXPECT_EQ(ErrorOf("[scheme.a]\nmodulation = bpsk\n"),
            "test.ini: missing required key 'sweep.ebno_db' (FROM to TO by STEP (inclusive) or a "
            "comma list, in dB)");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\n"),
            "test.ini: no [scheme.NAME] section; at least one scheme is required");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\n[scheme.a]\nframe_bits = 8\n"),
            "test.ini: missing required key 'scheme.a.modulation' (bpsk, qpsk, 8psk, 16qam, "
            "64qam, 256qam, <M>psk, <M>qam, 16apsk)");
}

TEST(Config, CodeKeysApplyOnlyToTheirCode) {
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.generators=5,7"}),
            "test.ini: scheme.qpsk.generators applies only with code = conv (this scheme has "
            "code = none)");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.code=fountain"}),
            "test.ini: scheme.qpsk.code = 'fountain': valid: none, conv, ldpc" + LaterCodeWords());
  auto r = ParseRunConfig(kGood, "test.ini",
                          {"scheme.qpsk.code=conv", "scheme.qpsk.generators=5,7",
                           "scheme.qpsk.constraint_length=3"});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().schemes[0].conv.generators, "5,7");
  EXPECT_EQ(r.value().schemes[0].conv.constraint_length, 3);
  EXPECT_EQ(r.value().schemes[0].conv.decoder, ConvDecoderKind::kViterbiSoft);  // default
  // Uncoded schemes carry no code keys in the resolved text.
  int q16_code_keys = 0, qpsk_code_keys = 0;
  for (const auto& [key, value] : r.value().resolved) {
    q16_code_keys += key == "scheme.q16.generators" || key == "scheme.q16.decoder";
    qpsk_code_keys += key == "scheme.qpsk.generators" || key == "scheme.qpsk.decoder";
  }
  EXPECT_EQ(q16_code_keys, 0);
  EXPECT_EQ(qpsk_code_keys, 2);
  EXPECT_NE(r.value().ResolvedText().find("generators = 5,7"), std::string::npos);
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.code=conv", "scheme.qpsk.constraint_length=12"}),
            "test.ini: scheme.qpsk.constraint_length = '12': must be an integer in [3, 9]");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.code=conv", "scheme.qpsk.decoder=fano"}),
            "test.ini: scheme.qpsk.decoder = 'fano': valid: viterbi_soft, viterbi_hard, bcjr");
}

TEST(Config, ShapingKeysApplyOnlyToShapedSchemes) {
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.rolloff=0.2"}),
            "test.ini: scheme.qpsk.rolloff applies only with shaping = rc or rrc (this scheme "
            "has shaping = none)");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.shaping=rrc", "scheme.qpsk.rolloff=1.5"}),
            "test.ini: scheme.qpsk.rolloff = '1.5': must be in (0, 1]");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.shaping=rrc", "scheme.qpsk.samples_per_symbol=1"}),
            "test.ini: scheme.qpsk.samples_per_symbol = '1': must be an integer in [2, 64]");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.shaping=gauss"}),
            "test.ini: scheme.qpsk.shaping = 'gauss': valid: none, rc, rrc");
  EXPECT_EQ(ErrorOf(kGood, {"scheme.qpsk.frequency_offset=0.7"}),
            "test.ini: scheme.qpsk.frequency_offset = '0.7': must be in [-0.5, 0.5] cycles per "
            "symbol");
  auto r = ParseRunConfig(kGood, "test.ini", {"scheme.qpsk.shaping=rrc", "scheme.qpsk.span=10"});
  ASSERT_TRUE(r.ok()) << r.status().message();
  EXPECT_EQ(r.value().schemes[0].shaping, PulseShape::kRootRaisedCosine);
  EXPECT_EQ(r.value().schemes[0].span, 10);
  EXPECT_EQ(r.value().schemes[0].samples_per_symbol, 8);  // default
  EXPECT_DOUBLE_EQ(r.value().schemes[0].rolloff, 0.35);    // default
}

TEST(Config, DuplicateKeysAreRejected) {
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\nebno_db = 2\n[scheme.a]\nmodulation = bpsk\n"),
            "test.ini: key 'sweep.ebno_db' given twice");
}

TEST(ParseDbList, AcceptsInclusiveRangesAndLists) {
  auto r = ParseDbList("0 to 0.3 by 0.1", "x");
  ASSERT_TRUE(r.ok());
  EXPECT_EQ(r.value(), (std::vector<double>{0, 0.1, 0.2, 0.3}));
  auto l = ParseDbList(" 1, 2.5 ,4", "x");
  ASSERT_TRUE(l.ok());
  EXPECT_EQ(l.value(), (std::vector<double>{1, 2.5, 4}));
  EXPECT_EQ(ParseDbList("3,2", "x").status().message(), "x = '3,2': points must increase");
  EXPECT_EQ(ParseDbList("4 to 2 by 1", "x").status().message(), "x = '4 to 2 by 1': TO must be >= FROM");
}

// TO is included when it lies on the grid although the division that counts
// the steps is inexact in binary floating point: 1 / 0.1 = 9.999999999999998
// and 0.3 / 0.1 = 2.9999999999999996 in IEEE 754 double (evaluated in Python).
TEST(ParseDbList, RangeIncludesItsEndDespiteRounding) {
  auto a = ParseDbList("0 to 1 by 0.1", "x");
  ASSERT_TRUE(a.ok());
  ASSERT_EQ(a.value().size(), 11u);
  EXPECT_EQ(a.value().back(), 1.0);
  EXPECT_EQ(a.value()[3], 0.3);
  auto b = ParseDbList("0 to 12 by 0.5", "x");
  ASSERT_TRUE(b.ok());
  ASSERT_EQ(b.value().size(), 25u);
  EXPECT_EQ(b.value().front(), 0.0);
  EXPECT_EQ(b.value().back(), 12.0);
  auto c = ParseDbList("-3 to 0.3 by 0.1", "x");
  ASSERT_TRUE(c.ok());
  ASSERT_EQ(c.value().size(), 34u);
  EXPECT_EQ(c.value().back(), 0.3);
  // An end off the grid is not reached: 0, 0.4, 0.8 (1.2 > 1).
  auto d = ParseDbList("0 to 1 by 0.4", "x");
  ASSERT_TRUE(d.ok());
  EXPECT_EQ(d.value(), (std::vector<double>{0, 0.4, 0.8}));
  auto e = ParseDbList("  2   to 2 by 1 ", "x");
  ASSERT_TRUE(e.ok());
  EXPECT_EQ(e.value(), (std::vector<double>{2}));
}

TEST(ParseDbList, MalformedRangesAreRefusedWithTheForm) {
  const std::string form =
      ": expected FROM to TO by STEP (numbers, in dB, e.g. '0 to 12 by 0.5') or a comma list";
  EXPECT_EQ(ParseDbList("0 to 4 step 1", "x").status().message(), "x = '0 to 4 step 1'" + form);
  EXPECT_EQ(ParseDbList("0 to 4 by", "x").status().message(), "x = '0 to 4 by'" + form);
  EXPECT_EQ(ParseDbList("a to 4 by 1", "x").status().message(), "x = 'a to 4 by 1'" + form);
  EXPECT_EQ(ParseDbList("0 to 4 by -1", "x").status().message(),
            "x = '0 to 4 by -1': STEP must be > 0");
  EXPECT_EQ(ParseDbList("0 to 1e9 by 1e-3", "x").status().message(),
            "x = '0 to 1e9 by 1e-3': more than 10000 points");
}

TEST(ParseDbList, ColonFormIsRefusedShowingTheNewForm) {
  EXPECT_EQ(ParseDbList("0:0.5:12", "sweep.ebno_db").status().message(),
            "sweep.ebno_db = '0:0.5:12': the START:STEP:STOP form is no longer accepted; write a "
            "range as FROM to TO by STEP (inclusive), here '0 to 12 by 0.5', or a comma list");
  EXPECT_EQ(ParseDbList("0:1", "x").status().message(),
            "x = '0:1': the START:STEP:STOP form is no longer accepted; write a range as FROM to "
            "TO by STEP (inclusive), here 'FROM to TO by STEP', or a comma list");
}

TEST(Config, RenamedKeysAreRefusedNamingTheNewKey) {
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\ntarget_errors = 100\n[scheme.a]\nmodulation = bpsk\n"),
            "test.ini: key 'sweep.target_errors' was renamed: write 'sweep.stop_bit_errors' (same "
            "meaning)");
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\nmax_bits = 1000\n[scheme.a]\nmodulation = bpsk\n"),
            "test.ini: key 'sweep.max_bits' was renamed: write 'sweep.stop_bits' (same meaning)");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.target_errors=500"}),
            "test.ini: key '--set sweep.target_errors' was renamed: write 'sweep.stop_bit_errors' "
            "(same meaning)");
  EXPECT_EQ(ErrorOf(kGood, {"sweep.max_bits=500"}),
            "test.ini: key '--set sweep.max_bits' was renamed: write 'sweep.stop_bits' (same "
            "meaning)");
  // Placed in a scheme section, where neither key ever was, the message
  // still points at the new [sweep] key.
  EXPECT_EQ(ErrorOf("[sweep]\nebno_db = 1\n[scheme.a]\nmodulation = bpsk\nmax_bits = 5\n"),
            "test.ini: key 'scheme.a.max_bits' was renamed: write 'sweep.stop_bits' (same "
            "meaning)");
}

// The defaults of the stopping keys follow from the statistics (README,
// "Stopping a point"); the interval edges are computed here with Boost.Math's
// beta distribution (Clopper-Pearson: C. J. Clopper and E. S. Pearson,
// Biometrika 26(4), 1934), independent of sim/engine/stats.
TEST(ConfigDefaults, StopBitErrorsIsTheFewestErrorsWithin20PercentAt95Percent) {
  auto cfg = ParseRunConfig("[sweep]\nebno_db = 1\n[scheme.a]\nmodulation = bpsk\n", "d.ini", {});
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  const double n = 1e9;  // bits; BER k/n is small, as at every point of interest
  std::uint64_t fewest = 0;
  for (std::uint64_t k = 1; k < 1000 && fewest == 0; ++k) {
    const double kd = static_cast<double>(k);
    const double low = boost::math::quantile(boost::math::beta_distribution<>(kd, n - kd + 1), 0.025);
    const double high = boost::math::quantile(boost::math::beta_distribution<>(kd + 1, n - kd), 0.975);
    if (high * n / kd - 1 <= 0.2 && 1 - low * n / kd <= 0.2) fewest = k;
  }
  EXPECT_EQ(fewest, 116u);  // the upper edge is the binding one: +21.6 % at 100 errors
  EXPECT_EQ(cfg.value().sweep.stop_bit_errors, fewest);
}

TEST(ConfigDefaults, StopBitsWithoutErrorsBoundsTheBerBelowTheFloor) {
  auto cfg = ParseRunConfig("[sweep]\nebno_db = 1\n[scheme.a]\nmodulation = bpsk\n", "d.ini", {});
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  const SweepConfig& s = cfg.value().sweep;
  // One-sided 95 % Clopper-Pearson upper bound with 0 errors in n bits:
  // 1 - 0.05^(1/n) (about 3/n, the "rule of three", common practice).
  const auto upper = [](double n) {
    return boost::math::quantile(boost::math::beta_distribution<>(1, n), 0.95);
  };
  const double n = static_cast<double>(s.stop_bits);
  EXPECT_LE(upper(n), s.ber_floor);
  EXPECT_GT(upper(0.99 * n), s.ber_floor);  // and not much more than needed
  EXPECT_EQ(s.ber_floor, 1e-7);
}

TEST(Config, MissingFileIsReported) {
  auto r = LoadRunConfig("/nonexistent/dir/x.ini", {});
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "/nonexistent/dir/x.ini: cannot open config file");
}

TEST(Config, FiniteLengthBoundsIsYesOrNo) {
  const std::string base = "[scheme.a]\nmodulation = bpsk\n[sweep]\nebno_db = 1\n";
  auto def = ParseRunConfig(base, "d.ini", {});
  ASSERT_TRUE(def.ok()) << def.status().message();
  EXPECT_TRUE(def.value().sweep.finite_length_bounds);
  auto off = ParseRunConfig(base + "finite_length_bounds = no\n", "d.ini", {});
  ASSERT_TRUE(off.ok()) << off.status().message();
  EXPECT_FALSE(off.value().sweep.finite_length_bounds);
  auto bad = ParseRunConfig(base + "finite_length_bounds = maybe\n", "d.ini", {});
  ASSERT_FALSE(bad.ok());
  EXPECT_NE(bad.status().message().find("finite_length_bounds"), std::string::npos)
      << bad.status().message();
  EXPECT_NE(bad.status().message().find("maybe"), std::string::npos) << bad.status().message();
}

}  // namespace
}  // namespace capgap
