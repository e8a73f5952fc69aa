// Fuzz target: the QC base-matrix parser (ParseBaseMatrix on arbitrary
// text), then the lifting of a parsed matrix at its design lifting when the
// lifted code stays small (at most 2^16 columns). A parsed matrix must write
// (WriteBaseMatrix) to text that parses back to the same shifts.
#include <cstddef>
#include <cstdint>
#include <cstdlib>
#include <string>

#include "blocks/fec/ldpc_construction.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string text(reinterpret_cast<const char*>(data), size);
  auto base = capgap::ParseBaseMatrix(text, "fuzz.txt");
  if (!base.ok()) return 0;
  const capgap::BaseMatrix& b = base.value();
  auto back = capgap::ParseBaseMatrix(capgap::WriteBaseMatrix(b, "round trip"), "fuzz.txt");
  if (!back.ok() || back.value().shifts != b.shifts || back.value().rows != b.rows ||
      back.value().cols != b.cols) {
    std::abort();
  }
  if (static_cast<std::int64_t>(b.cols) * b.design_lifting <= (1 << 16)) {
    (void)capgap::LiftBaseMatrix(b, b.design_lifting);
  }
  return 0;
}
