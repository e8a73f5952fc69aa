// Generator text format of BlockCode: reader and writer.
#include "blocks/fec/block_code_file.h"

#include <filesystem>
#include <system_error>
#include <vector>

#include "blocks/core/file_read.h"
#include "blocks/fec/ldpc_matrix_file.h"

namespace capgap {
namespace {

std::string Where(std::string_view source, int line) {
  return std::string(source) + ":" + std::to_string(line) + ": ";
}

std::string Quoted(std::string_view w) {
  std::string s;
  s.reserve(w.size() + 2);
  s += '\'';
  s.append(w);
  s += '\'';
  return s;
}

bool NameChar(char c) {
  return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' ||
         c == '-' || c == '.';
}

}  // namespace

Result<BlockCode> ReadBlockCode(std::string_view text, std::string_view source_name) {
  const std::vector<LdpcTextLine> lines = SplitLdpcTextLines(text);
  const std::string src(source_name);
  const std::string header_rule = "expected 'block-code n <N> k <K>'";
  if (lines.empty()) return Status::Error(src + ":1: no header line: " + header_rule);
  const LdpcTextLine& head = lines[0];
  const auto& hw = head.words;
  if (!(hw.size() == 5 && hw[0] == "block-code" && hw[1] == "n" && hw[3] == "k")) {
    return Status::Error(Where(src, head.number) + "header " + Quoted(head.content) + ": " +
                         header_rule);
  }
  int n = 0, k = 0;
  if (!ParseLdpcInt(hw[2], &n) || n < 1 || n > BlockCode::kMaxLength) {
    return Status::Error(Where(src, head.number) + "n = " + Quoted(hw[2]) +
                         ": must be an integer in [1, " + std::to_string(BlockCode::kMaxLength) +
                         "]");
  }
  if (!ParseLdpcInt(hw[4], &k) || k < 1 || k > BlockCode::kMaxInfoBits) {
    return Status::Error(Where(src, head.number) + "k = " + Quoted(hw[4]) +
                         ": must be an integer in [1, " + std::to_string(BlockCode::kMaxInfoBits) +
                         "] (the ML decoder visits all 2^k codewords)");
  }
  if (k > n) {
    return Status::Error(Where(src, head.number) + "k = " + std::to_string(k) +
                         ": must be <= n = " + std::to_string(n));
  }
  std::size_t next = 1;
  std::string name = src;
  if (next < lines.size() && lines[next].words[0] == "name") {
    if (lines[next].words.size() != 2) {
      return Status::Error(Where(src, lines[next].number) + "name line " +
                           Quoted(lines[next].content) + ": expected 'name <word>' (one word)");
    }
    name = std::string(lines[next].words[1]);
    ++next;
  }
  const auto un = static_cast<std::size_t>(n);
  std::vector<Bit> g(static_cast<std::size_t>(k) * un, 0);
  std::vector<int> row_line(static_cast<std::size_t>(k), 0);
  for (int r = 0; r < k; ++r, ++next) {
    if (next >= lines.size()) {
      return Status::Error(Where(src, lines.back().number) + "ends after " + std::to_string(r) +
                           " of k = " + std::to_string(k) + " generator rows");
    }
    const LdpcTextLine& line = lines[next];
    row_line[static_cast<std::size_t>(r)] = line.number;
    if (line.words.size() != 1) {
      return Status::Error(Where(src, line.number) + "row " + std::to_string(r) + " " +
                           Quoted(line.content) + ": must be one word of n = " + std::to_string(n) +
                           " characters '0'/'1' (no spaces)");
    }
    const std::string_view w = line.words[0];
    if (w.size() != un) {
      return Status::Error(Where(src, line.number) + "row " + std::to_string(r) + " has " +
                           std::to_string(w.size()) +
                           " characters: must have n = " + std::to_string(n));
    }
    for (std::size_t i = 0; i < un; ++i) {
      if (w[i] != '0' && w[i] != '1') {
        return Status::Error(Where(src, line.number) + "row " + std::to_string(r) + ": character " +
                             std::to_string(i) + " is " + Quoted(w.substr(i, 1)) +
                             ": must be '0' or '1'");
      }
      g[static_cast<std::size_t>(r) * un + i] = static_cast<Bit>(w[i] - '0');
    }
  }
  if (next < lines.size()) {
    return Status::Error(Where(src, lines[next].number) + Quoted(lines[next].content) +
                         ": unexpected after the k = " + std::to_string(k) + " generator rows");
  }
  const int dependent = BlockCode::FirstDependentRow(n, k, g);
  if (dependent >= 0) {
    return Status::Error(Where(src, row_line[static_cast<std::size_t>(dependent)]) + "row " +
                         std::to_string(dependent) +
                         ": is a GF(2) sum of earlier rows: the k rows must be linearly "
                         "independent (rank k)");
  }
  Result<BlockCode> code = BlockCode::Create(n, k, g, name);
  if (!code.ok()) return Status::Error(src + ": " + code.status().message());
  return code;
}

std::string WriteBlockCode(const BlockCode& code) {
  std::string out = "# capgap block code generator: header, name, then k rows of n bits\n";
  out.append("block-code n ").append(std::to_string(code.n()));
  out.append(" k ").append(std::to_string(code.k())).append("\n");
  std::string name;
  name.reserve(code.name().size() + 1);
  for (const char c : code.name()) name.push_back(NameChar(c) ? c : '_');
  if (name.empty()) name.push_back('_');
  out.append("name ").append(name).append("\n");
  const auto n = static_cast<std::size_t>(code.n());
  const std::span<const Bit> g = code.generator();
  for (int r = 0; r < code.k(); ++r) {
    for (std::size_t i = 0; i < n; ++i) {
      out += g[static_cast<std::size_t>(r) * n + i] != 0 ? '1' : '0';
    }
    out += '\n';
  }
  return out;
}

Result<BlockCode> ReadBlockCodeFile(const std::string& path) {
  std::error_code ec;
  const std::filesystem::file_status st = std::filesystem::status(path, ec);
  if (ec || !std::filesystem::exists(st)) return Status::Error(path + ": cannot open file");
  if (!std::filesystem::is_regular_file(st)) {
    return Status::Error(path + ": not a regular file: a generator must be read from one");
  }
  const std::uintmax_t size = std::filesystem::file_size(path, ec);
  if (ec) return Status::Error(path + ": cannot read the file size");
  if (size > kMaxBlockCodeFileBytes) {
    return Status::Error(path + ": " + std::to_string(size) + " bytes: must be at most " +
                         std::to_string(kMaxBlockCodeFileBytes) + " (1 MiB)");
  }
  // Bounded read: the type and size are checked again on the open
  // descriptor (the file may have changed since).
  Result<std::string> text = ReadRegularFile(path, kMaxBlockCodeFileBytes, "generator file", "file");
  if (!text.ok()) return text.status();
  return ReadBlockCode(text.value(), path);
}

Status WriteBlockCodeFile(const std::string& path, const BlockCode& code) {
  return WriteLdpcTextFileAtomically(path, WriteBlockCode(code));
}

}  // namespace capgap
