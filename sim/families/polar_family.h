// Code family `polar`: polar codes with reliability construction, rate
// matching, CRC, SC / CRC-aided SCL decoding; its registry entry
// (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_POLAR_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_POLAR_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kPolarFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_POLAR_FAMILY_H_
