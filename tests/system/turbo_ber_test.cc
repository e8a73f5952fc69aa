// End-to-end turbo codes (code = turbo) through the config, the chain and the
// engine: counts independent of the thread count (QPP and S-random, punctured
// and not), iteration statistics, the /<scheme>/code report, and the config
// errors (key, value, rule). The long BER statistics are in
// turbo_ber_slowtest.cc.
#include <cmath>
#include <string>
#include <variant>

#include <gtest/gtest.h>

#include "blocks/fec/turbo_channel_code.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

Result<RunConfig> TurboConfig(const std::string& keys, const std::string& points,
                              std::uint64_t max_bits, const std::string& modulation = "qpsk") {
  return ParseRunConfig("[sweep]\nebno_db = " + points +
                            "\nstop_bit_errors = 1000000000\nstop_bits = " +
                            std::to_string(max_bits) + "\nseed = 5\n[scheme.t]\nmodulation = " +
                            modulation + "\ncode = turbo\n" + keys,
                        "turbo_ber_test.ini", {});
}

PointResult RunTurboPoint(const std::string& keys, double ebno_db, std::uint64_t max_bits,
                          int threads, const std::string& modulation = "qpsk") {
  auto cfg = TurboConfig(keys, std::to_string(ebno_db), max_bits, modulation);
  EXPECT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], cfg.value().sweep.seed);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  EngineOptions eo;
  eo.threads = threads;
  return RunPoint(chain.value(), cfg.value().SweepFor(0), 0, ebno_db, eo);
}

TEST(TurboBer, CountsIdenticalFor1And2And3Threads) {
  for (const std::string& keys :
       {std::string("frame_bits = 40\nunit_frames = 16\n"),
        std::string("frame_bits = 200\nunit_frames = 16\nturbo_interleaver = s_random\npuncture = 11,10,01\n"
                    "decoder = log_map\n")}) {
    const PointResult one = RunTurboPoint(keys, 1.0, 40 * 16 * 20, 1);
    const PointResult two = RunTurboPoint(keys, 1.0, 40 * 16 * 20, 2);
    const PointResult three = RunTurboPoint(keys, 1.0, 40 * 16 * 20, 3);
    EXPECT_EQ(one.counts, two.counts) << keys;
    EXPECT_EQ(one.counts, three.counts) << keys;
    EXPECT_GT(one.counts.frame_errors, 0u) << keys;
    EXPECT_GT(one.counts.bit_errors, 0u) << keys;
  }
}

// At 3 dB the K = 1024 rate-1/3 code is far past its waterfall (BER 1e-5
// near 1.2 dB for this length, from memory): the decoder converges in one or
// two iterations with no error in 64 frames.
TEST(TurboBer, HighSnrFramesConvergeWithoutErrors) {
  const PointResult r = RunTurboPoint("frame_bits = 1024\n", 3.0, 1024 * 64, 2);
  EXPECT_EQ(r.counts.frames, 64u);
  EXPECT_EQ(r.counts.bit_errors, 0u);
}

TEST(TurboBer, CodeReportHoldsInterleaverAndRate) {
  auto cfg = TurboConfig("frame_bits = 40\npuncture = 11,10,01\n", "2", 1000, "bpsk");
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], 5);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  // 40 + 20 + 20 + 12 tail bits (arithmetic).
  EXPECT_EQ(chain.value().code().coded_bits(), 92u);
  EXPECT_DOUBLE_EQ(chain.value().code().rate(), 40.0 / 92.0);
  EXPECT_TRUE(chain.value().code().iterative());
  const SchemeResult r = AnalyseScheme(chain.value(), cfg.value().SweepFor(0), {});
  ASSERT_TRUE(r.code.present);
  const CodeReport::Dataset* il = nullptr;
  for (const auto& d : r.code.datasets) {
    if (d.name == "interleaver") il = &d;
  }
  ASSERT_NE(il, nullptr);
  const auto& p = std::get<std::vector<std::int32_t>>(il->values);
  ASSERT_EQ(p.size(), 40u);
  EXPECT_EQ(p[1], 13);  // (3 + 10) mod 40, QPP of 3GPP TS 36.212 Table 5.1.3-3
  ASSERT_NE(r.code.Find("qpp_f2"), nullptr);
  EXPECT_EQ(std::get<int>(*r.code.Find("qpp_f2")), 10);
  EXPECT_DOUBLE_EQ(std::get<double>(*r.code.Find("extrinsic_scale")), static_cast<double>(0.7f));
}

// The S-random permutation follows the run seed: another seed, another
// permutation (and with it other counts).
TEST(TurboBer, SRandomPermutationFollowsTheSeed) {
  auto a = TurboConfig("frame_bits = 200\nturbo_interleaver = s_random\n", "2", 1000);
  ASSERT_TRUE(a.ok());
  auto c1 = Chain::Create(a.value().schemes[0], 5);
  auto c2 = Chain::Create(a.value().schemes[0], 5);
  auto c3 = Chain::Create(a.value().schemes[0], 6);
  ASSERT_TRUE(c1.ok() && c2.ok() && c3.ok());
  auto perm = [](const Chain& c) {
    const auto& t = static_cast<const TurboChannelCode&>(c.code());
    const auto p = t.code().interleaver().permutation();
    return std::vector<std::uint32_t>(p.begin(), p.end());
  };
  const auto r1 = perm(c1.value()), r2 = perm(c2.value()), r3 = perm(c3.value());
  EXPECT_EQ(r1, r2);
  EXPECT_NE(r1, r3);
  EXPECT_EQ(static_cast<const TurboChannelCode&>(c1.value().code()).code().interleaver().spread(),
            10u);  // floor(sqrt(200 / 2))
}

