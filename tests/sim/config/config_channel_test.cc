// Channel and interleaver keys: values read into ChannelSpec/InterleaverSpec,
// keys that apply only with their channel, and refused values and
// combinations named by file, key, value and rule (exact messages).
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "sim/config/config.h"

namespace capgap {
namespace {

constexpr char kBase[] = R"(
[sweep]
ebno_db = 0 to 10 by 5

[scheme.s]
modulation = qpsk
)";

Result<RunConfig> Parse(const std::vector<std::string>& overrides) {
  return ParseRunConfig(kBase, "f.ini", overrides);
}

std::string ErrorOf(const std::vector<std::string>& overrides) {
  auto r = Parse(overrides);
  return r.ok() ? "OK" : r.status().message();
}

TEST(ConfigChannel, DefaultsAreAwgnWithoutInterleaver) {
  const auto c = Parse({}).value();
  const ChannelSpec& ch = c.schemes[0].channel;
  EXPECT_EQ(ch.law, FadingLaw::kAwgn);
  EXPECT_EQ(ch.branches, 1);
  EXPECT_EQ(c.schemes[0].interleaver.kind, InterleaverKind::kNone);
}

TEST(ConfigChannel, ReadsEveryKey) {
  auto c = Parse({"scheme.s.channel=rician", "scheme.s.rician_k_db=6", "scheme.s.fading=block",
                  "scheme.s.coherence_symbols=500", "scheme.s.branches=2",
                  "scheme.s.combining=selection"})
               .value();
  ChannelSpec ch = c.schemes[0].channel;
  EXPECT_EQ(ch.law, FadingLaw::kRician);
  EXPECT_EQ(ch.rician_k_db, 6.0);
  EXPECT_EQ(ch.time, FadingTime::kBlock);
  EXPECT_EQ(ch.coherence_symbols, 500u);
  EXPECT_EQ(ch.branches, 2);
  EXPECT_EQ(ch.combining, Combining::kSelection);
  c = Parse({"scheme.s.channel=rician", "scheme.s.rician_k_db=-inf"}).value();
  EXPECT_TRUE(std::isinf(c.schemes[0].channel.rician_k_db));
  c = Parse({"scheme.s.channel=nakagami", "scheme.s.nakagami_m=2.5"}).value();
  EXPECT_EQ(c.schemes[0].channel.nakagami_m, 2.5);
  c = Parse({"scheme.s.channel=rayleigh", "scheme.s.fading=doppler", "scheme.s.doppler=0.05"})
          .value();
  EXPECT_EQ(c.schemes[0].channel.time, FadingTime::kDoppler);
  EXPECT_EQ(c.schemes[0].channel.doppler, 0.05);
  c = Parse({"scheme.s.code=conv", "scheme.s.interleaver=rows", "scheme.s.interleaver_rows=8",
             "scheme.s.interleaver_frames=4"})
          .value();
  EXPECT_EQ(c.schemes[0].interleaver.kind, InterleaverKind::kRows);
  EXPECT_EQ(c.schemes[0].interleaver.rows, 8u);
  EXPECT_EQ(c.schemes[0].interleaver.frames, 4u);
}

TEST(ConfigChannel, BadValuesNameKeyValueAndRule) {
  EXPECT_EQ(ErrorOf({"scheme.s.channel=rayleigh", "scheme.s.nakagami_m=2"}),
            "f.ini: scheme.s.nakagami_m applies only with channel = nakagami (this scheme has "
            "channel = rayleigh)");
  EXPECT_EQ(ErrorOf({"scheme.s.channel=fading"}),
            "f.ini: scheme.s.channel = 'fading': valid: awgn, rayleigh, rician, nakagami");
  EXPECT_EQ(ErrorOf({"scheme.s.channel=nakagami", "scheme.s.nakagami_m=0.4"}),
            "f.ini: scheme.s.nakagami_m = '0.4': must be in [0.5, 10000]");
  EXPECT_EQ(ErrorOf({"scheme.s.channel=rician", "scheme.s.rician_k_db=inf"}),
            "f.ini: scheme.s.rician_k_db = 'inf': must be a number in [-40, 40] dB, or -inf for "
            "K = 0 (Rayleigh)");
  EXPECT_EQ(ErrorOf({"scheme.s.channel=rayleigh", "scheme.s.fading=doppler",
                     "scheme.s.doppler=0.7"}),
            "f.ini: scheme.s.doppler = '0.7': must be in (0, 0.5]");
  EXPECT_EQ(ErrorOf({"scheme.s.branches=0"}),
            "f.ini: scheme.s.branches = '0': must be an integer in [1, 64]");
  // Nakagami-m with Doppler: the mapped Rayleigh process (fading_process.h).
  EXPECT_EQ(ErrorOf({"scheme.s.channel=nakagami", "scheme.s.fading=doppler"}), "OK");
  EXPECT_EQ(ErrorOf({"scheme.s.fading=block"}),
            "f.ini: scheme.s.fading applies only with channel = rayleigh or rician or nakagami (this "
            "scheme has channel = awgn)");
}

TEST(ConfigChannel, RefusedCombinations) {
  EXPECT_EQ(ErrorOf({"scheme.s.interleaver=random"}),
            "f.ini: scheme.s.interleaver = 'random': applies to coded schemes only (this scheme "
            "has code = none); use interleaver = none");
  EXPECT_EQ(ErrorOf({"scheme.s.channel=rayleigh", "scheme.s.branches=2", "scheme.s.shaping=rrc"}),
            "f.ini: scheme.s.shaping = 'rrc': receive diversity runs at one sample per symbol; "
            "use shaping = none with branches = 2, or branches = 1 with shaping");
  // Shaped chains fade at the symbol rate with one branch.
  EXPECT_EQ(ErrorOf({"scheme.s.channel=rayleigh", "scheme.s.shaping=rrc"}), "OK");
  EXPECT_EQ(ErrorOf({"scheme.s.code=conv", "scheme.s.interleaver=random",
                     "scheme.s.interleaver_frames=4", "scheme.s.unit_frames=6"}),
            "f.ini: scheme.s.unit_frames = '6': must be a multiple of interleaver_frames = 4 (an "
            "interleaved group never straddles a work unit)");
  EXPECT_EQ(ErrorOf({"scheme.s.code=conv", "scheme.s.interleaver_frames=4"}),
            "f.ini: scheme.s.interleaver_frames does not apply with interleaver = none (no "
            "interleaver)");
}

}  // namespace
}  // namespace capgap
