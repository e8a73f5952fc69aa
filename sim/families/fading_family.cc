// Fading channels: one maker for the three laws (the spec carries the law).
#include "sim/families/fading_family.h"

#include <memory>

#include "blocks/channel/fading_channel.h"

namespace capgap {
namespace {

std::unique_ptr<const Channel> MakeFading(const NoiseSpec& noise, const ChannelSpec& channel) {
  return std::make_unique<const FadingChannel>(FadingChannel::Create(noise, channel).value());
}

}  // namespace

const ChannelFamily kRayleighFamily = {"rayleigh", &MakeFading};
const ChannelFamily kRicianFamily = {"rician", &MakeFading};
const ChannelFamily kNakagamiFamily = {"nakagami", &MakeFading};

}  // namespace capgap
