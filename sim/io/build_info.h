// Build facts recorded in every output file: version, git revision, compiler,
// build type.
#ifndef CAPGAP_SIM_BUILD_INFO_H_
#define CAPGAP_SIM_BUILD_INFO_H_

namespace capgap {

const char* ProgramVersion();
const char* GitRevision();
const char* CompilerId();
const char* BuildType();
// True when assertions are compiled in (timings from such builds are flagged).
bool AssertionsEnabled();

}  // namespace capgap

#endif  // CAPGAP_SIM_BUILD_INFO_H_
