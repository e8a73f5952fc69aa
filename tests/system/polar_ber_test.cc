// End-to-end polar codes (code = polar) through the config, the chain and
// the engine: CRC-aided SCL against SC on the (1024, 512) code, counts
// independent of the thread count, the /<scheme>/code report, and the
// config errors (key, value, rule).
//
// CA-SCL versus SC: with a list of 8 and an 11-bit CRC the (1024, 512) code
// gains about 1 dB over SC at FER 1e-3 (I. Tal and A. Vardy, "List decoding
// of polar codes", IEEE Trans. Inf. Theory 61(5), 2015, figures; from
// memory). Measured here (seed 5, QPSK, GA at 2 dB): SC FER 48/512 = 9.4e-2
// at 2.0 dB, CA-SCL-8 128/3072 = 4.2e-2 at 1.5 dB. The default-suite check
// asks for a gain of at least 0.5 dB at FER ~5e-2: the 99 % Clopper-Pearson
// interval of CA-SCL at 1.5 dB (3072 frames) lies wholly below that of SC at
// 2.0 dB (512 frames); fixed seed. The 1 dB, FER 1e-3 comparison is in
// polar_fer_slowtest.cc.
#include <cmath>
#include <string>
#include <variant>

#include <gtest/gtest.h>

#include "sim/chain/scheme_result.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

Result<RunConfig> PolarConfig(const std::string& keys, const std::string& points,
                              std::uint64_t stop_bits, const std::string& modulation = "qpsk") {
  return ParseRunConfig("[sweep]\nebno_db = " + points +
                            "\nstop_bit_errors = 1000000000\nstop_bits = " +
                            std::to_string(stop_bits) + "\nseed = 5\n[scheme.p]\nmodulation = " +
                            modulation + "\ncode = polar\n" + keys,
                        "polar_ber_test.ini", {});
}

PointResult RunPolarPoint(const std::string& keys, double ebno_db, std::uint64_t stop_bits, int threads) {
  auto cfg = PolarConfig(keys, std::to_string(ebno_db), stop_bits);
  EXPECT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], cfg.value().sweep.seed);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  EngineOptions eo;
  eo.threads = threads;
  return RunPoint(chain.value(), cfg.value().SweepFor(0), 0, ebno_db, eo);
}

const char kCode1024[] = "info_bits = 512\nlength = 1024\ndesign_ebno_db = 2\n";

TEST(PolarBer, CrcAidedListOf8GainsHalfADbOverScAt1024) {
  const PointResult sc = RunPolarPoint(std::string(kCode1024) + "decoder = sc\n", 2.0, 512 * 512, 2);
  const PointResult scl =
      RunPolarPoint(std::string(kCode1024) + "decoder = scl\nlist_size = 8\ncrc_bits = 11\n", 1.5,
          512 * 3072, 2);
  const Interval a = ClopperPearson(sc.counts.frame_errors, sc.counts.frames, 0.99);
  const Interval b = ClopperPearson(scl.counts.frame_errors, scl.counts.frames, 0.99);
  const std::string what = "SC at 2.0 dB: " + std::to_string(sc.counts.frame_errors) + "/" +
                           std::to_string(sc.counts.frames) + "; CA-SCL-8 at 1.5 dB: " +
                           std::to_string(scl.counts.frame_errors) + "/" +
                           std::to_string(scl.counts.frames);
  EXPECT_EQ(scl.counts.frames, 3072u) << what;  // the stated sample sizes (whole units)
  EXPECT_EQ(sc.counts.frames, 512u) << what;
  EXPECT_GE(scl.counts.frame_errors, 50u) << what;
  EXPECT_GE(sc.counts.frame_errors, 20u) << what;
  EXPECT_LT(b.high, a.low) << what;
}

TEST(PolarBer, CountsIdenticalFor1And2And3Threads) {
  const std::string keys =
      "info_bits = 60\nlength = 100\ncrc_bits = 6\nlist_size = 4\nsystematic = yes\n";
  const PointResult one = RunPolarPoint(keys, 2.0, 60 * 300, 1);
  const PointResult two = RunPolarPoint(keys, 2.0, 60 * 300, 2);
  const PointResult three = RunPolarPoint(keys, 2.0, 60 * 300, 3);
  EXPECT_EQ(one.counts, two.counts);
  EXPECT_EQ(one.counts, three.counts);
  EXPECT_GT(one.counts.frame_errors, 0u);
}

