// Fuzz target: the curves-file reader of `capgap summary` (ParseCurvesImage,
// the path ReadCurvesFile takes after its bounded read) on arbitrary bytes,
// then the summary table of a file that reads.
#include <cstddef>
#include <cstdint>
#include <string>

#include "sim/io/curves_file.h"
#include "sim/io/summary_table.h"

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t* data, std::size_t size) {
  const std::string bytes(reinterpret_cast<const char*>(data), size);
  auto run = capgap::ParseCurvesImage(bytes, "fuzz.h5");
  if (run.ok()) (void)capgap::FormatSummaryTable(run.value());
  return 0;
}
