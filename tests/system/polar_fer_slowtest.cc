// Long polar FER checks (registered with -DCAPGAP_SLOW_TESTS=ON): the
// (1024, 512) code, GA construction at 2 dB, QPSK, 11-bit CRC (0x621).
//
// CA-SCL with 8 paths reaches FER about 1e-3 at Eb/N0 = 2 dB (I. Tal and A.
// Vardy, "List decoding of polar codes", IEEE Trans. Inf. Theory 61(5),
// 2015, figures for n = 1024 / 2048 at rate 1/2; from memory). Checked: the
// 99 % Clopper-Pearson interval of the FER at 2.0 dB meets [5e-4, 2e-3]
// (about 100 frame errors in 76,800 frames at the measured 1.45e-3, seed 5),
// and SC at 2.5 dB stays above it (SC measured 1.3e-2 there: a gain of more
// than 0.5 dB at FER 1e-3; the "about 1 dB", from memory).
#include <string>

#include <gtest/gtest.h>

#include "sim/chain/scheme_result.h"
#include "sim/config/config.h"
#include "sim/engine/engine.h"
#include "sim/engine/stats.h"

namespace capgap {
namespace {

PointResult RunPolar(const std::string& keys, double ebno_db, std::uint64_t frames) {
  auto cfg = ParseRunConfig(
      "[sweep]\nebno_db = " + std::to_string(ebno_db) +
          "\nstop_bit_errors = 1000000000\nstop_bits = " + std::to_string(512 * frames) +
          "\nseed = 5\n[scheme.p]\nmodulation = qpsk\ncode = polar\ninfo_bits = 512\n"
          "length = 1024\ndesign_ebno_db = 2\n" + keys,
      "polar_fer_slowtest.ini", {});
  EXPECT_TRUE(cfg.ok()) << cfg.status().message();
  auto chain = Chain::Create(cfg.value().schemes[0], 5);
  EXPECT_TRUE(chain.ok()) << chain.status().message();
  EngineOptions eo;
  eo.threads = 2;
  return RunPoint(chain.value(), cfg.value().SweepFor(0), 0, ebno_db, eo);
}

TEST(PolarFerSlow, CaSclOf8NearFer1e3At2dBAndAheadOfSc) {
  const PointResult scl = RunPolar("decoder = scl\nlist_size = 8\ncrc_bits = 11\n", 2.0, 76800);
  const PointResult sc = RunPolar("decoder = sc\n", 2.5, 12800);
  const Interval a = ClopperPearson(scl.counts.frame_errors, scl.counts.frames, 0.99);
  const Interval b = ClopperPearson(sc.counts.frame_errors, sc.counts.frames, 0.99);
  const std::string what = "CA-SCL-8 at 2.0 dB: " + std::to_string(scl.counts.frame_errors) +
                           "/" + std::to_string(scl.counts.frames) + "; SC at 2.5 dB: " +
                           std::to_string(sc.counts.frame_errors) + "/" +
                           std::to_string(sc.counts.frames);
  EXPECT_LE(a.low, 2e-3) << what;
  EXPECT_GE(a.high, 5e-4) << what;
  EXPECT_GT(b.low, a.high) << what;
}

}  // namespace
}  // namespace capgap
