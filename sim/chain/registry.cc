// The registry tables: one line per family (its file declares it).
#include "sim/chain/registry.h"

#include <vector>

#include "sim/families/awgn_family.h"
#include "sim/families/block_family.h"
#include "sim/families/conv_family.h"
#include "sim/families/ldpc_family.h"
#include "sim/families/polar_family.h"
#include "sim/families/uncoded_family.h"

namespace capgap {
namespace {

const CodeFamily* const kCodeFamilies[] = {
    &kUncodedFamily,
    &kConvFamily,
    &kLdpcFamily,
    &kBlockFamily,
    &kPolarFamily,
};

const ChannelFamily* const kChannelFamilies[] = {
    &kAwgnFamily,
};

}  // namespace

std::span<const CodeFamily* const> CodeFamilies() { return kCodeFamilies; }
std::span<const ChannelFamily* const> ChannelFamilies() { return kChannelFamilies; }

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
