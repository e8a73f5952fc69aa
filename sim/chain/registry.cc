// The registry tables: one line per family (its file declares it).
#include "sim/chain/registry.h"

#include <string>
#include <vector>

#include "sim/families/apsk16_constellation.h"
#include "sim/families/awgn_family.h"
#include "sim/families/block_family.h"
#include "sim/families/conv_family.h"
#include "sim/families/fading_family.h"
#include "sim/families/ldpc_family.h"
#include "sim/families/psk_qam_constellation.h"
#include "sim/families/polar_family.h"
#include "sim/families/turbo_family.h"
#include "sim/families/uncoded_family.h"

namespace capgap {
namespace {

const CodeFamily* const kCodeFamilies[] = {
    &kUncodedFamily,
    &kConvFamily,
    &kLdpcFamily,
    &kBlockFamily,
    &kPolarFamily,
    &kTurboFamily,
};

const ChannelFamily* const kChannelFamilies[] = {
    &kAwgnFamily,
    &kRayleighFamily,
    &kRicianFamily,
    &kNakagamiFamily,
};

const ConstellationFamily* const kConstellationFamilies[] = {
    &kPskQamConstellation,
    &k16ApskConstellation,
};

}  // namespace

std::span<const CodeFamily* const> CodeFamilies() { return kCodeFamilies; }
std::span<const ChannelFamily* const> ChannelFamilies() { return kChannelFamilies; }
std::span<const ConstellationFamily* const> ConstellationFamilies() {
  return kConstellationFamilies;
}

Result<Modulation> ParseConstellation(std::string_view word) {
  for (const ConstellationFamily* f : kConstellationFamilies) {
    if (f->claims(word)) return f->parse(word);
  }
  return Status::Error("unknown modulation '" + std::string(word) +
                       "'; valid: " + ConstellationChoices());
}

std::string ConstellationChoices() {
  std::string out;
  for (const ConstellationFamily* f : kConstellationFamilies) {
    if (!out.empty()) out += ", ";
    out += f->choices();
  }
  return out;
}

const char* ConstellationSyntax() {
  static const std::string syntax = [] {
    std::string out;
    for (const ConstellationFamily* f : kConstellationFamilies) {
      if (!out.empty()) out += ", ";
      out += f->syntax;
    }
    return out;
  }();
  return syntax.c_str();
}

const CodeFamily* FindCodeFamily(std::string_view name) {
  for (const CodeFamily* f : kCodeFamilies) {
    if (name == f->name) return f;
  }
  return nullptr;
}

const ChannelFamily* FindChannelFamily(std::string_view name) {
  for (const ChannelFamily* f : kChannelFamilies) {
    if (name == f->name) return f;
  }
  return nullptr;
}

std::span<const std::string_view> CodeFamilyWords() {
  static const std::vector<std::string_view> words = [] {
    std::vector<std::string_view> w;
    for (const CodeFamily* f : kCodeFamilies) w.emplace_back(f->name);
    return w;
  }();
  return words;
}

std::span<const std::string_view> FixedFrameCodeWords() {
  static const std::vector<std::string_view> words = [] {
    std::vector<std::string_view> w;
    for (const CodeFamily* f : kCodeFamilies) {
      if (f->fixed_frame) w.emplace_back(f->name);
    }
    return w;
  }();
  return words;
}

std::string CodeFamilyNames() {
  std::string out;
  for (const CodeFamily* f : kCodeFamilies) {
    if (!out.empty()) out += ", ";
    out += f->name;
  }
  return out;
}

}  // namespace capgap
