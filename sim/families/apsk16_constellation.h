// Constellation `16apsk`: 4+12 amplitude-and-phase-shift keying, its points
// and labels (as data, a generic constellation) and its registry entry
// (sim/chain/registry.cc). Geometry and labelling: apsk16_constellation.cc.
#ifndef CAPGAP_SIM_FAMILIES_APSK16_CONSTELLATION_H_
#define CAPGAP_SIM_FAMILIES_APSK16_CONSTELLATION_H_

#include "blocks/mapping/modulation.h"
#include "sim/chain/registry.h"

namespace capgap {

// Outer-to-inner ring radius ratio gamma = R2 / R1.
inline constexpr double k16ApskRingRatio = 2.85;

// The 16apsk points and labels (point i carries labels[i]), unit energy.
GenericConstellation Make16Apsk();

extern const ConstellationFamily k16ApskConstellation;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_APSK16_CONSTELLATION_H_
