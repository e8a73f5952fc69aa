// Channel `awgn`: additive white Gaussian noise (blocks/channel/awgn_channel.h);
// with branches > 1, L unfaded branches combined by the fading channel block
// (blocks/channel/fading_channel.h, gains 1).
#include "sim/families/awgn_family.h"

#include <memory>

#include "blocks/channel/awgn_channel.h"
#include "blocks/channel/fading_channel.h"

namespace capgap {
namespace {

std::unique_ptr<const Channel> MakeAwgn(const NoiseSpec& noise, const ChannelSpec& channel) {
  if (channel.branches == 1) return std::make_unique<const AwgnChannel>(noise);
  return std::make_unique<const FadingChannel>(FadingChannel::Create(noise, channel).value());
}

}  // namespace

const ChannelFamily kAwgnFamily = {"awgn", &MakeAwgn};

}  // namespace capgap
