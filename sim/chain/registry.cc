// The registry tables. One line per family.
#include "sim/chain/registry.h"

#include "sim/families/families.h"

namespace capgap {
namespace {

constexpr CodeFamily kCodeFamilies[] = {
    {"none", &BuildUncoded, nullptr},
    {"conv", &BuildConv, &AnalyseConv},
    {"ldpc", &BuildLdpc, &AnalyseLdpc},
};

constexpr ChannelFamily kChannelFamilies[] = {
    {"awgn", true, &MakeAwgn},
};

}  // namespace

std::span<const CodeFamily> CodeFamilies() { return kCodeFamilies; }
std::span<const ChannelFamily> ChannelFamilies() { return kChannelFamilies; }

const CodeFamily* FindCodeFamily(std::string_view name) {
  for (const CodeFamily& f : kCodeFamilies) {
    if (name == f.name) return &f;
  }
  return nullptr;
}

const ChannelFamily* FindChannelFamily(std::string_view name) {
  for (const ChannelFamily& f : kChannelFamilies) {
    if (name == f.name) return &f;
  }
  return nullptr;
}

std::string CodeFamilyNames() {
  std::string out;
  for (const CodeFamily& f : kCodeFamilies) {
    if (!out.empty()) out += ", ";
    out += f.name;
  }
  return out;
}

}  // namespace capgap
