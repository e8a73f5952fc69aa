// Channel `awgn`: additive white Gaussian noise (blocks/channel/awgn_channel.h).
#include "sim/families/awgn_family.h"

#include <memory>

#include "blocks/channel/awgn_channel.h"

namespace capgap {
namespace {

std::unique_ptr<const Channel> MakeAwgn(const NoiseSpec& spec) {
  return std::make_unique<const AwgnChannel>(spec);
}

}  // namespace

const ChannelFamily kAwgnFamily = {"awgn", /*additive_only=*/true, &MakeAwgn};

}  // namespace capgap
