// INI text -> sections, and the bounded reader of config files (see
// ini_reader.h).
#include "sim/config/ini_reader.h"

#include <map>
#include <set>

#include "blocks/core/file_read.h"
#include "sim/config/text.h"

namespace capgap {
namespace {

bool IsKeyChar(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' ||
         c == '-';
}

bool IsSectionNameChar(char c) { return IsKeyChar(c) || c == '.'; }

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
  return ReadRegularFile(path, max_bytes, "config file");
}

}  // namespace capgap
