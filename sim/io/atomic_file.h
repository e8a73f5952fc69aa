// Crash-safe replacement of a file: the caller writes a temporary file in the
// target's directory, then CommitFile flushes it to disk (fsync), renames it
// over the target (atomic on POSIX file systems) and flushes the directory
// entry. A kill or power loss at any instant leaves either the previous
// complete file or the new complete one under the target name, never a mix.
// (Write-new, fsync, rename, fsync-directory: common practice.)
#ifndef CAPGAP_SIM_ATOMIC_FILE_H_
#define CAPGAP_SIM_ATOMIC_FILE_H_

#include <string>

#include "blocks/core/status.h"

namespace capgap {

// Temporary name used for `path`: "<path>.tmp-<pid>" (same directory).
std::string TemporaryPathFor(const std::string& path);

// fsync(tmp), rename(tmp, path), fsync(directory of path). On failure the
// temporary file is removed and the target left as it was.
Status CommitFile(const std::string& tmp, const std::string& path);

// Writes `bytes` to `path` crash-safely (temporary file + CommitFile).
Status WriteFileAtomically(const std::string& path, const std::string& bytes);

// Removes "<path>.tmp-*" files left by a killed process.
void RemoveStaleTemporaries(const std::string& path);

}  // namespace capgap

#endif  // CAPGAP_SIM_ATOMIC_FILE_H_