TEST(PolarBer, CodeReportHoldsTheFrozenSet) {
  auto cfg = PolarConfig("info_bits = 40\nlength = 100\ncrc_bits = 11\n", "2", 1000);
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], 5);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  EXPECT_EQ(chain.value().code().coded_bits(), 100u);
  EXPECT_DOUBLE_EQ(chain.value().code().rate(), 0.4);
  const SchemeResult r = AnalyseScheme(chain.value(), cfg.value().SweepFor(0), {});
  ASSERT_TRUE(r.code.present);
  const CodeReport::Dataset* frozen = nullptr;
  for (const auto& d : r.code.datasets) {
    if (d.name == "frozen_set") frozen = &d;
  }
  ASSERT_NE(frozen, nullptr);
  const auto& f = std::get<std::vector<std::int32_t>>(frozen->values);
  EXPECT_EQ(f.size(), 128u - 51u);  // N - (info + CRC)
  // (40 + 11) / 100 > 7/16: shortened, so u_100..u_127 are frozen.
  EXPECT_EQ(f.back(), 127);
  const auto* rm = r.code.Find("rate_matching");
  ASSERT_NE(rm, nullptr);
  EXPECT_EQ(std::get<std::string>(*rm), "shorten");
  ASSERT_NE(r.code.Find("crc_polynomial"), nullptr);
  EXPECT_EQ(std::get<std::string>(*r.code.Find("crc_polynomial")), "0x621");
}

void ExpectRefused(const std::string& keys, const std::string& needle,
                   const std::string& modulation = "qpsk") {
  auto cfg = PolarConfig(keys, "2", 1000, modulation);
  std::string message;
  if (cfg.ok()) {
    auto chain = Chain::Create(cfg.value().schemes[0], 5);
    ASSERT_FALSE(chain.ok()) << keys;
    message = chain.status().message();
  } else {
    message = cfg.status().message();
  }
  EXPECT_NE(message.find(needle), std::string::npos) << message;
}

TEST(PolarConfig, BadKeysAreRefusedNamingKeyValueAndRule) {
  ExpectRefused("length = 100\n", "missing required key 'scheme.p.info_bits'");
  ExpectRefused("info_bits = 95\nlength = 100\ncrc_bits = 11\n",
                "scheme.p.info_bits = '95': info_bits + crc_bits = 106 must be <= length = 100");
  ExpectRefused("info_bits = 50\nlength = 100\ncrc_polynomial = 0x621\n",
                "scheme.p.crc_polynomial = '0x621': applies only with crc_bits > 0");
  ExpectRefused("info_bits = 50\nlength = 100\ncrc_bits = 5\n",
                "scheme.p.crc_bits = '5': has no default polynomial");
  ExpectRefused("info_bits = 50\nlength = 100\ncrc_bits = 11\ncrc_polynomial = 0x62g\n",
                "scheme.p.crc_polynomial = '0x62g': must be not hexadecimal");
  ExpectRefused("info_bits = 50\nlength = 100\ncrc_bits = 11\ncrc_polynomial = 0x1621\n",
                "scheme.p.crc_polynomial = '0x1621': with crc_bits = 11: CRC polynomial has a "
                "term of degree >= 11");
  ExpectRefused("info_bits = 50\nlength = 100\ndecoder = sc\nlist_size = 4\n",
                "scheme.p.list_size applies only with decoder = scl");
  ExpectRefused("info_bits = 50\nlength = 100\nlist_size = 33\n",
                "scheme.p.list_size = '33': must be an integer in [1, 32]");
  ExpectRefused("info_bits = 50\nlength = 40000\n", "scheme.p.length = '40000'");
  ExpectRefused("info_bits = 50\nlength = 100\npolar_construction = gauss\n",
                "valid: ga, bhattacharyya, beta");
  ExpectRefused("info_bits = 50\nlength = 100\npolar_construction = beta\ndesign_ebno_db = 1\n",
                "scheme.p.design_ebno_db applies only with polar_construction = ga or "
                "bhattacharyya");
  ExpectRefused("info_bits = 50\nlength = 100\nrate_matching = none\n",
                "valid: auto, puncture, shorten");
  ExpectRefused("info_bits = 50\nlength = 100\n", "scheme.p.length = '100': must be a multiple of 3",
                "8psk");
  ExpectRefused("info_bits = 50\nlength = 100\nframe_bits = 50\n", "scheme.p.frame_bits");
}

}  // namespace
}  // namespace capgap
