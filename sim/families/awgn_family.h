// Channel `awgn`: its registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_AWGN_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_AWGN_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const ChannelFamily kAwgnFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_AWGN_FAMILY_H_
