// Fuzz target: the sparse parity-check matrix reader (ReadLdpcMatrix on
// arbitrary text). A matrix that reads must write (WriteLdpcMatrix) to text
// that reads back to the same H and lifting.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "blocks/fec/ldpc_matrix_file.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto code = capgap::ReadLdpcMatrix(text, "fuzz.txt");
  if (!code.ok()) return 0;
  const std::string written = capgap::WriteLdpcMatrix(code.value());
  auto back = capgap::ReadLdpcMatrix(written, "fuzz.txt");
  if (!back.ok()) std::abort();
  if (capgap::WriteLdpcMatrix(back.value()) != written) std::abort();
  return 0;
}
