// Code family `none`: uncoded schemes (frame_bits information bits sent as
// they are).
#include <memory>

#include "blocks/fec/uncoded_code.h"
#include "sim/families/families.h"

namespace capgap {

Result<std::shared_ptr<const ChannelCode>> BuildUncoded(const SchemeConfig& scheme,
                                                        const std::string& /*key_prefix*/) {
  return std::shared_ptr<const ChannelCode>(std::make_shared<UncodedCode>(scheme.frame_bits));
}

}  // namespace capgap
