// Demapper tests against a brute-force oracle written here in double
// precision: the exact LLR ln sum_{b=0} exp(-|y-x|^2/N0) - ln sum_{b=1} ...
// and its max-log form over all M points of the mapper's constellation
// (demapper.h; DEVELOPERS.md, Conventions), and the nearest point. The demapper's fast
// paths (closed forms for BPSK/QPSK/16-QAM, per-axis PAM sums for QAM,
// chunked 2-D sums for PSK) must all agree with it.
#include "blocks/mapping/demapper.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <complex>
#include <limits>
#include <numbers>
#include <random>
#include <string>
#include <vector>

#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"

namespace capgap {
namespace {

const char* const kWords[] = {"bpsk", "qpsk",  "8psk",  "16psk",  "32psk",  "64psk",
                              "4qam", "16qam", "64qam", "256qam", "1024qam"};

Mapper MakeMapper(const char* word) {
  return std::move(Mapper::Create(ParseModulation(word).value())).value();
}
Demapper MakeDemapper(const Mapper& mapper, DemapMethod method) {
  Result<Demapper> d = Demapper::Create(mapper, method);
  EXPECT_TRUE(d.ok()) << d.status().message();
  return std::move(d).value();
}

// Brute-force oracle over all M points, in double. For BPSK only Re y counts
// (the points are real, and the Im y terms cancel anyway).
struct Oracle {
  std::vector<double> exact, maxlog;
  unsigned nearest = 0;
  double largest_metric = 0.0;  // max |y - x|^2 / N0, sets the float tolerance
};

Oracle BruteForce(const Mapper& mapper, cf32 y, double n0) {
  const int m = mapper.bits_per_symbol();
  const auto points = mapper.points();
  const std::complex<double> yd(y);
  std::vector<double> metric(points.size());
  double best = std::numeric_limits<double>::infinity();
  Oracle o;
  for (std::size_t l = 0; l < points.size(); ++l) {
    metric[l] = -std::norm(yd - std::complex<double>(points[l])) / n0;
    o.largest_metric = std::max(o.largest_metric, -metric[l]);
    if (-metric[l] < best) {
      best = -metric[l];
      o.nearest = static_cast<unsigned>(l);
    }
  }
  for (int k = 0; k < m; ++k) {
    double max0 = -std::numeric_limits<double>::infinity(), max1 = max0;
    for (std::size_t l = 0; l < points.size(); ++l) {
      const bool one = (l >> (m - 1 - k)) & 1u;
      (one ? max1 : max0) = std::max(one ? max1 : max0, metric[l]);
    }
    double sum0 = 0.0, sum1 = 0.0;
    for (std::size_t l = 0; l < points.size(); ++l) {
      const bool one = (l >> (m - 1 - k)) & 1u;
      if (one) {
        sum1 += std::exp(metric[l] - max1);
      } else {
        sum0 += std::exp(metric[l] - max0);
      }
    }
    o.maxlog.push_back(max0 - max1);
    o.exact.push_back(max0 + std::log(sum0) - max1 - std::log(sum1));
  }
  return o;
}

// Received samples: transmitted points plus CN(0, N0) noise, and a share of
// uniformly spread samples (also outside the constellation).
std::vector<cf32> RandomReceived(const Mapper& mapper, double n0, std::size_t n,
                                 std::mt19937_64& rng) {
  std::uniform_int_distribution<int> label(0, mapper.order() - 1);
  std::normal_distribution<double> noise(0.0, std::sqrt(n0 / 2.0));
  std::uniform_real_distribution<double> wide(-1.8, 1.8);
  std::vector<cf32> y(n);
  for (std::size_t i = 0; i < n; ++i) {
    if (i % 4 == 3) {
      y[i] = cf32(static_cast<float>(wide(rng)), static_cast<float>(wide(rng)));
    } else {
      const cf32 x = mapper.points()[static_cast<std::size_t>(label(rng))];
      y[i] = x + cf32(static_cast<float>(noise(rng)), static_cast<float>(noise(rng)));
    }
  }
  return y;
}

// Float tolerance: the demapper forms differences of metrics as large as
// largest_metric in single precision (eps 6e-8), so its error is a few eps
// times that; the polynomial exp and log (relative error ~1e-7) add errors of
// that order on terms of size <= ln(M). 2e-6 is about 30 eps; the largest
// error seen over these tests was 1.8e-7 on this scale (measured ad hoc).
double Tolerance(const Oracle& o, double reference) {
  return 2e-6 * (1.0 + std::fabs(reference) + o.largest_metric);
}

TEST(Demapper, LogMapEqualsBruteForceExactLlr) {
  std::mt19937_64 rng(20240601);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const Demapper demapper = MakeDemapper(mapper, DemapMethod::kLogMap);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (double n0 : {4.0, 1.0, 0.3, 0.05, 0.01, 1e-3}) {
      // 131 symbols: not a multiple of the PSK chunk (64) or the PAM staging
      // chunk (64 axis samples), so the tails run too.
      const std::vector<cf32> y = RandomReceived(mapper, n0, 131, rng);
      std::vector<float> llrs(y.size() * m, NAN);
      demapper.Demap(y, static_cast<float>(n0), llrs);
      for (std::size_t s = 0; s < y.size(); ++s) {
        const Oracle o = BruteForce(mapper, y[s], n0);
        for (std::size_t k = 0; k < m; ++k) {
          ASSERT_NEAR(llrs[s * m + k], o.exact[k], Tolerance(o, o.exact[k]))
              << word << " N0 = " << n0 << " y = " << y[s] << " bit " << k;
        }
      }
    }
  }
}

TEST(Demapper, MaxLogEqualsBruteForceMaxLog) {
  std::mt19937_64 rng(77);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const Demapper demapper = MakeDemapper(mapper, DemapMethod::kMaxLog);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (double n0 : {4.0, 1.0, 0.1, 0.01, 1e-3}) {
      const std::vector<cf32> y = RandomReceived(mapper, n0, 131, rng);
      std::vector<float> llrs(y.size() * m, NAN);
      demapper.Demap(y, static_cast<float>(n0), llrs);
      for (std::size_t s = 0; s < y.size(); ++s) {
        const Oracle o = BruteForce(mapper, y[s], n0);
        // BPSK and QPSK have linear exact LLRs: their max-log path returns the
        // exact values (demapper.h), which are also the true max-log values.
        for (std::size_t k = 0; k < m; ++k) {
          ASSERT_NEAR(llrs[s * m + k], o.maxlog[k], Tolerance(o, o.maxlog[k]))
              << word << " N0 = " << n0 << " y = " << y[s] << " bit " << k;
        }
      }
    }
  }
}

