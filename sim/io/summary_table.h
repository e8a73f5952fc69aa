// Human summary table of a run (printed by `capgap run` and `capgap summary`).
#ifndef CAPGAP_SIM_SUMMARY_TABLE_H_
#define CAPGAP_SIM_SUMMARY_TABLE_H_

#include <string>
#include <vector>

#include "sim/io/curves_file.h"

namespace capgap {

std::string FormatSummaryTable(const StoredRun& run);

// Several runs side by side (`capgap summary A.h5 B.h5 ...`): per scheme (in
// order of first appearance), one row per file with the Eb/N0 at the target
// BER and FER and the gap to the Shannon limit, each with its 95 % interval,
// and the difference to the first file that has the scheme. A difference is
// flagged when the two intervals do not overlap (the intervals come from the
// Clopper-Pearson bounds of each curve); a scheme whose target BER or FER
// differs between files is marked as not comparable. `labels[i]` names
// `runs[i]` (e.g. "A"); `paths[i]` is printed once in the legend.
std::string FormatComparisonTable(const std::vector<std::string>& labels,
                                  const std::vector<std::string>& paths,
                                  const std::vector<StoredRun>& runs);

}  // namespace capgap

#endif  // CAPGAP_SIM_SUMMARY_TABLE_H_
