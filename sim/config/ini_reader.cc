// INI text -> sections, and the bounded reader of config files (see
// ini_reader.h).
#include "sim/config/ini_reader.h"

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <map>
#include <set>

#include "sim/config/text.h"

namespace capgap {
namespace {

bool IsKeyChar(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' ||
         c == '-';
}

bool IsSectionNameChar(char c) { return IsKeyChar(c) || c == '.'; }

std::string FileKind(mode_t mode) {
  if (S_ISFIFO(mode)) return "a FIFO";
  if (S_ISCHR(mode)) return "a character device";
  if (S_ISBLK(mode)) return "a block device";
  if (S_ISSOCK(mode)) return "a socket";
  return "not a plain file";
}

// "" when `st` is a regular file within the limit, else the refusal.
std::string RefusalFor(const struct stat& st, std::uint64_t max_bytes) {
  if (S_ISDIR(st.st_mode)) return "is a directory, not a config file";
  if (!S_ISREG(st.st_mode)) return "is not a regular file (" + FileKind(st.st_mode) + ")";
  if (static_cast<std::uint64_t>(st.st_size) > max_bytes) {
    return "is " + std::to_string(st.st_size) + " bytes; a config file may have at most " +
           std::to_string(max_bytes) + " bytes";
  }
  return "";
}

// Closes a descriptor on every return path.
class FdCloser {
 public:
  explicit FdCloser(int fd) : fd_(fd) {}
  ~FdCloser() { ::close(fd_); }
  FdCloser(const FdCloser&) = delete;
  FdCloser& operator=(const FdCloser&) = delete;

 private:
  int fd_;
};

}  // namespace

Result<std::vector<IniSection>> ParseIniLines(std::string_view text, const std::string& source) {
  std::vector<IniSection> sections;
  int line_number = 0;
  std::size_t pos = 0;
  while (pos < text.size()) {
    const std::size_t eol = text.find('\n', pos);
    std::string_view raw =
        text.substr(pos, eol == std::string_view::npos ? std::string_view::npos : eol - pos);
    pos = eol == std::string_view::npos ? text.size() : eol + 1;
    ++line_number;
    const auto fail = [&](const std::string& rule) {
      return Status::Error(source + ":" + std::to_string(line_number) + ": " + rule);
    };
    if (const auto hash = raw.find('#'); hash != std::string_view::npos) raw = raw.substr(0, hash);
    const std::string line = Trim(raw);
    if (line.empty()) continue;
    if (line.front() == '[') {
      if (line.back() != ']') {
        return fail("section header " + QuoteValue(line) + " does not end with ']'");
      }
      const std::string name = line.substr(1, line.size() - 2);
      bool good = !name.empty() && name.front() != '.' && name.back() != '.';
      for (char c : name) good = good && IsSectionNameChar(c);
      if (!good) {
        return fail("bad section name " + QuoteValue(name) +
                    "; expected letters, digits, '_', '-' and '.' between the brackets, e.g. "
                    "[scheme.qpsk]");
      }
      sections.push_back(IniSection{name, line_number, {}});
      continue;
    }
    const auto eq = line.find('=');
    if (eq == std::string::npos) {
      return fail("expected KEY = VALUE or [SECTION], got " + QuoteValue(line));
    }
    const std::string key = Trim(std::string_view(line).substr(0, eq));
    const std::string value = Trim(std::string_view(line).substr(eq + 1));
    if (sections.empty()) {
      return fail("key " + QuoteValue(key) +
                  " is outside a section; sections: [sweep], [scheme.NAME]");
    }
    bool good = !key.empty();
    for (char c : key) good = good && IsKeyChar(c);
    if (!good) {
      return fail("bad key name " + QuoteValue(key) + "; keys are letters, digits, '_' and '-'");
    }
    IniSection& section = sections.back();
    section.entries.push_back(IniEntry{key, value, line_number});
  }
  return sections;
}

Status CheckIniUnique(const std::vector<IniSection>& sections, const std::string& source) {
  std::map<std::string_view, int> section_lines;  // name -> line of its first header
  for (const IniSection& section : sections) {
    const auto [it, inserted] = section_lines.emplace(section.name, section.line);
    if (!inserted) {
      return Status::Error(source + ": section [" + section.name + "] given twice (lines " +
                           std::to_string(it->second) + " and " + std::to_string(section.line) +
                           ")");
    }
    std::set<std::string_view> keys;
    for (const IniEntry& e : section.entries) {
      if (!keys.insert(e.key).second) {
        return Status::Error(source + ": key '" + section.name + "." + e.key + "' given twice");
      }
    }
  }
  return Status::Ok();
}

Result<std::vector<IniSection>> ParseIni(std::string_view text, const std::string& source) {
  auto sections = ParseIniLines(text, source);
  if (!sections.ok()) return sections;
  if (Status s = CheckIniUnique(sections.value(), source); !s.ok()) return s;
  return sections;
}

Result<std::string> ReadConfigFile(const std::string& path, std::uint64_t max_bytes) {
  const auto fail = [&](const std::string& rule) { return Status::Error(path + ": " + rule); };
  struct stat st {};
  if (::stat(path.c_str(), &st) != 0) return fail("cannot open config file");
  if (std::string refusal = RefusalFor(st, max_bytes); !refusal.empty()) return fail(refusal);
  // O_NONBLOCK: should the path have become a FIFO since stat(), open()
  // returns at once instead of waiting for a writer; fstat() then refuses it.
  const int fd = ::open(path.c_str(), O_RDONLY | O_NONBLOCK | O_CLOEXEC);
  if (fd < 0) return fail("cannot open config file");
  FdCloser closer(fd);
  if (::fstat(fd, &st) != 0) return fail("cannot open config file");
  if (std::string refusal = RefusalFor(st, max_bytes); !refusal.empty()) return fail(refusal);
  std::string bytes;
  bytes.reserve(static_cast<std::size_t>(st.st_size));
  char buf[65536];
  while (bytes.size() <= max_bytes) {
    const std::uint64_t want = std::min<std::uint64_t>(sizeof buf, max_bytes + 1 - bytes.size());
    const ssize_t n = ::read(fd, buf, static_cast<std::size_t>(want));
    if (n < 0) {
      if (errno == EINTR) continue;
      return fail(std::string("read error: ") + std::strerror(errno));
    }
    if (n == 0) break;
    bytes.append(buf, static_cast<std::size_t>(n));
  }
  if (bytes.size() > max_bytes) {
    return fail("grew beyond " + std::to_string(max_bytes) +
                " bytes while being read; a config file may have at most " +
                std::to_string(max_bytes) + " bytes");
  }
  return bytes;
}

}  // namespace capgap