// At high SNR a log-MAP sum of exp(-d/N0) underflows unless each sum is
// shifted by its own largest term; values must stay finite and exact.
TEST(Demapper, LogMapStaysExactAtExtremeSnrAndFarSamples) {
  for (const char* word : {"8psk", "16qam", "64qam", "1024qam", "64psk"}) {
    const Mapper mapper = MakeMapper(word);
    const Demapper demapper = MakeDemapper(mapper, DemapMethod::kLogMap);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const std::vector<cf32> y = {cf32(30.0f, -20.0f), cf32(0.31f, 0.07f), cf32(-3.0f, 0.5f),
                                 cf32(0.0f, 0.0f)};
    for (double n0 : {1e-4, 1e-3}) {
      std::vector<float> llrs(y.size() * m, NAN);
      demapper.Demap(y, static_cast<float>(n0), llrs);
      for (std::size_t s = 0; s < y.size(); ++s) {
        const Oracle o = BruteForce(mapper, y[s], n0);
        for (std::size_t k = 0; k < m; ++k) {
          ASSERT_TRUE(std::isfinite(llrs[s * m + k])) << word << " y = " << y[s];
          ASSERT_NEAR(llrs[s * m + k], o.exact[k], Tolerance(o, o.exact[k]))
              << word << " N0 = " << n0 << " y = " << y[s] << " bit " << k;
        }
      }
    }
  }
}

// BPSK 0 -> +1 gives L = 2y / sigma^2 = 4y / N0 (DEVELOPERS.md, Conventions;
// common practice); only Re y is used. QPSK (demapper.h): L(b0) = 2 sqrt2 Im y / N0, L(b1) = 2 sqrt2 Re y / N0.
TEST(Demapper, BpskAndQpskLlrsAreTheClosedForms) {
  const std::vector<cf32> y = {cf32(0.3f, 5.0f), cf32(-1.2f, -0.4f), cf32(0.0f, 1.0f)};
  const float n0 = 0.5f;
  for (DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
    const Mapper bpsk = MakeMapper("bpsk");
    std::vector<float> l(3, NAN);
    MakeDemapper(bpsk, method).Demap(y, n0, l);
    EXPECT_FLOAT_EQ(l[0], 2.4f);  // 4 * 0.3 / 0.5
    EXPECT_FLOAT_EQ(l[1], -9.6f);
    EXPECT_EQ(l[2], 0.0f);

    const Mapper qpsk = MakeMapper("qpsk");
    std::vector<float> q(6, NAN);
    MakeDemapper(qpsk, method).Demap(y, n0, q);
    const float g = 2.0f * std::numbers::sqrt2_v<float> / n0;
    for (std::size_t s = 0; s < y.size(); ++s) {
      EXPECT_FLOAT_EQ(q[2 * s], g * y[s].imag());
      EXPECT_FLOAT_EQ(q[2 * s + 1], g * y[s].real());
    }
  }
}

