// `capgap report FILE.h5 [-o FILE.html]` as a function (the CLI parses the
// arguments and calls it): writes one self-contained HTML report of a curves
// file by running analysis/report.py with Python 3 (Debian's
// python3-matplotlib, -h5py, -numpy), the same interpreter and figure code as
// the plots of the demo. Checks made here, before Python starts: FILE.h5 is
// an existing regular file; the output ends in .html and its directory
// exists; the script exists. The script checks the file's format.
// Where things are found: the script in $CAPGAP_ANALYSIS_DIR, else in the
// source tree's analysis/ recorded at build time; the interpreter is
// $CAPGAP_PYTHON, else /usr/bin/python3, else python3 on PATH.
// Exit status: 0 written, 1 bad file or the script failed (its message on
// stderr), 2 usage error.
#ifndef CAPGAP_SIM_RUN_REPORT_COMMAND_H_
#define CAPGAP_SIM_RUN_REPORT_COMMAND_H_

#include <iostream>
#include <string>

namespace capgap {

struct ReportOptions {
  std::string input;   // FILE.h5
  std::string output;  // -o FILE.html; empty: FILE with the extension .html
  std::ostream* err = &std::cerr;
};

// Default output of `capgap report IN`: IN with its extension replaced by .html.
std::string DefaultReportPath(const std::string& input);

int RunReport(const ReportOptions& options);

}  // namespace capgap

#endif  // CAPGAP_SIM_RUN_REPORT_COMMAND_H_
