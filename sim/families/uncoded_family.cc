// Code family `none`: uncoded schemes (frame_bits information bits sent as
// they are).
#include "sim/families/uncoded_family.h"

#include <memory>

#include "blocks/fec/uncoded_code.h"

namespace capgap {
namespace {

Result<std::shared_ptr<const ChannelCode>> BuildUncoded(const SchemeConfig& scheme,
                                                        const std::string& /*key_prefix*/,
                                                        const BuildContext& /*context*/) {
  return std::shared_ptr<const ChannelCode>(std::make_shared<UncodedCode>(scheme.frame_bits));
}

}  // namespace

const CodeFamily kUncodedFamily = {"none",   nullptr,       /*fixed_frame=*/false,
                                   /*unit_frames_multiple=*/1, nullptr, &BuildUncoded,
                                   nullptr};

}  // namespace capgap
