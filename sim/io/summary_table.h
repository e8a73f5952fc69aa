// Human summary table of a run (printed by `capgap run` and `capgap summary`).
#ifndef CAPGAP_SIM_SUMMARY_TABLE_H_
#define CAPGAP_SIM_SUMMARY_TABLE_H_

#include <string>

#include "sim/io/curves_file.h"

namespace capgap {

std::string FormatSummaryTable(const StoredRun& run);

}  // namespace capgap

#endif  // CAPGAP_SIM_SUMMARY_TABLE_H_
