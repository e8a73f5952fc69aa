// Every compiled Highway target of the demap kernels (demap_kernels-inl.h)
// against the scalar oracle of demap_reference.h, bit for bit: max-log and
// log-MAP LLRs, +-1 hard "LLRs" and hard bits, for every constellation the
// mapper makes (BPSK, QPSK, 8..64-PSK, 4..1024-QAM), on lengths 1, 3, 7,
// N-1, N, N+1 (N = the target's float lanes) and a long odd run, with
// misaligned input and output starts and a guard word after the outputs; and
// on saturating inputs (huge |y|, y = 0, tiny and huge N0). This file is
// compiled once per target (hwy/foreach_target.h) with -ffp-contract=off, as
// the library's kernels are. The demapper-level tests
// (tests/blocks/mapping/demapper_test.cc) check the oracle's values against a
// double-precision brute force; this file reaches every target the CPU runs.
#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <random>
#include <string>
#include <vector>

#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/blocks/kernels/demap_kernels_test.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
#include "hwy/highway.h"
#include "blocks/kernels/demap_kernels-inl.h"

HWY_BEFORE_NAMESPACE();
namespace capgap::HWY_NAMESPACE {
void SoftUnderTest(const DemapKernelArgs& a, bool exact, const float* y, std::size_t n, float n0,
                   float* out) {
  DemapSoftKernel(a, exact, y, n, n0, out);
}
void HardUnderTest(const DemapKernelArgs& a, const float* y, std::size_t n, float* signs,
                   Bit* bits) {
  DemapHardKernel(a, y, n, signs, bits);
}
std::size_t FloatLanesUnderTest() { return hwy::HWY_NAMESPACE::Lanes(hwy::HWY_NAMESPACE::ScalableTag<float>()); }
}  // namespace capgap::HWY_NAMESPACE
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include <gtest/gtest.h>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/demap_reference.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"
#include "hwy/tests/hwy_gtest.h"

