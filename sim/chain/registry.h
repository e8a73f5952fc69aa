// The registry: explicit tables of the code families, channels and
// constellations a scheme can name. The chain (chain.h), the config key tables (sim/config/) and the
// analysis (scheme_result.h) look a scheme's choice up here and never ask
// which family it runs. Adding a family is its own files (blocks/ for the
// blocks, one sim/families/ file for its keys, parse, build and analysis)
// plus one line in a table of registry.cc.
#ifndef CAPGAP_SIM_CHAIN_REGISTRY_H_
#define CAPGAP_SIM_CHAIN_REGISTRY_H_

#include <atomic>
#include <cstdint>
#include <memory>
#include <span>
#include <string>
#include <string_view>

#include "blocks/channel/channel.h"
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "sim/config/config.h"
#include "sim/config/key_table.h"

namespace capgap {

struct SchemeResult;  // sim/chain/scheme_result.h

// What building a scheme's code may know about the run around it.
struct BuildContext {
  // Long constructions (PEG, an encoder's elimination) look at it often
  // enough to react within a second; once it reads true, build returns a
  // Status::Stopped. nullptr: never stops.
  const std::atomic<bool>* stop = nullptr;
  // Worker threads that will each make a workspace (memory estimates).
  int threads = 1;
  // The scheme's stream key, DeriveKey(seed, scheme name) (Chain::Create sets
  // it): a code drawn at random (S-random interleaver) draws from it.
  PhiloxKey key;
};

// A code family, named by the scheme's `code` key.
struct CodeFamily {
  const char* name;
  // The family's own keys of [scheme.NAME] (a table that applies only with
  // code = name), or nullptr when it has none.
  const KeyTable* keys;
  // True when a frame is one codeword whose information bits the code fixes
  // (frame_bits does not apply).
  bool fixed_frame;
  // Automatic work units hold a multiple of this many frames (decoders that
  // take frames across SIMD lanes want full batches).
  std::uint32_t unit_frames_multiple;
  // Reads the family's validated keys into the scheme's typed options
  // (checks that span keys go here); nullptr: nothing to read.
  Status (*parse)(const ResolvedKeys& keys, const std::string& source, SchemeConfig& scheme);
  // Builds the family's code for `scheme`. Every message names the full key
  // (`key_prefix` is "scheme.NAME.") with its value and the rule. A build
  // that context.stop ended returns a Status with stopped() set.
  Result<std::shared_ptr<const ChannelCode>> (*build)(const SchemeConfig& scheme,
                                                      const std::string& key_prefix,
                                                      const BuildContext& context);
  // Adds the family's theory, limits and code facts to a scheme's result
  // (code is what build made); nullptr: nothing to add. Long computations
  // (density evolution) give up once *stop reads true (stop may be null);
  // the caller then discards the result.
  void (*analyse)(const ChannelCode& code, const SchemeConfig& scheme, SchemeResult& r,
                  const std::atomic<bool>* stop);
};

// A channel model, named by the scheme's `channel` key. make builds the
// channel of one sweep point; the spec was validated when the config was
// read (sim/families/channel_keys.cc), so make does not fail. Whether the
// channel is additive only is asked of the instance (Channel::additive_only).
struct ChannelFamily {
  const char* name;
  std::unique_ptr<const Channel> (*make)(const NoiseSpec& noise, const ChannelSpec& channel);
};

// A constellation family, named by the scheme's `modulation` key (and by
// `capgap theory --modulation`). Its points and labels are data (Modulation,
// blocks/mapping/modulation.h): PSK and square QAM keep their fast demapper
// kernels and exact theory; a generic constellation (ModulationFamily::
// kGeneric) is demapped by brute force and its uncoded theory is the union
// bound (analysis/constellation_bounds.h).
struct ConstellationFamily {
  const char* name;
  // Its words as the key's help shows them ("bpsk, qpsk, <M>psk, ...").
  const char* syntax;
  // Its words with their rules, for error messages.
  std::string (*choices)();
  // True when `word` (letters in any case) is one of the family's words, so
  // that parse either returns its modulation or says what is wrong with it.
  bool (*claims)(std::string_view word);
  // The modulation `word` names, or an error quoting the word with the rule.
  Result<Modulation> (*parse)(std::string_view word);
};

std::span<const CodeFamily* const> CodeFamilies();
std::span<const ChannelFamily* const> ChannelFamilies();
std::span<const ConstellationFamily* const> ConstellationFamilies();
// The modulation `word` names, parsed by the family that claims it; an
// unclaimed word gives "unknown modulation 'WORD'; valid: " and
// ConstellationChoices().
Result<Modulation> ParseConstellation(std::string_view word);
// Every family's choices, comma-separated, in registry order.
std::string ConstellationChoices();
// Every family's syntax (the `modulation` key's help), comma-separated.
const char* ConstellationSyntax();
// nullptr when no family has that name.
const CodeFamily* FindCodeFamily(std::string_view name);
const ChannelFamily* FindChannelFamily(std::string_view name);
// The families' names in registry order (the words of the `code` key), and
// those of the fixed-frame families.
std::span<const std::string_view> CodeFamilyWords();
std::span<const std::string_view> FixedFrameCodeWords();
// "none, conv, ldpc, ...", for messages.
std::string CodeFamilyNames();

}  // namespace capgap

#endif  // CAPGAP_SIM_CHAIN_REGISTRY_H_
