// Fuzz target (not run in CI): the curves-file reader of `capgap summary`
// (ParseCurvesImage, the path ReadCurvesFile takes after its bounded read)
// on arbitrary bytes, then the summary table of a file that reads. Arbitrary bytes reach the
// HDF5 library's own decoder, which (Debian 12, HDF5 1.10.8) crashes within
// seconds on damaged files (e.g. H5HG_read on a corrupt global heap behind a
// variable-length string): bugs of the library, not of capgap, which
// `capgap summary` contains by reading in a child process. Run it by hand
// (FUZZ_TARGETS=fuzz_curves_bytes bash tests/fuzz/run_fuzz.sh 60); CI fuzzes
// capgap's own validation with fuzz_curves (files built through the HDF5
// API with hostile shapes, types and values).
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
