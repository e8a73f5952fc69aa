// Channels `rayleigh`, `rician`, `nakagami`: flat fading with receive
// diversity (blocks/channel/fading_channel.h); their keys are the channel
// keys of sim/families/channel_keys.h. Registry entries (registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_FADING_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_FADING_FAMILY_H_

#include "sim/chain/registry.h"

namespace capgap {

extern const ChannelFamily kRayleighFamily;
extern const ChannelFamily kRicianFamily;
extern const ChannelFamily kNakagamiFamily;

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_FADING_FAMILY_H_
