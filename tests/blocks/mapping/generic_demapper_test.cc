// Tests of the brute-force demapper (generic_demapper.h) and of the
// Demapper's per-symbol channel-state path (demapper.h):
//  * with gain 1 and one N0 the brute force equals the fast paths (closed
//    forms, per-axis PAM, PSK metrics; blocks/kernels/demap_kernels.h) for
//    every PSK and QAM, max-log and log-MAP, within a few float epsilons of
//    the metric scale, and its hard decisions are the fast path's;
//  * an empty channel state is exactly the uniform-N0 call, bit for bit;
//  * with complex gains h, |y - h x|^2 / N0 = |y/h - x|^2 / (N0 / |h|^2)
//    (arithmetic), so the channel-state LLRs equal the fast path's on y / h
//    with N0 / |h|^2, symbol by symbol; per-symbol N0 likewise.
#include "blocks/mapping/generic_demapper.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <cstring>
#include <limits>
#include <random>
#include <vector>

#include "blocks/channel/channel_state.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap {
namespace {

const char* const kWords[] = {"bpsk", "qpsk",  "8psk",  "16psk",  "32psk",  "64psk",
                              "4qam", "16qam", "64qam", "256qam", "1024qam"};

Mapper MakeMapper(const char* word) { return Mapper::Create(ParseModulation(word).value()).value(); }

std::vector<cf32> Noisy(const Mapper& mapper, std::size_t n, double n0, std::mt19937_64& rng) {
  std::uniform_int_distribution<std::size_t> pick(0, mapper.points().size() - 1);
  std::normal_distribution<double> noise(0.0, std::sqrt(n0 / 2.0));
  std::vector<cf32> y(n);
  for (cf32& v : y) {
    v = mapper.points()[pick(rng)] +
        cf32(static_cast<float>(noise(rng)), static_cast<float>(noise(rng)));
  }
  return y;
}

// Largest |y - h x|^2 / N0 over the points: the scale of the metric
// differences the float fast paths form.
double LargestMetric(const Mapper& mapper, cf32 y, cf32 h, double n0) {
  double largest = 0.0;
  for (const cf32& x : mapper.points()) {
    largest = std::max(largest, std::norm(std::complex<double>(y) -
                                          std::complex<double>(h) * std::complex<double>(x)) /
                                    n0);
  }
  return largest;
}

// A few float epsilons (16) of the metric scale: the fast paths round metric
// differences of that size in single precision, and their polynomial exp/log
// (relative error ~1e-7, demap_reference.h) add errors of the same order;
// the brute force is double precision.
double Tolerance(double largest_metric, double llr) {
  return 16.0 * std::numeric_limits<float>::epsilon() * (1.0 + std::fabs(llr) + largest_metric);
}

TEST(GenericDemapper, EqualsFastPathsWithUnitGainAndUniformN0) {
  std::mt19937_64 rng(20261204u);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (const DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      const Demapper demapper = Demapper::Create(mapper, method).value();
      for (const double n0 : {2.0, 0.3, 0.02, 1e-3}) {
        const std::vector<cf32> y = Noisy(mapper, 77, n0, rng);
        std::vector<float> fast(m * y.size(), NAN), generic(m, NAN);
        demapper.Demap(y, static_cast<float>(n0), fast);
        for (std::size_t s = 0; s < y.size(); ++s) {
          GenericDemapSymbol(mapper.points(), method, y[s], cf32(1.0f, 0.0f),
                             static_cast<float>(n0), generic);
          const double largest = LargestMetric(mapper, y[s], cf32(1.0f, 0.0f), n0);
          for (std::size_t k = 0; k < m; ++k) {
            ASSERT_NEAR(generic[k], fast[m * s + k], Tolerance(largest, generic[k]))
                << word << " " << ToString(method) << " N0 = " << n0 << " y = " << y[s]
                << " bit " << k;
          }
        }
      }
    }
  }
}

TEST(GenericDemapper, HardDecisionsEqualFastPath) {
  std::mt19937_64 rng(5u);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const Demapper demapper = Demapper::Create(mapper, DemapMethod::kHard).value();
    const std::vector<cf32> y = Noisy(mapper, 200, 0.5, rng);
    std::vector<float> fast(m * y.size(), NAN), generic(m, NAN);
    demapper.Demap(y, 0.5f, fast);
    for (std::size_t s = 0; s < y.size(); ++s) {
      GenericDemapSymbol(mapper.points(), DemapMethod::kHard, y[s], cf32(1.0f, 0.0f), 0.5f,
                         generic);
      for (std::size_t k = 0; k < m; ++k) {
        ASSERT_EQ(generic[k], fast[m * s + k]) << word << " y = " << y[s] << " bit " << k;
      }
    }
  }
}

TEST(Demapper, EmptyChannelStateIsTheUniformPathBitForBit) {
  std::mt19937_64 rng(6u);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (const DemapMethod method :
         {DemapMethod::kHard, DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      const Demapper demapper = Demapper::Create(mapper, method).value();
      const std::vector<cf32> y = Noisy(mapper, 101, 0.2, rng);
      std::vector<float> a(m * y.size(), NAN), b(m * y.size(), NAN);
      demapper.Demap(y, 0.2f, a);
      demapper.Demap(y, ChannelStateView{{}, {}, 0.2f}, b);
      EXPECT_EQ(std::memcmp(a.data(), b.data(), a.size() * sizeof(float)), 0) << word;
    }
  }
}

// y = h x + n with Rayleigh-like gains h ~ CN(0, 1) (and per-symbol N0): the
// channel-state LLRs against the fast path on y / h with N0 / |h|^2.
TEST(Demapper, ComplexGainsEqualFastPathOnEqualisedSymbols) {
  std::mt19937_64 rng(7u);
  std::normal_distribution<float> g(0.0f, std::sqrt(0.5f));
  std::uniform_real_distribution<float> n0_pick(0.01f, 1.0f);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (const DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      const Demapper demapper = Demapper::Create(mapper, method).value();
      for (const bool per_symbol_n0 : {false, true}) {
        const std::size_t n = 64;
        std::uniform_int_distribution<std::size_t> pick(0, mapper.points().size() - 1);
        std::vector<cf32> y(n), h(n);
        std::vector<float> n0(n);
        for (std::size_t s = 0; s < n; ++s) {
          h[s] = cf32(g(rng), g(rng));
          n0[s] = per_symbol_n0 ? n0_pick(rng) : 0.1f;
          std::normal_distribution<float> noise(0.0f, std::sqrt(n0[s] / 2.0f));
          y[s] = h[s] * mapper.points()[pick(rng)] + cf32(noise(rng), noise(rng));
        }
        ChannelStateView state{h, {}, 0.1f};
        if (per_symbol_n0) state.n0 = n0;
        std::vector<float> got(m * n, NAN), fast(m, NAN);
        demapper.Demap(y, state, got);
        for (std::size_t s = 0; s < n; ++s) {
          const cf32 eq = y[s] / h[s];
          const float n0_eq = n0[s] / std::norm(h[s]);
          demapper.Demap(std::span<const cf32>(&eq, 1), n0_eq, fast);
          const double largest = LargestMetric(mapper, y[s], h[s], n0[s]);
          for (std::size_t k = 0; k < m; ++k) {
            ASSERT_NEAR(got[m * s + k], fast[k], Tolerance(largest, fast[k]))
                << word << " " << ToString(method) << " h = " << h[s] << " N0 = " << n0[s]
                << " bit " << k;
          }
        }
      }
    }
  }
}

}  // namespace
}  // namespace capgap