// Sign convention: for a noise-free symbol y = x, every LLR is > 0 exactly
// where x's label bit is 0, and the hard decision is the label. For max-log
// this holds at any N0 (the bit's own subset contains x, at distance 0). For
// the exact LLR it needs enough SNR: at low SNR a dense wrong subset can
// outweigh x itself. With d the minimum distance, the wrong subset sums to at
// most (M/2) exp(-d^2/N0), which is below 1 (x's own term) once
// N0 <= d^2 / (2 ln M), so that N0 is used for log-MAP.
TEST(Demapper, NoiseFreeSymbolGivesLlrsOfTheCorrectSign) {
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const std::vector<cf32> x(mapper.points().begin(), mapper.points().end());
    double d_min = 1e9;
    for (std::size_t a = 0; a < x.size(); ++a) {
      for (std::size_t b = a + 1; b < x.size(); ++b) {
        d_min = std::min(d_min, static_cast<double>(std::abs(x[a] - x[b])));
      }
    }
    const double n0_exact = d_min * d_min / (2.0 * std::log(static_cast<double>(x.size())));
    for (DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      const Demapper demapper = MakeDemapper(mapper, method);
      for (double n0 : {0.2, n0_exact}) {
        if (method == DemapMethod::kLogMap && n0 > n0_exact) continue;
        std::vector<float> llrs(x.size() * m, NAN);
        demapper.Demap(x, static_cast<float>(n0), llrs);
        for (std::size_t l = 0; l < x.size(); ++l) {
          for (std::size_t k = 0; k < m; ++k) {
            const bool one = (l >> (m - 1 - k)) & 1u;
            EXPECT_EQ(llrs[l * m + k] < 0.0f, one)
                << word << " " << ToString(method) << " N0 = " << n0 << " label " << l;
            EXPECT_NE(llrs[l * m + k], 0.0f) << word << " label " << l << " bit " << k;
          }
        }
      }
    }
    std::vector<Bit> bits(x.size() * m, 7);
    MakeDemapper(mapper, DemapMethod::kHard).HardDecide(x, bits);
    for (std::size_t l = 0; l < x.size(); ++l) {
      for (std::size_t k = 0; k < m; ++k) {
        EXPECT_EQ(bits[l * m + k], (l >> (m - 1 - k)) & 1u) << word << " label " << l;
      }
    }
  }
}

// Hard decisions: the label of the brute-force nearest point, and the signs
// of the max-log LLRs (both are the minimum-distance rule). Random y never
// falls exactly on a decision boundary.
TEST(Demapper, HardDecisionIsNearestPointAndSignOfMaxLog) {
  std::mt19937_64 rng(5);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const std::vector<cf32> y = RandomReceived(mapper, 0.2, 1000, rng);
    for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      // HardDecide does not depend on the configured soft method.
      const Demapper demapper = MakeDemapper(mapper, method);
      std::vector<Bit> hard(y.size() * m, 7);
      demapper.HardDecide(y, hard);
      std::vector<float> maxlog(y.size() * m, NAN);
      MakeDemapper(mapper, DemapMethod::kMaxLog).Demap(y, 0.2f, maxlog);
      std::vector<Bit> from_llr(y.size() * m, 7);
      LlrToBits(maxlog, from_llr);
      EXPECT_EQ(hard, from_llr) << word;
      for (std::size_t s = 0; s < y.size(); ++s) {
        const unsigned nearest = BruteForce(mapper, y[s], 1.0).nearest;
        for (std::size_t k = 0; k < m; ++k) {
          ASSERT_EQ(hard[s * m + k], (nearest >> (m - 1 - k)) & 1u)
              << word << " y = " << y[s] << " bit " << k;
        }
      }
    }
  }
}

