// Fading channel: gains, per-branch noise, MRC or selection combining.
#include "blocks/channel/fading_channel.h"

#include <algorithm>
#include <string>

#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/fading_kernels.h"
#include "blocks/kernels/fading_reference.h"

namespace capgap {

Result<FadingChannel> FadingChannel::Create(const NoiseSpec& noise, const ChannelSpec& spec) {
  if (noise.samples_per_symbol != 1 && spec.branches != 1) {
    return Status::Error("branches = " + std::to_string(spec.branches) +
                         " with pulse shaping: shaped chains fade with one branch only");
  }
  auto process = FadingProcess::Create(spec);
  if (!process.ok()) return process.status();
  return FadingChannel(ComputeNoiseLevel(noise), std::move(process).value());
}

void FadingChannel::ApplyReal(std::span<float> samples, RngStream& noise) const {
  // Never called (additive_only() is false); keep it well defined: AWGN.
  AddRealNoise(samples, static_cast<float>(level_.sigma_per_dim), noise);
}

bool FadingChannel::counts_qam16() const {
  const ChannelSpec& c = process_.spec();
  return c.branches == 1 && c.time == FadingTime::kFast &&
         (c.law == FadingLaw::kRayleigh || c.law == FadingLaw::kRician) && FadingQam16Fused();
}

std::uint64_t FadingChannel::CountQam16Errors(const Bit* bits, std::size_t n_symbols,
                                              const Qam16Decider& d, RngStream& noise,
                                              RngStream& process,
                                              ChannelStateStorage storage) const {
  CAPGAP_DCHECK(counts_qam16() && storage.process != nullptr);
  ChannelProcessState& ps = *storage.process;
  if (ps.gains.size() < n_symbols) ps.gains.resize(n_symbols);
  if (ps.branch.size() < n_symbols) ps.branch.resize(n_symbols);
  const std::span<float> g(reinterpret_cast<float*>(ps.gains.data()), 2 * n_symbols);
  const std::span<float> z(reinterpret_cast<float*>(ps.branch.data()), 2 * n_symbols);
  // The draws of Apply in its order: the gains' normals (FadingProcess's
  // fast draw), then the noise's (AddComplexNoise takes the same normals).
  FillStandardNormal(g, process);
  ps.symbol += n_symbols;
  FillStandardNormal(z, noise);
  float a = 0, b = 0;
  process_.GaussianGainAffine(a, b);
  return FadingQam16Errors(bits, g.data(), z.data(), n_symbols, a, b,
                           static_cast<float>(level_.sigma_per_dim),
                           static_cast<float>(level_.n0), d);
}

void FadingChannel::FadeSymbols(std::span<cf32> symbols, RngStream& process,
                                ChannelStateStorage storage) const {
  CAPGAP_DCHECK(process_.branches() == 1);
  CAPGAP_DCHECK(storage.process != nullptr);
  CAPGAP_DCHECK(storage.gain.size() >= symbols.size());
  const std::size_t n = symbols.size();
  process_.Generate(n, storage.gain, process, *storage.process);
  float* xf = reinterpret_cast<float*>(symbols.data());
  FadingMultiplyGain(reinterpret_cast<const float*>(storage.gain.data()), xf, xf, n);
}

void FadingChannel::EqualiseSymbols(std::span<cf32> symbols, std::span<const cf32> gains,
                                    std::span<float> n0_out, ChannelStateView& state) const {
  const std::size_t n = symbols.size();
  CAPGAP_DCHECK(gains.size() >= n && n0_out.size() >= n);
  const float n0 = static_cast<float>(level_.n0);
  FadingEqualiseOne(reinterpret_cast<const float*>(gains.data()),
                    reinterpret_cast<float*>(symbols.data()), n0, n0_out.data(), n);
  state = ChannelStateView{{}, std::span<const float>(n0_out.data(), n), n0};
}

void FadingChannel::Apply(std::span<cf32> samples, int samples_per_symbol, RngStream& noise,
                          RngStream& process, ChannelStateStorage storage,
                          ChannelStateView& state) const {
  const auto sigma = static_cast<float>(level_.sigma_per_dim);
  if (samples_per_symbol != 1) {
    // Shaped: the gains went on before the transmit filter (FadeSymbols).
    AddComplexNoise(samples, sigma, noise);
    state = ChannelStateView{{}, {}, static_cast<float>(level_.n0)};
    return;
  }
  CAPGAP_DCHECK(storage.process != nullptr);
  CAPGAP_DCHECK(storage.n0.size() >= samples.size());
  ChannelProcessState& ps = *storage.process;
  const std::size_t n = samples.size();
  const auto l_count = static_cast<std::size_t>(process_.branches());
  if (ps.gains.size() < n * l_count) ps.gains.resize(n * l_count);
  process_.Generate(n, ps.gains, process, ps);
  const cf32* h = ps.gains.data();
  const float n0 = static_cast<float>(level_.n0);
  float* n0_out = storage.n0.data();
  cf32* x = samples.data();
  // The complex arithmetic runs in the fading kernels (bit-identical to
  // their scalar oracle on every target); selection stays scalar here.
  float* xf = reinterpret_cast<float*>(x);
  const float* hf = reinterpret_cast<const float*>(h);
  if (l_count == 1) {
    // r = h x + n, then z = h* r / |h|^2 in place.
    FadingMultiplyGain(hf, xf, xf, n);
    AddComplexNoise(samples, sigma, noise);
    FadingEqualiseOne(hf, xf, n0, n0_out, n);
  } else {
    if (ps.branch.size() < n * l_count) ps.branch.resize(n * l_count);
    float* rf = reinterpret_cast<float*>(ps.branch.data());
    for (std::size_t l = 0; l < l_count; ++l) FadingMultiplyGain(hf + 2 * l * n, xf, rf + 2 * l * n, n);
    AddComplexNoise(std::span<cf32>(ps.branch.data(), n * l_count), sigma, noise);
    if (process_.spec().combining == Combining::kMrc) {
      FadingCombineMrc(hf, rf, n, l_count, n0, xf, n0_out);
    } else {
      for (std::size_t i = 0; i < n; ++i) {
        std::size_t best = 2 * i;
        float g = hf[best] * hf[best] + hf[best + 1] * hf[best + 1];
        for (std::size_t l = 1; l < l_count; ++l) {
          const std::size_t k = 2 * (l * n + i);
          const float gl = hf[k] * hf[k] + hf[k + 1] * hf[k + 1];
          if (gl > g) {
            g = gl;
            best = k;
          }
        }
        const float hr = hf[best], hi = hf[best + 1], rr = rf[best], ri = rf[best + 1];
        const float inv = 1.0f / std::max(g, reference::kMinCombinedGain);
        xf[2 * i] = (hr * rr + hi * ri) * inv;
        xf[2 * i + 1] = (hr * ri - hi * rr) * inv;
        n0_out[i] = n0 * inv;
      }
    }
  }
  state = ChannelStateView{{}, std::span<const float>(n0_out, n), n0};
}

}  // namespace capgap
