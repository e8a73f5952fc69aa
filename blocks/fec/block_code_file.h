// Loading and saving a BlockCode's generator matrix in a plain text format of
// capgap's own.
//
// Generator format:
//   * '#' starts a comment running to the end of the line; blank and
//     comment-only lines are ignored; words are separated by spaces or tabs
//     (a trailing '\r' is ignored too).
//   * The first non-comment line is the header
//         block-code n <N> k <K>
//     with N in [1, 256] code bits, K in [1, 16] information bits, K <= N.
//   * Optionally next, a line "name <word>": the code's name (one word).
//     Without it the name is the file's source name.
//   * Then exactly K row lines, rows 0 .. K-1 of G in order, each one word
//     of exactly N characters '0' or '1' (character i is column i). The rows
//     must be linearly independent over GF(2) (rank K).
//   * Nothing else may follow the K row lines.
// Files (ReadBlockCodeFile) must be regular files of at most
// kMaxBlockCodeFileBytes = 1 MiB.
// Every error names the source, the line where it applies and the rule, e.g.
//   "codes/g.txt:4: row 1: character 6 is '2': must be '0' or '1'".
// WriteBlockCode writes a '#' comment naming the format, the header, the
// name line and the rows; ReadBlockCode(WriteBlockCode(c)) has the same n,
// k, generator and name as c (a name with characters other than letters,
// digits, '_', '-' and '.' is written with them replaced by '_').
#ifndef CAPGAP_BLOCKS_FEC_BLOCK_CODE_FILE_H_
#define CAPGAP_BLOCKS_FEC_BLOCK_CODE_FILE_H_

#include <cstddef>
#include <string>
#include <string_view>

#include "blocks/core/status.h"
#include "blocks/fec/block_code.h"

namespace capgap {

inline constexpr std::size_t kMaxBlockCodeFileBytes = std::size_t{1} << 20;

Result<BlockCode> ReadBlockCode(std::string_view text, std::string_view source_name);
std::string WriteBlockCode(const BlockCode& code);

// File variants. The reader refuses anything but a regular file and files
// over kMaxBlockCodeFileBytes ("<path>: ..."); the writer writes
// "<path>.tmp" and renames it to path when complete (common practice).
Result<BlockCode> ReadBlockCodeFile(const std::string& path);
Status WriteBlockCodeFile(const std::string& path, const BlockCode& code);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_BLOCK_CODE_FILE_H_
