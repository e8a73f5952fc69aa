// Code family of no channel code: its registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_UNCODED_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_UNCODED_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kUncodedFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_UNCODED_FAMILY_H_
