// Constellations `bpsk`, `qpsk`, `<M>psk`, `<M>qam`: Gray PSK and square
// QAM, their registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_PSK_QAM_CONSTELLATION_H_
#define CAPGAP_SIM_FAMILIES_PSK_QAM_CONSTELLATION_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const ConstellationFamily kPskQamConstellation;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_PSK_QAM_CONSTELLATION_H_
