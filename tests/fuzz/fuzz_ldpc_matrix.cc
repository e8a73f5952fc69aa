// Fuzz target: the sparse parity-check matrix reader (ReadLdpcMatrix on
// arbitrary text). A matrix that reads must write (WriteLdpcMatrix) to text
// that reads back to the same H and lifting and, as ldpc_matrix_file.h
// promises, the same description once sanitised ('#', CR and LF become
// spaces; an empty one reads back as "read from <source>").
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>
#include <vector>

#include "blocks/core/text.h"
#include "blocks/fec/ldpc_matrix_file.h"

namespace {

std::vector<int> Copy(std::span<const int> s) { return {s.begin(), s.end()}; }

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto code = capgap::ReadLdpcMatrix(text, "fuzz.txt");
  if (!code.ok()) return 0;
  const capgap::LdpcCode& c = code.value();
  auto back = capgap::ReadLdpcMatrix(capgap::WriteLdpcMatrix(c), "fuzz.txt");
  if (!back.ok()) std::abort();
  const capgap::LdpcCode& b = back.value();
  if (b.length() != c.length() || b.checks() != c.checks() || b.lifting() != c.lifting() ||
      Copy(b.row_start()) != Copy(c.row_start()) ||
      Copy(b.edge_variable()) != Copy(c.edge_variable())) {
    std::abort();
  }
  std::string d = c.description();
  for (char& ch : d) {
    if (ch == '#' || ch == '\r' || ch == '\n') ch = ' ';
  }
  const std::string want(capgap::TrimBlanks(d, " \t\r"));
  if (b.description() != (want.empty() ? "read from fuzz.txt" : want)) std::abort();
  return 0;
}
