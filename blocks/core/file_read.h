// Bounded reading of input files: every reader of a user-named file (config,
// checkpoint, sparse and base matrices, block-code generators, curves files)
// goes through ReadRegularFile, so none of them can be made to read a device,
// block on a FIFO or grow without bound.
#ifndef CAPGAP_BLOCKS_CORE_FILE_READ_H_
#define CAPGAP_BLOCKS_CORE_FILE_READ_H_

#include <cstdint>
#include <string>
#include <string_view>

#include "blocks/core/status.h"

namespace capgap {

// Reads a whole regular file of at most `max_bytes` bytes. `noun` names the
// kind of file in messages ("config file", "checkpoint"); `open_noun`, when
// not empty, replaces it in the cannot-open message. Refused without reading:
//   a missing or unreadable path   "PATH: cannot open NOUN"
//   a directory                    "PATH: is a directory, not a NOUN"
//   a FIFO, device or socket       "PATH: is not a regular file (a FIFO)"
//   a file over the limit          "PATH: is N bytes; a NOUN may have at most M bytes"
// The type is checked with stat() before the file is opened (a symbolic link
// is followed, so a link to /dev/zero is a character device) and again with
// fstat() on the descriptor, which is opened non-blocking so that a FIFO
// swapped in between cannot hang the reader; at most max_bytes + 1 bytes are
// read, so a file that grows while being read is refused too ("PATH: grew
// beyond M bytes while being read; ...").
Result<std::string> ReadRegularFile(const std::string& path, std::uint64_t max_bytes,
                                    std::string_view noun, std::string_view open_noun = {});

// The checks of ReadRegularFile without the read, for readers that hand the
// path to a library: "" when `path` is a regular file of at most max_bytes,
// else the refusal as above. Only the stat() check: a caller that opens the
// file itself must not block on it (ReadRegularFile and read the bytes when
// in doubt).
Status CheckRegularFile(const std::string& path, std::uint64_t max_bytes, std::string_view noun,
                        std::string_view open_noun = {});

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_CORE_FILE_READ_H_