namespace capgap {
namespace {

HWY_EXPORT(SoftUnderTest);
HWY_EXPORT(HardUnderTest);
HWY_EXPORT(FloatLanesUnderTest);

const char* const kWords[] = {"bpsk", "qpsk",  "8psk",  "16psk",  "32psk",  "64psk",
                              "4qam", "16qam", "64qam", "256qam", "1024qam"};

struct Constellation {
  Mapper mapper;
  Demapper demapper;
};
Constellation Make(const char* word) {
  Mapper mapper = Mapper::Create(ParseModulation(word).value()).value();
  Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
  return {std::move(mapper), std::move(demapper)};
}

std::vector<std::size_t> Lengths() {
  const std::size_t n = HWY_DYNAMIC_DISPATCH(FloatLanesUnderTest)();
  return {1, 3, 7, n - 1, n, n + 1, 2 * n + 3, 1001};
}

// Noisy constellation points (so every metric and label matters) and a few
// random far-off values.
std::vector<float> Received(const Mapper& mapper, std::size_t n, float sigma, std::mt19937& rng) {
  std::vector<float> y(2 * n);
  std::uniform_int_distribution<std::size_t> pick(0, mapper.points().size() - 1);
  std::normal_distribution<float> noise(0.0f, sigma);
  std::uniform_real_distribution<float> far(-4.0f, 4.0f);
  for (std::size_t s = 0; s < n; ++s) {
    const cf32 x = mapper.points()[pick(rng)];
    const bool outlier = s % 17 == 5;
    y[2 * s] = outlier ? far(rng) : x.real() + noise(rng);
    y[2 * s + 1] = outlier ? far(rng) : x.imag() + noise(rng);
  }
  return y;
}

template <typename T>
bool SameBits(const T* a, const T* b, std::size_t n, std::string* where) {
  for (std::size_t i = 0; i < n; ++i) {
    if (std::memcmp(a + i, b + i, sizeof(T)) != 0) {
      *where = "output " + std::to_string(i) + ": " + std::to_string(static_cast<double>(a[i])) +
               " vs oracle " + std::to_string(static_cast<double>(b[i]));
      return false;
    }
  }
  return true;
}

constexpr float kGuard = -12345.5f;

// Runs every kernel on y (n symbols, starting `in_off` floats into a buffer)
// into outputs starting `out_off` elements in, and compares with the oracle.
void CheckAll(const DemapKernelArgs& args, const std::vector<float>& y, std::size_t n, float n0,
              std::size_t in_off, std::size_t out_off, const std::string& label) {
  const std::size_t m = static_cast<std::size_t>(args.bits_per_symbol) * n;
  std::vector<float> in(in_off + 2 * n);
  std::copy(y.begin(), y.begin() + static_cast<std::ptrdiff_t>(2 * n), in.begin() +
                                                                         static_cast<std::ptrdiff_t>(in_off));
  const float* yp = in.data() + in_off;
  std::string where;
  for (int method = 0; method < 3; ++method) {  // max-log, log-MAP, +-1 signs
    std::vector<float> got(out_off + m + 1, kGuard), want(m, kGuard);
    if (method < 2) {
      HWY_DYNAMIC_DISPATCH(SoftUnderTest)(args, method == 1, yp, n, n0, got.data() + out_off);
      reference::DemapSoft(args, method == 1, yp, n, n0, want.data());
    } else {
      HWY_DYNAMIC_DISPATCH(HardUnderTest)(args, yp, n, got.data() + out_off, nullptr);
      reference::DemapHard(args, yp, n, want.data(), nullptr);
    }
    EXPECT_TRUE(SameBits(got.data() + out_off, want.data(), m, &where))
        << label << " method " << method << ": " << where;
    EXPECT_EQ(got[out_off + m], kGuard) << label << " method " << method << ": wrote past the end";
    for (std::size_t i = 0; i < out_off; ++i) EXPECT_EQ(got[i], kGuard) << label;
  }
  std::vector<Bit> got_bits(out_off + m + 1, Bit{7}), want_bits(m, Bit{7});
  HWY_DYNAMIC_DISPATCH(HardUnderTest)(args, yp, n, nullptr, got_bits.data() + out_off);
  reference::DemapHard(args, yp, n, nullptr, want_bits.data());
  EXPECT_TRUE(SameBits(got_bits.data() + out_off, want_bits.data(), m, &where))
      << label << " bits: " << where;
  EXPECT_EQ(got_bits[out_off + m], Bit{7}) << label << " bits: wrote past the end";
}

class DemapKernelPerTarget : public hwy::TestWithParamTarget {};
HWY_TARGET_INSTANTIATE_TEST_SUITE_P(DemapKernelPerTarget);

TEST_P(DemapKernelPerTarget, EveryConstellationMatchesOracleBitForBit) {
  std::mt19937 rng(20261204u);
  for (const char* word : kWords) {
    const Constellation c = Make(word);
    const DemapKernelArgs args = c.demapper.kernel_args();
    for (const std::size_t n : Lengths()) {
      for (const float n0 : {0.02f, 0.3f, 2.0f}) {
        const std::vector<float> y = Received(c.mapper, n, std::sqrt(n0 / 2.0f), rng);
        for (const std::size_t in_off : {0u, 1u, 3u}) {
          for (const std::size_t out_off : {0u, 1u}) {
            CheckAll(args, y, n, n0, in_off, out_off,
                     std::string(word) + " n=" + std::to_string(n) + " n0=" + std::to_string(n0) +
                         " in+" + std::to_string(in_off) + " out+" + std::to_string(out_off));
          }
        }
      }
    }
  }
}

// Extreme values: the metrics overflow to infinities (huge |y|, tiny N0),
// vanish (y = 0: every metric ties in magnitude, signed zeros), or the LLRs
// underflow (huge N0). Whatever the oracle gives, NaN included, every target
// must give the same bits.
TEST_P(DemapKernelPerTarget, SaturatingInputsMatchOracleBitForBit) {
  const float values[] = {0.0f, -0.0f, 1e-30f, -1e-30f, 1e18f, -1e18f, 3e30f, -3e30f, 1e38f, -1e38f,
                          0.7f, -0.7f};
  constexpr std::size_t kV = sizeof(values) / sizeof(values[0]);
  std::vector<float> y;  // every pair (re, im)
  for (std::size_t i = 0; i < kV; ++i) {
    for (std::size_t j = 0; j < kV; ++j) {
      y.push_back(values[i]);
      y.push_back(values[j]);
    }
  }
  const std::size_t n = y.size() / 2;  // 144 symbols
  for (const char* word : kWords) {
    const Constellation c = Make(word);
    for (const float n0 : {1e-30f, 1e-3f, 1.0f, 1e30f}) {
      CheckAll(c.demapper.kernel_args(), y, n, n0, 1, 1,
               std::string(word) + " saturating n0=" + std::to_string(n0));
    }
  }
}

// The public entry points: the dispatched target, and the oracle when the
// scalar kernels are forced (then the reported target is SCALAR).
TEST(DemapKernels, PublicEntryPointsMatchOracleOnBothPaths) {
  std::mt19937 rng(7u);
  for (const char* word : kWords) {
    const Constellation c = Make(word);
    const DemapKernelArgs args = c.demapper.kernel_args();
    const std::size_t n = 333;
    const std::size_t m = static_cast<std::size_t>(args.bits_per_symbol) * n;
    const std::vector<float> y = Received(c.mapper, n, 0.3f, rng);
    for (const bool scalar : {false, true}) {
      const bool before = ForceScalarKernels(scalar);
      if (scalar) {
        EXPECT_STREQ(DemapKernelTarget(), "SCALAR");
      } else {
        EXPECT_STREQ(DemapKernelTarget(), NoiseKernelTarget());
      }
      for (const bool exact : {false, true}) {
        std::vector<float> got(m), want(m);
        DemapSoft(args, exact, y.data(), n, 0.2f, got.data());
        reference::DemapSoft(args, exact, y.data(), n, 0.2f, want.data());
        std::string where;
        EXPECT_TRUE(SameBits(got.data(), want.data(), m, &where)) << word << ": " << where;
      }
      std::vector<Bit> got_bits(m), want_bits(m);
      DemapHard(args, y.data(), n, nullptr, got_bits.data());
      reference::DemapHard(args, y.data(), n, nullptr, want_bits.data());
      EXPECT_EQ(got_bits, want_bits) << word;
      ForceScalarKernels(before);
    }
  }
}

}  // namespace
}  // namespace capgap
#endif  // HWY_ONCE
