// The channel keys of [scheme.NAME]: the fading law and its parameters, the
// time variation, receive diversity and the interleaver between encoder and
// mapper (blocks/channel/channel_spec.h). One key table per group, read into
// SchemeConfig::channel and ::interleaver by ParseChannelKeys, which also
// makes the checks that span keys (fading needs an unshaped chain, an
// interleaver needs a code, Nakagami has no Doppler process).
#ifndef CAPGAP_SIM_FAMILIES_CHANNEL_KEYS_H_
#define CAPGAP_SIM_FAMILIES_CHANNEL_KEYS_H_

#include <span>
#include <string>

#include "blocks/core/status.h"
#include "sim/config/config.h"
#include "sim/config/key_table.h"

namespace capgap {

// Tables: "channel" (always), "fading" (only with a fading law),
// "interleaver" (always).
std::span<const KeyTable> ChannelKeyTables();

// Reads the validated keys into s.channel and s.interleaver. REQUIRES: s.code
// and s.shaping already read.
Status ParseChannelKeys(const ResolvedKeys& k, SchemeConfig& s);

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_CHANNEL_KEYS_H_
