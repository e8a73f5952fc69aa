// Sparse H text format: reader, writer, and the shared text helpers.
#include "blocks/fec/ldpc_matrix_file.h"

#include <algorithm>
#include <charconv>
#include <cstdio>
#include <fstream>
#include <sstream>
#include <system_error>

#include "blocks/core/file_read.h"
#include "blocks/core/text.h"

namespace capgap {
namespace {

// Headers with at most this many columns keep every message in file order
// even when the row lines list fewer entries (see ReadLdpcMatrix).
constexpr int kColumnsCheckedLate = 1 << 16;

// Word separators of the LDPC text formats: blanks and a stray CR.
constexpr std::string_view kSpaces = " \t\r";

bool IsSpace(char c) { return kSpaces.find(c) != std::string_view::npos; }

std::string_view TrimSpaces(std::string_view s) { return TrimBlanks(s, kSpaces); }

std::string Where(std::string_view source, int line) {
  return std::string(source) + ":" + std::to_string(line) + ": ";
}

}  // namespace

std::vector<LdpcTextLine> SplitLdpcTextLines(std::string_view text) {
  std::vector<LdpcTextLine> lines;
  int number = 0;
  std::size_t pos = 0;
  while (pos <= text.size()) {
    std::size_t end = text.find('\n', pos);
    if (end == std::string_view::npos) end = text.size();
    ++number;
    std::string_view line = text.substr(pos, end - pos);
    const std::size_t hash = line.find('#');
    if (hash != std::string_view::npos) line = line.substr(0, hash);
    line = TrimSpaces(line);
    if (!line.empty()) {
      LdpcTextLine l;
      l.number = number;
      l.content = line;
      std::size_t i = 0;
      while (i < line.size()) {
        while (i < line.size() && IsSpace(line[i])) ++i;
        std::size_t j = i;
        while (j < line.size() && !IsSpace(line[j])) ++j;
        if (j > i) l.words.push_back(line.substr(i, j - i));
        i = j;
      }
      lines.push_back(std::move(l));
    }
    if (end == text.size()) break;
    pos = end + 1;
  }
  return lines;
}

bool ParseLdpcInt(std::string_view word, int* value) {
  if (word.empty()) return false;
  const char* first = word.data();
  const char* last = word.data() + word.size();
  int v = 0;
  const auto [ptr, ec] = std::from_chars(first, last, v);
  if (ec != std::errc() || ptr != last) return false;
  *value = v;
  return true;
}

Result<std::string> ReadLdpcTextFile(const std::string& path, std::uint64_t max_bytes,
                                     std::string_view noun) {
  return ReadRegularFile(path, max_bytes, noun, "file");
}

Status WriteLdpcTextFileAtomically(const std::string& path, std::string_view text) {
  const std::string tmp = path + ".tmp";
  {
    std::ofstream out(tmp, std::ios::binary | std::ios::trunc);
    if (!out) return Status::Error(tmp + ": cannot open for writing");
    out.write(text.data(), static_cast<std::streamsize>(text.size()));
    out.flush();
    if (!out) return Status::Error(tmp + ": write error");
  }
  if (std::rename(tmp.c_str(), path.c_str()) != 0) {
    std::remove(tmp.c_str());
    return Status::Error(path + ": cannot rename " + tmp + " to it");
  }
  return Status::Ok();
}

Result<LdpcCode> ReadLdpcMatrix(std::string_view text, std::string_view source_name) {
  const std::vector<LdpcTextLine> lines = SplitLdpcTextLines(text);
  const std::string src(source_name);
  if (lines.empty()) return Status::Error(src + ": no 'parity-check' header line");
  const LdpcTextLine& head = lines[0];
  const std::string header_rule =
      "expected 'parity-check columns <N> rows <M>' or "
      "'parity-check columns <N> rows <M> lifting <Z>'";
  const auto& hw = head.words;
  if (hw[0] == "ldpc-matrix") {
    // The format of earlier versions ("<degree>: <columns>" rows) is refused
    // with what to write instead; no silent second reader.
    return Status::Error(Where(src, head.number) +
                         "the 'ldpc-matrix' format (rows written '<degree>: <columns>') is no "
                         "longer read; write the header 'parity-check columns <N> rows <M> "
                         "[lifting <Z>]' and each row as its column indices only (the degree is "
                         "their count, '-' for an empty row); README, \"Sparse parity-check "
                         "files\"");
  }
  if (!((hw.size() == 5 || hw.size() == 7) && hw[0] == "parity-check" && hw[1] == "columns" &&
        hw[3] == "rows" && (hw.size() == 5 || hw[5] == "lifting"))) {
    return Status::Error(Where(src, head.number) + "header " + Quoted(head.content) + ": " +
                         header_rule);
  }
  int n = 0, m = 0, lifting = 0;
  if (!ParseLdpcInt(hw[2], &n) || n < 1) {
    return Status::Error(Where(src, head.number) + "columns " + Quoted(hw[2]) +
                         ": must be an integer >= 1");
  }
  if (!ParseLdpcInt(hw[4], &m) || m < 1) {
    return Status::Error(Where(src, head.number) + "rows " + Quoted(hw[4]) +
                         ": must be an integer >= 1");
  }
  if (hw.size() == 7) {
    if (!ParseLdpcInt(hw[6], &lifting) || lifting < 1) {
      return Status::Error(Where(src, head.number) + "lifting " + Quoted(hw[6]) +
                           ": must be an integer >= 1");
    }
    if (n % lifting != 0 || m % lifting != 0) {
      return Status::Error(Where(src, head.number) + "lifting " + Quoted(hw[6]) +
                           ": must divide columns = " + std::to_string(n) +
                           " and rows = " + std::to_string(m));
    }
  }
  std::size_t next = 1;
  std::string description = "read from " + src;
  if (next < lines.size() && lines[next].words[0] == "description") {
    description =
        std::string(TrimSpaces(lines[next].content.substr(std::string_view("description").size())));
    ++next;
  }
  // Nothing is sized from the header alone. The check lines are collected
  // as they are read (a short file stops at "ends after"); the per-column
  // marks need n entries, so a header declaring more columns than the check
  // lines list (a file that must fail with "column ... is in no check") is
  // refused up front once n is large enough for the marks to matter.
  const std::size_t remaining = lines.size() - next;
  std::size_t entries = 0;
  for (std::size_t i = next; i < lines.size(); ++i) entries += lines[i].words.size();
  if (static_cast<std::size_t>(n) > entries && n > kColumnsCheckedLate) {
    return Status::Error(Where(src, head.number) + "columns " + std::to_string(n) +
                         " but the row lines list " + std::to_string(entries) +
                         " entries; every column must be in a check");
  }
  std::vector<std::vector<int>> rows;
  rows.reserve(std::min(static_cast<std::size_t>(m), remaining));
  std::vector<int> seen_in_row(static_cast<std::size_t>(n), -1);
  // Block-row check for lifted codes: the last check (row) of the current
  // block row that used each column.
  std::vector<int> block_row_user(static_cast<std::size_t>(n), -1);
  std::vector<int> row_line;
  row_line.reserve(rows.capacity());
  for (int r = 0; r < m; ++r, ++next) {
    if (next >= lines.size()) {
      return Status::Error(src + ": ends after " + std::to_string(r) + " of " + std::to_string(m) +
                           " check lines");
    }
    const LdpcTextLine& line = lines[next];
    row_line.push_back(line.number);
    // A row is its column indices; '-' alone is an empty row (degree 0).
    const bool empty_row = line.words.size() == 1 && line.words[0] == "-";
    std::vector<int>& row = rows.emplace_back();
    row.reserve(empty_row ? 0 : line.words.size());
    for (std::size_t i = 0; i < line.words.size() && !empty_row; ++i) {
      if (line.words[i].find(':') != std::string_view::npos) {
        return Status::Error(Where(src, line.number) + "check " + std::to_string(r) + ": " +
                             Quoted(line.words[i]) +
                             ": a row lists column indices only (the degree is their count; "
                             "no '<d>:' prefix)");
      }
      int c = 0;
      if (!ParseLdpcInt(line.words[i], &c)) {
        return Status::Error(Where(src, line.number) + "column " + Quoted(line.words[i]) +
                             ": not an integer");
      }
      if (c < 0 || c >= n) {
        return Status::Error(Where(src, line.number) + "column " + Quoted(line.words[i]) +
                             ": must be in [0, " + std::to_string(n) + ")");
      }
      const auto cu = static_cast<std::size_t>(c);
      if (seen_in_row[cu] == r) {
        return Status::Error(Where(src, line.number) + "column " + Quoted(line.words[i]) +
                             ": listed twice in check " + std::to_string(r));
      }
      seen_in_row[cu] = r;
      if (lifting > 0) {
        const int user = block_row_user[cu];
        if (user >= 0 && user / lifting == r / lifting) {
          return Status::Error(Where(src, line.number) + "column " + Quoted(line.words[i]) +
                               ": check " + std::to_string(r) + " shares it with check " +
                               std::to_string(user) + " of the same block row (lifting " +
                               std::to_string(lifting) + ")");
        }
        block_row_user[cu] = r;
      }
      row.push_back(c);
    }
  }
  if (next < lines.size()) {
    return Status::Error(Where(src, lines[next].number) + "text " + Quoted(lines[next].content) +
                         " after the " + std::to_string(m) + " check lines");
  }
  for (int v = 0; v < n; ++v) {
    if (seen_in_row[static_cast<std::size_t>(v)] < 0) {
      return Status::Error(src + ": column " + std::to_string(v) + " is in no check");
    }
  }
  Result<LdpcCode> code = LdpcCode::FromRows(n, rows, lifting);
  if (!code.ok()) return Status::Error(src + ": " + code.status().message());
  code.value().set_description(std::move(description));
  return code;
}

std::string WriteLdpcMatrix(const LdpcCode& code) {
  std::string out;
  out += "# capgap sparse parity-check matrix (format: blocks/fec/ldpc_matrix_file.h).\n";
  out += "# Header 'parity-check columns <N> rows <M> [lifting <Z>]', optional\n";
  out += "# 'description <text>', then one line per row r = 0..M-1: its 0-based column\n";
  out += "# indices ('-' for an empty row).\n";
  out += "parity-check columns " + std::to_string(code.length()) + " rows " +
         std::to_string(code.checks());
  if (code.lifting() > 0) out += " lifting " + std::to_string(code.lifting());
  out += '\n';
  std::string d = code.description();
  for (char& c : d) {
    if (c == '#' || c == '\n' || c == '\r') c = ' ';
  }
  const std::string_view dt = TrimSpaces(d);
  if (!dt.empty()) {
    out += "description ";
    out += dt;
    out += '\n';
  }
  const auto row_start = code.row_start();
  const auto var = code.edge_variable();
  for (int r = 0; r < code.checks(); ++r) {
    const int b = row_start[static_cast<std::size_t>(r)];
    const int e = row_start[static_cast<std::size_t>(r) + 1];
    if (b == e) out += '-';
    for (int k = b; k < e; ++k) {
      if (k > b) out += ' ';
      out += std::to_string(var[static_cast<std::size_t>(k)]);
    }
    out += '\n';
  }
  return out;
}

Result<LdpcCode> ReadLdpcMatrixFile(const std::string& path) {
  Result<std::string> text = ReadLdpcTextFile(path, kMaxLdpcMatrixFileBytes, "matrix file");
  if (!text.ok()) return text.status();
  return ReadLdpcMatrix(text.value(), path);
}

Status WriteLdpcMatrixFile(const std::string& path, const LdpcCode& code) {
  return WriteLdpcTextFileAtomically(path, WriteLdpcMatrix(code));
}

}  // namespace capgap
