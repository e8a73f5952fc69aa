// Fading channel: gains, per-branch noise, MRC or selection combining.
#include "blocks/channel/fading_channel.h"

#include <algorithm>

#include "blocks/kernels/awgn_kernels.h"

namespace capgap {

Result<FadingChannel> FadingChannel::Create(const NoiseSpec& noise, const ChannelSpec& spec) {
  if (noise.samples_per_symbol != 1) {
    return Status::Error("fading channels run at one sample per symbol (no pulse shaping)");
  }
  auto process = FadingProcess::Create(spec);
  if (!process.ok()) return process.status();
  return FadingChannel(ComputeNoiseLevel(noise), std::move(process).value());
}

void FadingChannel::ApplyReal(std::span<float> samples, RngStream& noise) const {
  // Never called (additive_only() is false); keep it well defined: AWGN.
  AddRealNoise(samples, static_cast<float>(level_.sigma_per_dim), noise);
}

void FadingChannel::Apply(std::span<cf32> samples, int samples_per_symbol, RngStream& noise,
                          RngStream& process, ChannelStateStorage storage,
                          ChannelStateView& state) const {
  CAPGAP_DCHECK(samples_per_symbol == 1);
  (void)samples_per_symbol;
  CAPGAP_DCHECK(storage.process != nullptr);
  CAPGAP_DCHECK(storage.n0.size() >= samples.size());
  ChannelProcessState& ps = *storage.process;
  const std::size_t n = samples.size();
  const auto l_count = static_cast<std::size_t>(process_.branches());
  if (ps.gains.size() < n * l_count) ps.gains.resize(n * l_count);
  process_.Generate(n, ps.gains, process, ps);
  const cf32* h = ps.gains.data();
  const float n0 = static_cast<float>(level_.n0);
  const auto sigma = static_cast<float>(level_.sigma_per_dim);
  float* n0_out = storage.n0.data();
  cf32* x = samples.data();
  // Smallest combined gain used: a gain of exactly 0 (probability 0 in
  // theory, possible in float) would divide by zero.
  constexpr float kMinGain = 1e-30f;
  if (l_count == 1) {
    // r = h x + n, then z = h* r / |h|^2 in place.
    for (std::size_t i = 0; i < n; ++i) x[i] *= h[i];
    AddComplexNoise(samples, sigma, noise);
    for (std::size_t i = 0; i < n; ++i) {
      const float g = std::max(std::norm(h[i]), kMinGain);
      const float inv = 1.0f / g;
      x[i] = std::conj(h[i]) * x[i] * inv;
      n0_out[i] = n0 * inv;
    }
  } else {
    if (ps.branch.size() < n * l_count) ps.branch.resize(n * l_count);
    cf32* r = ps.branch.data();
    for (std::size_t l = 0; l < l_count; ++l) {
      for (std::size_t i = 0; i < n; ++i) r[l * n + i] = h[l * n + i] * x[i];
    }
    AddComplexNoise(std::span<cf32>(r, n * l_count), sigma, noise);
    const bool mrc = process_.spec().combining == Combining::kMrc;
    for (std::size_t i = 0; i < n; ++i) {
      cf32 num(0.0f, 0.0f);
      float g = 0.0f;
      if (mrc) {
        for (std::size_t l = 0; l < l_count; ++l) {
          num += std::conj(h[l * n + i]) * r[l * n + i];
          g += std::norm(h[l * n + i]);
        }
      } else {
        std::size_t best = 0;
        float best_g = std::norm(h[i]);
        for (std::size_t l = 1; l < l_count; ++l) {
          const float gl = std::norm(h[l * n + i]);
          if (gl > best_g) {
            best_g = gl;
            best = l;
          }
        }
        num = std::conj(h[best * n + i]) * r[best * n + i];
        g = best_g;
      }
      const float inv = 1.0f / std::max(g, kMinGain);
      x[i] = num * inv;
      n0_out[i] = n0 * inv;
    }
  }
  state = ChannelStateView{{}, std::span<const float>(n0_out, n), n0};
}

}  // namespace capgap