// No simulated FER lies below the finite-length converse (Polyanskiy, Poor,
// Verdu, IEEE Trans. Inf. Theory 56(5), 2010, meta-converse for the binary-
// input AWGN channel; analysis/finite_length.h) of the code's own (n, k) =
// (132, 40): the 99 % Clopper-Pearson upper bound of the FER at 0, 1, 2 dB
// (1600 frames each, fixed seed) must reach the converse there. A decoder
// that reported too few frame errors (or an Eb/N0 bookkeeping error in the
// decoder's favour, e.g. a rate without the tail) would fall below it.
TEST(TurboBer, FerNeverBelowFiniteLengthConverse) {
  auto cfg = TurboConfig("frame_bits = 40\nunit_frames = 16\n", "0,1,2", 40 * 1600, "bpsk");
  ASSERT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], 5);
  ASSERT_TRUE(chain.ok()) << chain.status().message();
  const SchemeResult r = AnalyseScheme(chain.value(), cfg.value().SweepFor(0), {});
  const auto& fl = r.limits.finite_length;
  ASSERT_TRUE(fl.present) << fl.absent_reason;
  for (double ebno : {0.0, 1.0, 2.0}) {
    EngineOptions eo;
    eo.threads = 2;
    const PointResult p = RunPoint(chain.value(), cfg.value().SweepFor(0), 0, ebno, eo);
    ASSERT_EQ(p.counts.frames, 1600u);
    std::size_t i = 0;
    while (i < fl.ebno_db.size() && std::fabs(fl.ebno_db[i] - ebno) > 1e-6) ++i;
    ASSERT_LT(i, fl.ebno_db.size()) << ebno;
    const double converse = fl.fer_converse[i];
    ASSERT_TRUE(std::isfinite(converse)) << ebno;
    const Interval ci = ClopperPearson(p.counts.frame_errors, p.counts.frames, 0.99);
    EXPECT_GE(ci.high, converse) << "Eb/N0 " << ebno << " dB: FER " << p.counts.frame_errors
                                 << "/1600 below the converse " << converse;
  }
}

void ExpectRefused(const std::string& keys, const std::string& needle,
                   const std::string& modulation = "qpsk") {
  auto cfg = TurboConfig(keys, "2", 1000, modulation);
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

TEST(TurboConfig, BadKeysAreRefusedNamingKeyValueAndRule) {
  ExpectRefused("frame_bits = 1000\n",
                "scheme.t.frame_bits = 1000, turbo_interleaver = qpp: qpp interleaver: no table "
                "entry for K = 1000 (shipped: 40, 1024, 6144); give qpp_f1 and qpp_f2, or use "
                "s_random");
  ExpectRefused("frame_bits = 40\npolynomials = 13\n",
                "scheme.t.polynomials = '13': needs exactly two octal polynomials");
  ExpectRefused("frame_bits = 40\npolynomials = 77,51\n",
                "scheme.t.polynomials = '77,51': polynomials 77,51: memory 5");
  ExpectRefused("frame_bits = 40\npolynomials = 13,19\n", "'19' is not an octal number");
  ExpectRefused("frame_bits = 40\npuncture = 11,10\n",
                "scheme.t.puncture = '11,10': needs 3 rows (x, z1, z2), has 2");
  ExpectRefused("frame_bits = 40\npuncture = 00,00,00\n", "rate must stay below 1");
  ExpectRefused("frame_bits = 40\ndecoder = bcjr\n",
                "scheme.t.decoder = 'bcjr': valid with code = turbo: max_log_map, log_map");
  ExpectRefused("frame_bits = 40\nextrinsic_scale = 1.5\n",
                "scheme.t.extrinsic_scale = '1.5': must be");
  ExpectRefused("frame_bits = 40\nmax_iterations = 0\n",
                "scheme.t.max_iterations = '0': must be an integer in [1, 64]");
  ExpectRefused("frame_bits = 40\nqpp_f1 = 3\n", "give qpp_f1 and qpp_f2 together");
  ExpectRefused("frame_bits = 40\nqpp_f1 = 2\nqpp_f2 = 10\n", "not a permutation polynomial");
  ExpectRefused("frame_bits = 40\ns_random_spread = 3\n",
                "scheme.t.s_random_spread applies only with turbo_interleaver = s_random");
  ExpectRefused("frame_bits = 40\nturbo_interleaver = s_random\ns_random_spread = 30\n",
                "choose a smaller s_random_spread");
  // Memory 2: 3 x 45 + 8 tail bits = 143 coded bits, not a multiple of the
  // 3 bits of 8-PSK (arithmetic).
  ExpectRefused("frame_bits = 45\npolynomials = 7,5\nturbo_interleaver = s_random\n",
                "scheme.t.frame_bits = 45: gives 143 coded bits (tail included), not a multiple "
                "of 3 bits per symbol of 8psk",
                "8psk");
}

}  // namespace
}  // namespace capgap
