// Fuzz target: the block-code generator reader (ReadBlockCode on arbitrary
// text). A code that reads must write (WriteBlockCode) to text that reads
// back to the same generator.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "blocks/fec/block_code_file.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto code = capgap::ReadBlockCode(text, "fuzz.txt");
  if (!code.ok()) return 0;
  const std::string written = capgap::WriteBlockCode(code.value());
  auto back = capgap::ReadBlockCode(written, "fuzz.txt");
  if (!back.ok() || capgap::WriteBlockCode(back.value()) != written) std::abort();
  return 0;
}
