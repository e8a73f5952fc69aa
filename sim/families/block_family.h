// Code family `block`: short binary linear block codes with exhaustive
// maximum-likelihood soft decoding; its registry entry
// (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_BLOCK_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_BLOCK_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kBlockFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_BLOCK_FAMILY_H_
