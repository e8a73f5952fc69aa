// Build functions of the code families and channels in the registry
// (sim/chain/registry.cc lists them). One per family file in sim/families/.
#ifndef CAPGAP_SIM_FAMILIES_FAMILIES_H_
#define CAPGAP_SIM_FAMILIES_FAMILIES_H_

#include <memory>
#include <string>

#include "blocks/channel/channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/config.h"

namespace capgap {

// sim/families/uncoded_family.cc
Result<std::shared_ptr<const ChannelCode>> BuildUncoded(const SchemeConfig& scheme,
                                                        const std::string& key_prefix);
// sim/families/conv_family.cc
Result<std::shared_ptr<const ChannelCode>> BuildConv(const SchemeConfig& scheme,
                                                     const std::string& key_prefix);
void AnalyseConv(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r);
// sim/families/ldpc_family.cc
Result<std::shared_ptr<const ChannelCode>> BuildLdpc(const SchemeConfig& scheme,
                                                     const std::string& key_prefix);
void AnalyseLdpc(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r);
// sim/families/awgn_family.cc
std::unique_ptr<const Channel> MakeAwgn(const NoiseSpec& spec);

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_FAMILIES_H_