// kHard's "LLRs" are +1 for bit 0 and -1 for bit 1 of the nearest point.
TEST(Demapper, HardMethodEmitsPlusMinusOneOfTheDecisions) {
  std::mt19937_64 rng(9);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const std::vector<cf32> y = RandomReceived(mapper, 0.3, 200, rng);
    const Demapper demapper = MakeDemapper(mapper, DemapMethod::kHard);
    std::vector<float> llrs(y.size() * m, NAN);
    demapper.Demap(y, 0.3f, llrs);
    std::vector<Bit> bits(y.size() * m, 7);
    demapper.HardDecide(y, bits);
    for (std::size_t i = 0; i < llrs.size(); ++i) {
      ASSERT_EQ(llrs[i], bits[i] ? -1.0f : 1.0f) << word << " index " << i;
    }
  }
}

// Every output is written, on lengths around the chunk sizes (outputs are
// NaN-poisoned first).
TEST(Demapper, WritesEveryOutputOnAwkwardLengths) {
  std::mt19937_64 rng(13);
  for (const char* word : kWords) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
      const Demapper demapper = MakeDemapper(mapper, method);
      for (std::size_t n : std::vector<std::size_t>{0, 1, 3, 7, 31, 32, 33, 63, 64, 65, 129}) {
        const std::vector<cf32> y = RandomReceived(mapper, 0.5, n, rng);
        std::vector<float> llrs(n * m, NAN);
        demapper.Demap(y, 0.5f, llrs);
        for (float v : llrs) ASSERT_TRUE(std::isfinite(v)) << word << " n = " << n;
        std::vector<Bit> bits(n * m, 7);
        demapper.HardDecide(y, bits);
        for (Bit b : bits) ASSERT_LE(b, 1) << word << " n = " << n;
      }
    }
  }
}

// A subspan with an odd start (not 16-byte aligned) gives the same values.
TEST(Demapper, MisalignedSpansGiveTheSameLlrs) {
  std::mt19937_64 rng(17);
  for (const char* word : {"16qam", "64qam", "8psk"}) {
    const Mapper mapper = MakeMapper(word);
    const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
    const Demapper demapper = MakeDemapper(mapper, DemapMethod::kLogMap);
    const std::vector<cf32> y = RandomReceived(mapper, 0.5, 101, rng);
    std::vector<float> whole(y.size() * m);
    demapper.Demap(y, 0.5f, whole);
    std::vector<float> shifted(y.size() * m + 1, NAN);
    demapper.Demap(std::span<const cf32>(y).subspan(1), 0.5f,
                   std::span<float>(shifted).subspan(1, (y.size() - 1) * m));
    for (std::size_t i = 0; i < (y.size() - 1) * m; ++i) {
      ASSERT_EQ(shifted[1 + i], whole[m + i]) << word << " index " << i;
    }
  }
}

TEST(LlrToBits, BitIsOneExactlyForNegativeLlrs) {
  const std::vector<float> llrs = {-1.0f,
                                   0.0f,
                                   1.0f,
                                   -1e-30f,
                                   -0.0f,
                                   std::numeric_limits<float>::infinity(),
                                   -std::numeric_limits<float>::infinity()};
  std::vector<Bit> bits(llrs.size(), 7);
  LlrToBits(llrs, bits);
  EXPECT_EQ(bits, (std::vector<Bit>{1, 0, 0, 1, 0, 0, 1}));
}

TEST(ParseDemapMethod, AcceptsTheWordsAndRoundTrips) {
  for (DemapMethod method : {DemapMethod::kHard, DemapMethod::kMaxLog, DemapMethod::kLogMap}) {
    const Result<DemapMethod> r = ParseDemapMethod(ToString(method));
    ASSERT_TRUE(r.ok());
    EXPECT_EQ(r.value(), method);
  }
  EXPECT_EQ(ToString(DemapMethod::kHard), "hard");
  EXPECT_EQ(ToString(DemapMethod::kMaxLog), "maxlog");
  EXPECT_EQ(ToString(DemapMethod::kLogMap), "logmap");
  EXPECT_EQ(DemapMethodChoices(), "hard, maxlog, logmap");
}

TEST(ParseDemapMethod, UnknownWordListsTheValidWords) {
  const Result<DemapMethod> r = ParseDemapMethod("soft");
  ASSERT_FALSE(r.ok());
  EXPECT_EQ(r.status().message(), "unknown demap method 'soft'; valid: hard, maxlog, logmap");
}

TEST(Demapper, ReportsItsConfiguration) {
  const Mapper mapper = MakeMapper("64qam");
  const Demapper demapper = MakeDemapper(mapper, DemapMethod::kLogMap);
  EXPECT_EQ(demapper.method(), DemapMethod::kLogMap);
  EXPECT_EQ(demapper.bits_per_symbol(), 6);
}

}  // namespace
}  // namespace capgap
