// Fuzz target: the checkpoint parser (ParseCheckpoint on arbitrary bytes).
// The checksum line is recomputed for the input's body half of the time, so
// the fuzzer reaches the record parser instead of stopping at the checksum.
// A checkpoint that parses must serialise to bytes that parse and serialise
// to the same bytes again.
#include <cinttypes>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <cstdlib>
#include <string>

#include "blocks/core/hash.h"
#include "sim/io/checkpoint.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  if (size == 0) return 0;
  std::string bytes(reinterpret_cast<const char*>(data) + 1, size - 1);
  if (data[0] & 1) {
    // Replace the last line by the checksum of everything before it.
    const std::size_t last = bytes.empty() ? std::string::npos : bytes.rfind('\n', bytes.size() - 1);
    bytes.resize(last == std::string::npos ? 0 : last + 1);
    char sum[40];
    std::snprintf(sum, sizeof sum, "checksum %016" PRIx64 "\n", capgap::Fnv1a64(bytes));
    bytes += sum;
  }
  auto c = capgap::ParseCheckpoint(bytes, "fuzz.ckpt");
  if (!c.ok()) return 0;
  const std::string once = capgap::SerializeCheckpoint(c.value());
  auto again = capgap::ParseCheckpoint(once, "fuzz.ckpt");
  if (!again.ok() || capgap::SerializeCheckpoint(again.value()) != once) std::abort();
  return 0;
}
