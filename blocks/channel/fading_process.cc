// Fading gains: independent draws by the Gaussian kernel or Marsaglia-Tsang,
// block holding, and the sum-of-sinusoids Doppler process (fading_process.h).
#include "blocks/channel/fading_process.h"

#include <algorithm>
#include <cmath>
#include <numbers>
#include <string>

#include <boost/math/special_functions/gamma.hpp>

#include "blocks/kernels/awgn_kernels.h"

namespace capgap {
namespace {

constexpr double kTwoPi = 2.0 * std::numbers::pi;

// Uniform in (0, 1) from a 32-bit word.
double Uniform32(std::uint32_t w) { return (static_cast<double>(w) + 0.5) * 0x1p-32; }

// Standard normal from words 0-2 of a block (Box-Muller, 64-bit radius
// uniform as in awgn_kernels.h), scalar double: target-independent.
double NormalOfBlock(const PhiloxBlock& b) {
  const double u1 =
      (static_cast<double>((static_cast<std::uint64_t>(b[1]) << 32) | b[0]) + 0.5) * 0x1p-64;
  return std::sqrt(-2.0 * std::log(u1)) * std::cos(kTwoPi * Uniform32(b[2]));
}

// Per branch and sinusoid, per quadrature: angular frequency, phase, the
// running phasor (re, im) and its rotation per symbol (re, im).
constexpr std::size_t kSosFields = 6;

// Marsaglia-Tsang: for shape a >= 1, d = a - 1/3, c = 1/sqrt(9 d); accept
// v = (1 + c z)^3 > 0 when ln u < z^2/2 + d - d v + d ln v; Gamma(a) = d v.
// Shape m < 1: Gamma(m + 1) u^(1/m). Returns |h|^2 = Gamma(m) / m.
float DrawNakagamiPower(double m, RngStream& stream, double boost_uniform) {
  const double a = m < 1.0 ? m + 1.0 : m;
  const double d = a - 1.0 / 3.0;
  const double c = 1.0 / std::sqrt(9.0 * d);
  for (;;) {
    const PhiloxBlock b = stream.NextBlock();
    const double z = NormalOfBlock(b);
    const double v0 = 1.0 + c * z;
    if (v0 <= 0.0) continue;
    const double v = v0 * v0 * v0;
    const double u = Uniform32(b[3]);
    if (std::log(u) < 0.5 * z * z + d - d * v + d * std::log(v)) {
      double g = d * v;
      if (m < 1.0) g *= std::pow(boost_uniform, 1.0 / m);
      return static_cast<float>(g / m);
    }
  }
}

// Boost.Math without exceptions (nothing throws across the block API); the
// arguments below stay inside the functions' domains.
using NoThrow = boost::math::policies::policy<
    boost::math::policies::domain_error<boost::math::policies::ignore_error>,
    boost::math::policies::overflow_error<boost::math::policies::ignore_error>,
    boost::math::policies::evaluation_error<boost::math::policies::ignore_error>>;

// Memoryless map of a Rayleigh power p ~ Exp(1) to a Nakagami-m power
// Gamma(m, 1/m) with the same CDF value: F_exp(p) = 1 - e^-p, then the
// inverse regularised incomplete gamma; the lower function below the median
// of Exp(1) and the upper one above, so neither argument loses digits near 1.
double ExpPowerToNakagami(double p, double m) {
  if (p <= std::numbers::ln2) {
    return boost::math::gamma_p_inv(m, -std::expm1(-p), NoThrow()) / m;
  }
  return boost::math::gamma_q_inv(m, std::exp(-p), NoThrow()) / m;
}

}  // namespace

FadingProcess::FadingProcess(const ChannelSpec& spec) : spec_(spec) {
  if (spec.law == FadingLaw::kRician) {
    const double k = std::isinf(spec.rician_k_db) && spec.rician_k_db < 0
                         ? 0.0
                         : std::pow(10.0, spec.rician_k_db / 10.0);
    los_ = std::sqrt(k / (k + 1.0));
    scatter_ = std::sqrt(1.0 / (k + 1.0));
  }
}

Result<FadingProcess> FadingProcess::Create(const ChannelSpec& spec) {
  if (spec.branches < 1 || spec.branches > 64) {
    return Status::Error("branches = " + std::to_string(spec.branches) + ": must be in [1, 64]");
  }
  if (spec.time == FadingTime::kBlock && spec.coherence_symbols < 1) {
    return Status::Error("coherence_symbols = 0: must be >= 1");
  }
  if (spec.time == FadingTime::kDoppler && !(spec.doppler > 0.0 && spec.doppler <= 0.5)) {
    return Status::Error("doppler = " + std::to_string(spec.doppler) + ": must be in (0, 0.5]");
  }
  if (spec.law == FadingLaw::kNakagami) {
    if (!(spec.nakagami_m >= 0.5 && spec.nakagami_m <= 1e4)) {
      return Status::Error("nakagami_m = " + std::to_string(spec.nakagami_m) +
                           ": must be in [0.5, 10000]");
    }
  }
  if (spec.law == FadingLaw::kRician && !(spec.rician_k_db < 100.0)) {
    return Status::Error("rician_k_db = " + std::to_string(spec.rician_k_db) +
                         ": must be < 100 dB or -inf");
  }
  return FadingProcess(spec);
}

void FadingProcess::DrawIndependent(std::span<cf32> gains, RngStream& stream) const {
  switch (spec_.law) {
    case FadingLaw::kAwgn:
      std::fill(gains.begin(), gains.end(), cf32(1.0f, 0.0f));
      return;
    case FadingLaw::kRayleigh:
    case FadingLaw::kRician: {
      // std::complex<float> is array-compatible with float[2].
      FillStandardNormal(std::span<float>(reinterpret_cast<float*>(gains.data()), 2 * gains.size()),
                         stream);
      float a = 0, b = 0;
      GaussianGainAffine(a, b);
      for (cf32& h : gains) h = cf32(a + b * h.real(), b * h.imag());
      return;
    }
    case FadingLaw::kNakagami:
      for (cf32& h : gains) {
        const PhiloxBlock head = stream.NextBlock();
        const double phase = kTwoPi * Uniform32(head[0]);
        const double power =
            DrawNakagamiPower(spec_.nakagami_m, stream, Uniform32(head[1]));
        const double amp = std::sqrt(power);
        h = cf32(static_cast<float>(amp * std::cos(phase)), static_cast<float>(amp * std::sin(phase)));
      }
      return;
  }
}

void FadingProcess::StartDoppler(RngStream& stream, ChannelProcessState& state) const {
  const auto l_count = static_cast<std::size_t>(spec_.branches);
  const std::size_t per_branch = 2 * kSinusoids * kSosFields;
  state.sos.resize(l_count * per_branch);
  const double wd = kTwoPi * spec_.doppler;
  for (std::size_t l = 0; l < l_count; ++l) {
    const double theta = kTwoPi * Uniform32(stream.NextBlock()[0]) - std::numbers::pi;
    double* s = state.sos.data() + l * per_branch;
    for (int n = 1; n <= kSinusoids; ++n) {
      const double alpha = (kTwoPi * n - std::numbers::pi + theta) / (4.0 * kSinusoids);
      for (int q = 0; q < 2; ++q) {
        double* f = s + (static_cast<std::size_t>(2 * (n - 1) + q)) * kSosFields;
        f[0] = wd * (q == 0 ? std::cos(alpha) : std::sin(alpha));
        f[1] = kTwoPi * Uniform32(stream.NextBlock()[0]);
        f[2] = std::cos(f[1]);
        f[3] = std::sin(f[1]);
        f[4] = std::cos(f[0]);
        f[5] = std::sin(f[0]);
      }
    }
  }
}

void FadingProcess::DopplerGains(std::size_t n, std::span<cf32> gains,
                                 ChannelProcessState& state) const {
  const auto l_count = static_cast<std::size_t>(spec_.branches);
  const std::size_t per_branch = 2 * kSinusoids * kSosFields;
  // h = (h_I + j h_Q) / sqrt 2 with h_I, h_Q = sqrt(2/M) sum cos(...): the
  // factor is 1/sqrt(M) on each sum; Rician scales it and adds the LOS.
  const double scale = scatter_ / std::sqrt(static_cast<double>(kSinusoids));
  for (std::size_t i = 0; i < n; ++i) {
    const std::uint64_t k = state.symbol + i;
    const bool resync = k % kResyncSymbols == 0;
    for (std::size_t l = 0; l < l_count; ++l) {
      double* s = state.sos.data() + l * per_branch;
      double sum[2] = {0.0, 0.0};
      for (std::size_t j = 0; j < 2 * static_cast<std::size_t>(kSinusoids); ++j) {
        double* f = s + j * kSosFields;
        if (resync) {
          const double arg = f[0] * static_cast<double>(k) + f[1];
          f[2] = std::cos(arg);
          f[3] = std::sin(arg);
        }
        sum[j & 1] += f[2];
        const double re = f[2] * f[4] - f[3] * f[5];
        const double im = f[2] * f[5] + f[3] * f[4];
        f[2] = re;
        f[3] = im;
      }
      double re = los_ + scale * sum[0], im = scale * sum[1];
      if (spec_.law == FadingLaw::kNakagami) {
        // Same phase, power mapped from Exp(1) to Gamma(m, 1/m).
        const double p = re * re + im * im;
        const double q = ExpPowerToNakagami(p, spec_.nakagami_m);
        if (p > 0.0) {
          const double a = std::sqrt(q / p);
          re *= a;
          im *= a;
        } else {
          re = std::sqrt(q);
        }
      }
      gains[l * n + i] = cf32(static_cast<float>(re), static_cast<float>(im));
    }
  }
}

void FadingProcess::Generate(std::size_t n, std::span<cf32> gains, RngStream& stream,
                             ChannelProcessState& state) const {
  const auto l_count = static_cast<std::size_t>(spec_.branches);
  CAPGAP_DCHECK(gains.size() >= n * l_count);
  switch (spec_.time) {
    case FadingTime::kFast:
      DrawIndependent(gains.first(n * l_count), stream);
      break;
    case FadingTime::kBlock: {
      state.held.resize(l_count);
      const std::uint64_t c = spec_.coherence_symbols;
      std::size_t i = 0;
      while (i < n) {
        const std::uint64_t k = state.symbol + i;
        if (!state.started || k % c == 0) {
          DrawIndependent(state.held, stream);
          state.started = true;
        }
        const std::size_t run = std::min<std::uint64_t>(n - i, c - k % c);
        for (std::size_t l = 0; l < l_count; ++l) {
          std::fill_n(gains.begin() + static_cast<std::ptrdiff_t>(l * n + i), run, state.held[l]);
        }
        i += run;
      }
      break;
    }
    case FadingTime::kDoppler:
      if (!state.started) {
        StartDoppler(stream, state);
        state.started = true;
      }
      DopplerGains(n, gains, state);
      break;
  }
  state.symbol += n;
}

}  // namespace capgap
