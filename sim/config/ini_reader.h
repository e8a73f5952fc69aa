// INI reader of scheme files: text -> ordered sections of (key, value, line).
//
// Syntax: '#' starts a comment anywhere on a line; blank lines are skipped;
// "[NAME]" opens a section (NAME: letters, digits, '_', '-', '.'); "KEY =
// VALUE" sets a key of the open section (KEY: letters, digits, '_', '-'),
// the value is the rest of the line without surrounding spaces and may be
// empty. Refused, with the line number: a key before the first section, a
// line that is neither, a bad section name or key name, a section opened
// twice (both lines named) and a key given twice in a section. The reader
// knows no section or key names; sim/config/config.cc gives them meaning.
#ifndef CAPGAP_SIM_CONFIG_INI_READER_H_
#define CAPGAP_SIM_CONFIG_INI_READER_H_

#include <cstdint>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"

namespace capgap {

struct IniEntry {
  std::string key;
  std::string value;
  int line = 0;  // 1-based line of the file
};

struct IniSection {
  std::string name;               // without brackets, e.g. "scheme.qpsk"
  int line = 0;                   // line of the [NAME] header
  std::vector<IniEntry> entries;  // in file order
};

// Parses INI text; `source` (a file name) prefixes every message:
// "FILE:LINE: ..." for syntax, "FILE: section [sweep] given twice (lines 2
// and 9)", "FILE: key 'sweep.seed' given twice". Equivalent to
// ParseIniLines followed by CheckIniUnique.
Result<std::vector<IniSection>> ParseIni(std::string_view text, const std::string& source);

// The two steps of ParseIni, for a caller that reports unknown sections and
// keys before repeats: the syntax of every line (a repeated section is
// returned as a second IniSection) ...
Result<std::vector<IniSection>> ParseIniLines(std::string_view text, const std::string& source);
// ... and the refusal of a section opened twice or a key given twice in
// one section (the first repeat in file order is named).
Status CheckIniUnique(const std::vector<IniSection>& sections, const std::string& source);

// Largest config file read (4 MiB); a scheme file is a few kB.
inline constexpr std::uint64_t kMaxConfigFileBytes = 4u << 20;

// Reads a whole regular file of at most `max_bytes` bytes. Refused without
// reading: a missing or unreadable path ("PATH: cannot open config file"), a
// directory ("PATH: is a directory, not a config file"), any other
// non-regular file such as a FIFO or device ("PATH: is not a regular file (a
// FIFO)"), a file larger than the limit ("PATH: is N bytes; a config file may
// have at most M bytes"). The type is checked before the file is opened and
// again on the open descriptor (opened non-blocking, so a FIFO swapped in
// cannot hang the reader), and at most max_bytes + 1 bytes are read, so a
// growing file cannot exhaust memory either.
Result<std::string> ReadConfigFile(const std::string& path,
                                   std::uint64_t max_bytes = kMaxConfigFileBytes);

}  // namespace capgap

#endif  // CAPGAP_SIM_CONFIG_INI_READER_H_
