// Code family `turbo`: parallel concatenated RSC codes with QPP or S-random
// interleaving, termination, puncturing and iterative max-log-MAP / log-MAP
// decoding (blocks/fec/turbo_*.h); its registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_TURBO_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_TURBO_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kTurboFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_TURBO_FAMILY_H_
