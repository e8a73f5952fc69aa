// Loading and saving any LdpcCode as a sparse parity-check matrix in a plain
// text format of capgap's own, plus the small text helpers (comment
// stripping, word splitting, whole-file reading and atomic writing) shared
// with the base matrix format of blocks/fec/ldpc_construction.h.
//
// Sparse H format:
//   * '#' starts a comment running to the end of the line; blank and
//     comment-only lines are ignored; words are separated by spaces or tabs
//     (a trailing '\r' is ignored too).
//   * The first non-comment line is the header
//         parity-check columns <N> rows <M>
//     or  parity-check columns <N> rows <M> lifting <Z>
//     with N >= 1 variables (columns), M >= 1 checks (rows) and, optionally,
//     the lifting size Z >= 1 of a code lifted from a base matrix (then Z
//     divides N and M, and no two checks of one block row r*Z .. r*Z+Z-1 may
//     share a variable, the property LdpcCode::lifting() promises).
//   * Optionally next, a line "description <text>": the rest of the line,
//     trimmed, becomes description(). Without it the description is
//     "read from <source_name>".
//   * Then exactly M row lines, checks 0 .. M-1 in order. Row line r lists
//     the distinct 0-based column indices of the ones of row r, each in
//     [0, N), any order (the writer writes them increasing); the row degree
//     is their count. A row without ones is written '-'.
//   * Files of the earlier 'ldpc-matrix n <N> m <M>' format, whose rows were
//     '<degree>: <columns>', are refused with a message naming this format.
//   * Every column must appear in at least one check; nothing else may
//     follow the M check lines.
// Errors name the source, the line and the offending value, e.g.
//   "codes/a.txt:5: column '2016': must be in [0, 2016)".
// WriteLdpcMatrix writes a short '#' comment naming the format, the header
// (with "lifting Z" iff lifting() > 0), the description line (when
// description() is not empty; '#', '\r' and '\n' in it become spaces) and
// the check lines. ReadLdpcMatrix(WriteLdpcMatrix(c)) has the same H,
// lifting and (so sanitised) description as c; an empty description reads
// back as "read from <source_name>".
#ifndef CAPGAP_BLOCKS_FEC_LDPC_MATRIX_FILE_H_
#define CAPGAP_BLOCKS_FEC_LDPC_MATRIX_FILE_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/fec/ldpc_code.h"

namespace capgap {

Result<LdpcCode> ReadLdpcMatrix(std::string_view text, std::string_view source_name);
std::string WriteLdpcMatrix(const LdpcCode& code);

// Largest sparse-matrix file read: 64 MiB (n = 1048576 columns at column
// degree 3 take about 25 MB).
inline constexpr std::uint64_t kMaxLdpcMatrixFileBytes = std::uint64_t{64} << 20;

// File variants. The reader refuses anything but a regular file and files
// over kMaxLdpcMatrixFileBytes without reading them. The writer writes "<path>.tmp" and renames it to path when
// complete (common practice), so a reader never sees half a file.
Result<LdpcCode> ReadLdpcMatrixFile(const std::string& path);
Status WriteLdpcMatrixFile(const std::string& path, const LdpcCode& code);

// ----- Text helpers shared by capgap's LDPC text formats ---------------------

// One non-empty line after comment stripping: its 1-based number in the text
// and its words (views into the text).
struct LdpcTextLine {
  int number = 0;
  std::string_view content;  // the line without its comment, trimmed
  std::vector<std::string_view> words;
};
// Splits text into lines, strips '#' comments, splits words on spaces, tabs
// and '\r', and drops lines without words.
std::vector<LdpcTextLine> SplitLdpcTextLines(std::string_view text);
// Parses a whole word as a decimal int (optional leading '-'); false if the
// word is not exactly one integer or overflows int.
bool ParseLdpcInt(std::string_view word, int* value);
// Whole contents of a regular file of at most max_bytes (ReadRegularFile,
// blocks/core/file_read.h; `noun` names the kind of file in messages):
// "<path>: cannot open file", "<path>: is not a regular file (a FIFO)",
// "<path>: is N bytes; a matrix file may have at most M bytes", ...
Result<std::string> ReadLdpcTextFile(const std::string& path, std::uint64_t max_bytes,
                                     std::string_view noun);
// Writes "<path>.tmp", then renames it to path.
Status WriteLdpcTextFileAtomically(const std::string& path, std::string_view text);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_MATRIX_FILE_H_
