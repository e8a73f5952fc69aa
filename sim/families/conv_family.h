// Code family of convolutional codes: its registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_CONV_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_CONV_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kConvFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_CONV_FAMILY_H_
