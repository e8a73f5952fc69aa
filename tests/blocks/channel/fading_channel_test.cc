// Fading channel: combiner output and its per-symbol N0, and simulated
// uncoded BER against the exact fading theory of analysis/fading_theory.h.
#include "blocks/channel/fading_channel.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "analysis/fading_theory.h"
#include "blocks/kernels/dispatch.h"
#include "blocks/kernels/fading_kernels.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"
#include "blocks/source/bit_source.h"

namespace capgap {
namespace {

constexpr PhiloxKey kKey{0xabcdu, 0x1357u};

NoiseSpec Noise(double ebno_db, int m) {
  NoiseSpec n;
  n.ebno_db = ebno_db;
  n.bits_per_symbol = m;
  return n;
}

ChannelSpec Spec(FadingLaw law, int branches, Combining c = Combining::kMrc) {
  ChannelSpec s;
  s.law = law;
  s.branches = branches;
  s.combining = c;
  return s;
}

// High SNR: the combiner output is x (within the noise), its N0 is N0 / sum
// |h|^2 (MRC) or N0 / max |h|^2 (selection), from the gains of the unit's
// process state.
TEST(FadingChannel, CombinerOutputAndNoiseLevel) {
  for (const Combining c : {Combining::kMrc, Combining::kSelection}) {
    for (const int l : {1, 3}) {
      auto ch = FadingChannel::Create(Noise(80, 2), Spec(FadingLaw::kRayleigh, l, c)).value();
      const std::size_t n = 257;
      std::vector<cf32> x(n), y(n);
      for (std::size_t i = 0; i < n; ++i) x[i] = y[i] = cf32(i % 2 ? 0.6f : -0.8f, 0.6f);
      std::vector<cf32> gain(n);
      std::vector<float> n0(n, NAN);
      ChannelProcessState ps;
      RngStream noise(kKey, 0, 0, Substream::kNoise), proc(kKey, 0, 0, Substream::kFading);
      ChannelStateView state;
      ch.Apply(y, 1, noise, proc, ChannelStateStorage{gain, n0, &ps}, state);
      ASSERT_TRUE(state.gain.empty());
      ASSERT_EQ(state.n0.size(), n);
      const float n0_point = static_cast<float>(ch.level().n0);
      int deep = 0;
      for (std::size_t i = 0; i < n; ++i) {
        float g = 0;
        for (std::size_t b = 0; b < static_cast<std::size_t>(l); ++b) {
          const float gb = std::norm(ps.gains[b * n + i]);
          g = c == Combining::kMrc ? g + gb : std::max(g, gb);
        }
        EXPECT_NEAR(state.n0[i], n0_point / g, 1e-5f * n0_point / g) << i;
        // |z - x| has standard deviation sqrt(N0 / g); 80 dB: 1e-4 / sqrt g.
        if (g > 1e-3f) {
          EXPECT_LT(std::abs(y[i] - x[i]), 6e-4f / std::sqrt(g)) << i;
        } else {
          ++deep;
        }
      }
      EXPECT_LT(deep, 3);
    }
  }
}

// The gains seen across calls continue the unit's process: block fading of
// 10 symbols over calls of 7 and 13 symbols (state in ChannelProcessState).
TEST(FadingChannel, BlockProcessContinuesAcrossCalls) {
  ChannelSpec s = Spec(FadingLaw::kRayleigh, 1);
  s.time = FadingTime::kBlock;
  s.coherence_symbols = 10;
  auto ch = FadingChannel::Create(Noise(10, 2), s).value();
  ChannelProcessState ps;
  RngStream noise(kKey, 0, 0, Substream::kNoise), proc(kKey, 0, 0, Substream::kFading);
  std::vector<cf32> y(13, cf32(1, 0)), gain(13);
  std::vector<float> n0(13);
  std::vector<float> seen;
  ChannelStateView state;
  ch.Apply(std::span<cf32>(y).first(7), 1, noise, proc,
           ChannelStateStorage{gain, std::span<float>(n0).first(7), &ps}, state);
  seen.insert(seen.end(), state.n0.begin(), state.n0.end());
  ch.Apply(y, 1, noise, proc, ChannelStateStorage{gain, n0, &ps}, state);
  seen.insert(seen.end(), state.n0.begin(), state.n0.end());
  for (std::size_t i = 0; i < seen.size(); ++i) EXPECT_EQ(seen[i], seen[i / 10 * 10]) << i;
  EXPECT_NE(seen[9], seen[10]);
}

struct BerCase {
  const char* modulation;
  FadingLaw law;
  int branches;
  double param;  // Rician K (linear) or Nakagami m
  double ebno_db;
};

// Simulated uncoded BER (hard decisions on the combiner output) against the
// exact average BER of analysis::FadingBer (MGF method; checked there against
// Proakis & Salehi, Digital Communications, 5th ed., ch. 13, e.g. BPSK
// Rayleigh 1/2 (1 - sqrt(g/(1+g))) = 2.3269e-2 at 10 dB). Sample: symbols
// for about 2000 expected bit errors (at least 2e5 symbols). Family-wise 99 %
// over the 18 cases: each at 1 - 0.01/18, normal quantile z = 3.45 (Bonferroni).
// Bits of one symbol are dependent, so the variance of the error count is
// bounded by m times the binomial one (Cauchy-Schwarz: Var sum_k X_k <= m
// sum_k Var X_k); symbols are independent (fast fading).
class FadingChannelBer : public ::testing::TestWithParam<BerCase> {};

TEST_P(FadingChannelBer, MatchesExactTheory) {
  const BerCase c = GetParam();
  const Modulation mod = ParseModulation(c.modulation).value();
  const int m = mod.bits_per_symbol();
  ChannelSpec spec = Spec(c.law, c.branches);
  if (c.law == FadingLaw::kRician) spec.rician_k_db = 10 * std::log10(c.param);
  if (c.law == FadingLaw::kNakagami) spec.nakagami_m = c.param;
  const double p = analysis::FadingBer(mod, spec, c.ebno_db);
  ASSERT_TRUE(p > 0 && p < 0.5);
  const double bits_wanted = std::max(2000.0 / p, 2e5 * m);
  auto mapper = Mapper::Create(mod).value();
  auto demapper = Demapper::Create(mapper, DemapMethod::kHard).value();
  auto ch = FadingChannel::Create(Noise(c.ebno_db, m), spec).value();
  const std::size_t frame = 4096;
  std::vector<Bit> bits(frame * static_cast<std::size_t>(m)), decided(bits.size());
  std::vector<cf32> y(frame), gain(frame);
  std::vector<float> n0(frame);
  ChannelProcessState ps;
  RngStream bit_stream(kKey, 1, 0, Substream::kBits), noise(kKey, 1, 0, Substream::kNoise),
      proc(kKey, 1, 0, Substream::kFading);
  double errors = 0, total = 0;
  while (total < bits_wanted) {
    GenerateRandomBits(bits, bit_stream);
    mapper.Map(bits, y);
    ChannelStateView state;
    ch.Apply(y, 1, noise, proc, ChannelStateStorage{gain, n0, &ps}, state);
    demapper.HardDecide(y, decided);
    for (std::size_t i = 0; i < bits.size(); ++i) errors += bits[i] != decided[i];
    total += static_cast<double>(bits.size());
  }
  const double sd = std::sqrt(m * total * p * (1 - p));
  EXPECT_NEAR(errors, total * p, 3.45 * sd)
      << c.modulation << " law " << static_cast<int>(c.law) << " L=" << c.branches << " at "
      << c.ebno_db << " dB: BER " << errors / total << " vs " << p << " (" << total << " bits)";
}

INSTANTIATE_TEST_SUITE_P(
    Cases, FadingChannelBer,
    ::testing::Values(BerCase{"bpsk", FadingLaw::kRayleigh, 1, 0, 0},
                      BerCase{"bpsk", FadingLaw::kRayleigh, 1, 0, 10},
                      BerCase{"bpsk", FadingLaw::kRayleigh, 1, 0, 20},
                      BerCase{"bpsk", FadingLaw::kRayleigh, 2, 0, 0},
                      BerCase{"bpsk", FadingLaw::kRayleigh, 2, 0, 6},
                      BerCase{"bpsk", FadingLaw::kRayleigh, 2, 0, 12},
                      BerCase{"16qam", FadingLaw::kRayleigh, 1, 0, 5},
                      BerCase{"16qam", FadingLaw::kRayleigh, 1, 0, 15},
                      BerCase{"16qam", FadingLaw::kRayleigh, 1, 0, 25},
                      BerCase{"16qam", FadingLaw::kRayleigh, 2, 0, 5},
                      BerCase{"16qam", FadingLaw::kRayleigh, 2, 0, 10},
                      BerCase{"16qam", FadingLaw::kRayleigh, 2, 0, 15},
                      BerCase{"bpsk", FadingLaw::kRician, 1, 5, 0},
                      BerCase{"bpsk", FadingLaw::kRician, 1, 5, 5},
                      BerCase{"bpsk", FadingLaw::kRician, 1, 5, 10},
                      BerCase{"bpsk", FadingLaw::kNakagami, 1, 2, 0},
                      BerCase{"bpsk", FadingLaw::kNakagami, 1, 2, 5},
                      BerCase{"bpsk", FadingLaw::kNakagami, 1, 2, 10}));

// Selection combining of 2 Rayleigh branches against FadingBer (SC): BPSK
// at 5 dB, same statistics as above (one case, z = 3.45 kept).
TEST(FadingChannel, SelectionBerMatchesTheory) {
  const Modulation mod = ParseModulation("bpsk").value();
  ChannelSpec spec = Spec(FadingLaw::kRayleigh, 2, Combining::kSelection);
  const double p = analysis::FadingBer(mod, spec, 5);
  auto mapper = Mapper::Create(mod).value();
  auto demapper = Demapper::Create(mapper, DemapMethod::kHard).value();
  auto ch = FadingChannel::Create(Noise(5, 1), spec).value();
  const std::size_t frame = 4096;
  std::vector<Bit> bits(frame), decided(frame);
  std::vector<cf32> y(frame), gain(frame);
  std::vector<float> n0(frame);
  ChannelProcessState ps;
  RngStream bit_stream(kKey, 2, 0, Substream::kBits), noise(kKey, 2, 0, Substream::kNoise),
      proc(kKey, 2, 0, Substream::kFading);
  double errors = 0, total = 0;
  while (total < 2000.0 / p) {
    GenerateRandomBits(bits, bit_stream);
    mapper.Map(bits, y);
    ChannelStateView state;
    ch.Apply(y, 1, noise, proc, ChannelStateStorage{gain, n0, &ps}, state);
    demapper.HardDecide(y, decided);
    for (std::size_t i = 0; i < bits.size(); ++i) errors += bits[i] != decided[i];
    total += static_cast<double>(bits.size());
  }
  EXPECT_NEAR(errors, total * p, 3.45 * std::sqrt(total * p * (1 - p)));
}

// Soft demapping with the equalised state (gain 1, per-symbol N0) through
// the fast path equals the brute-force metric |y - x|^2 / N0 of the generic
// demapper (max-log and log-MAP, 16-QAM), to float rounding.
TEST(FadingChannel, FastDemapPathMatchesGenericMetric) {
  const Modulation mod = ParseModulation("16qam").value();
  auto mapper = Mapper::Create(mod).value();
  auto ch = FadingChannel::Create(Noise(8, 4), Spec(FadingLaw::kRayleigh, 2)).value();
  const std::size_t n = 301;
  std::vector<Bit> bits(4 * n);
  std::vector<cf32> y(n), gain(n);
  std::vector<float> n0(n);
  ChannelProcessState ps;
  RngStream bs(kKey, 3, 0, Substream::kBits), noise(kKey, 3, 0, Substream::kNoise),
      proc(kKey, 3, 0, Substream::kFading);
  GenerateRandomBits(bits, bs);
  mapper.Map(bits, y);
  ChannelStateView state;
  ch.Apply(y, 1, noise, proc, ChannelStateStorage{gain, n0, &ps}, state);
  std::vector<cf32> ones(n, cf32(1, 0));
  ChannelStateView generic{ones, state.n0, state.n0_uniform};
  for (const DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
    auto d = Demapper::Create(mapper, method).value();
    std::vector<float> fast(4 * n, NAN), slow(4 * n, NAN);
    d.Demap(y, state, fast);
    d.Demap(y, generic, slow);
    for (std::size_t i = 0; i < fast.size(); ++i) {
      // Log-MAP kernels approximate exp/log to about 1e-7 relative
      // (demap_reference.h); allow 1e-4 relative plus 1e-3 absolute.
      EXPECT_NEAR(fast[i], slow[i], 1e-4f * std::fabs(slow[i]) + 1e-3f) << i;
    }
  }
}

// The fused uncoded 16-QAM count (CountQam16Errors, fading_kernels.h) gives
// exactly the bit errors of the composed path (Apply, the demapper's hard
// slicer or max-log LLRs with the per-symbol N0, decisions L < 0) and leaves
// both streams where Apply leaves them, on the dispatched target: lengths
// around the vector widths (1, 3, 7, 8, 15, 16, 17, 31, 33) and a large odd
// one, hard and max-log, Rayleigh and Rician, low and high SNR, 20 units each.
TEST(FadingChannel, FusedQam16CountEqualsComposedPath) {
  const Modulation mod = ParseModulation("16qam").value();
  auto mapper = Mapper::Create(mod).value();
  for (const FadingLaw law : {FadingLaw::kRayleigh, FadingLaw::kRician}) {
    ChannelSpec spec = Spec(law, 1);
    spec.rician_k_db = 4;
    for (const double ebno : {2.0, 14.0}) {
      auto ch = FadingChannel::Create(Noise(ebno, 4), spec).value();
      if (!ch.counts_qam16()) GTEST_SKIP() << "no vector target: " << FadingKernelTarget();
      for (const DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
        auto dm = Demapper::Create(mapper, method).value();
        const Qam16Decider d = MakeQam16Decider(mapper.pam_levels().data(),
                                                dm.kernel_args().level_scale, 1.0f,
                                                method == DemapMethod::kMaxLog);
        for (const std::size_t n : {1u, 3u, 7u, 8u, 15u, 16u, 17u, 31u, 33u, 961u}) {
          for (std::uint32_t u = 0; u < 20; ++u) {
            std::vector<Bit> bits(4 * n), decided(4 * n);
            RngStream bs(kKey, 9, u, Substream::kBits);
            GenerateRandomBits(bits, bs);
            RngStream n1(kKey, 9, u, Substream::kNoise), p1(kKey, 9, u, Substream::kFading);
            RngStream n2 = n1, p2 = p1;
            ChannelProcessState ps1, ps2;
            std::vector<cf32> y(n), gain(n);
            std::vector<float> n0(n), llrs(4 * n);
            mapper.Map(bits, y);
            ChannelStateView state;
            ch.Apply(y, 1, n1, p1, ChannelStateStorage{gain, n0, &ps1}, state);
            if (method == DemapMethod::kHard) {
              dm.HardDecide(y, decided);
            } else {
              dm.Demap(y, state, llrs);
              LlrToBits(llrs, decided);
            }
            std::uint64_t want = 0;
            for (std::size_t i = 0; i < bits.size(); ++i) want += bits[i] != decided[i] ? 1u : 0u;
            const std::uint64_t got = ch.CountQam16Errors(
                bits.data(), n, d, n2, p2, ChannelStateStorage{gain, n0, &ps2});
            ASSERT_EQ(got, want) << "n " << n << " unit " << u << " ebno " << ebno;
            ASSERT_EQ(n1.counter(), n2.counter());
            ASSERT_EQ(p1.counter(), p2.counter());
          }
        }
      }
    }
  }
  // Forced scalar: no fused path (the oracle's noise is double precision).
  ForceScalarKernels(true);
  auto ch = FadingChannel::Create(Noise(5, 4), Spec(FadingLaw::kRayleigh, 1)).value();
  EXPECT_FALSE(ch.counts_qam16());
  ForceScalarKernels(false);
}

}  // namespace
}  // namespace capgap
