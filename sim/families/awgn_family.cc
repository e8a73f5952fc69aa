// Channel `awgn`: additive white Gaussian noise (blocks/channel/awgn_channel.h).
#include <memory>

#include "blocks/channel/awgn_channel.h"
#include "sim/families/families.h"

namespace capgap {

std::unique_ptr<const Channel> MakeAwgn(const NoiseSpec& spec) {
  return std::make_unique<const AwgnChannel>(spec);
}

}  // namespace capgap
