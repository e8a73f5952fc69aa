// Fuzz target: the scheme-file parser (ParseRunConfig on arbitrary text).
// A config that parses must also serialise (ResolvedText) to text that
// parses again to the same resolved keys.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "sim/config/config.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto cfg = capgap::ParseRunConfig(text, "fuzz.ini", {});
  if (!cfg.ok()) return 0;
  const std::string resolved = cfg.value().ResolvedText();
  auto again = capgap::ParseRunConfig(resolved, "resolved.ini", {});
  if (!again.ok() || again.value().ResolvedText() != resolved) std::abort();
  return 0;
}
