// AWGN channel: scales the dispatched Gaussian kernels by the noise level.
#include "blocks/channel/awgn_channel.h"

#include "blocks/kernels/awgn_kernels.h"

namespace capgap {

void AwgnChannel::AddNoise(std::span<cf32> samples, RngStream& stream) const {
  AddComplexNoise(samples, static_cast<float>(level_.sigma_per_dim), stream);
}

void AwgnChannel::AddNoiseReal(std::span<float> samples, RngStream& stream) const {
  AddRealNoise(samples, static_cast<float>(level_.sigma_per_dim), stream);
}

}  // namespace capgap
