// Build facts, injected by CMake as compile definitions.
#include "sim/build_info.h"

namespace capgap {

const char* ProgramVersion() { return CAPGAP_VERSION; }
const char* GitRevision() { return CAPGAP_GIT_REVISION; }
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
