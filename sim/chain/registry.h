// The registry: explicit tables of the code families, channels and
// constellations a scheme can name. The one chain (chain.h) looks a scheme's
// choice up here and never asks which family it runs; adding a family is its
// own files (blocks/ for the blocks, sim/families/ for building them from a
// scheme's keys) plus one line in a table of registry.cc.
#ifndef CAPGAP_SIM_CHAIN_REGISTRY_H_
#define CAPGAP_SIM_CHAIN_REGISTRY_H_

#include <memory>
#include <span>
#include <string>
#include <string_view>

#include "blocks/channel/channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "sim/config/config.h"

namespace capgap {
struct SchemeResult;  // sim/chain/scheme_result.h
}  // namespace capgap

namespace capgap {

// A code family, named by the scheme's `code` key.
struct CodeFamily {
  const char* name;
  // Builds the family's code for `scheme`. Every message names the full key
  // (`key_prefix` is "scheme.NAME.") with its value and the rule.
  Result<std::shared_ptr<const ChannelCode>> (*build)(const SchemeConfig& scheme,
                                                      const std::string& key_prefix);
  // Adds the family's theory, limits and code facts to a scheme's result
  // (code is what build made); nullptr: nothing to add.
  void (*analyse)(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r);
};

// A channel model. `additive_only` as Channel::additive_only() of every
// instance it makes.
struct ChannelFamily {
  const char* name;
  bool additive_only;
  std::unique_ptr<const Channel> (*make)(const NoiseSpec& spec);
};

std::span<const CodeFamily> CodeFamilies();
std::span<const ChannelFamily> ChannelFamilies();
// nullptr when no family has that name.
const CodeFamily* FindCodeFamily(std::string_view name);
const ChannelFamily* FindChannelFamily(std::string_view name);
// "none, conv, ldpc" etc., for messages and help text.
std::string CodeFamilyNames();

}  // namespace capgap

#endif  // CAPGAP_SIM_CHAIN_REGISTRY_H_
