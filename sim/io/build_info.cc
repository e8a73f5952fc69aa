// Build facts, injected by CMake as compile definitions.
#include "sim/io/build_info.h"

namespace capgap {

const char* ProgramVersion() { return CAPGAP_VERSION; }
// GitRevision() is generated at build time (sim/git_revision.cmake).
const char* CompilerId() { return CAPGAP_COMPILER; }
const char* BuildType() { return CAPGAP_BUILD_TYPE; }
bool AssertionsEnabled() {
#ifdef NDEBUG
  return false;
#else
  return true;
#endif
}

}  // namespace capgap
