// LdpcCode: building the row and column views of H from row lists.
#include "blocks/fec/ldpc_code.h"

#include <algorithm>

namespace capgap {

Result<LdpcCode> LdpcCode::FromRows(int n, const std::vector<std::vector<int>>& rows,
                                    int lifting) {
  if (n <= 0) return Status::Error("LDPC code: length " + std::to_string(n) + " must be > 0");
  if (rows.empty()) return Status::Error("LDPC code: no parity checks");
  if (lifting < 0) return Status::Error("LDPC code: lifting " + std::to_string(lifting) + " must be >= 0");
  LdpcCode code;
  code.n_ = n;
  code.lifting_ = lifting;
  code.row_start_.assign(rows.size() + 1, 0);
  std::vector<int> col_count(static_cast<std::size_t>(n), 0);
  for (std::size_t r = 0; r < rows.size(); ++r) {
    std::vector<int> row = rows[r];
    std::sort(row.begin(), row.end());
    for (std::size_t i = 0; i < row.size(); ++i) {
      const int v = row[i];
      if (v < 0 || v >= n) {
        return Status::Error("LDPC code: row " + std::to_string(r) + " has column " +
                             std::to_string(v) + ", outside [0, " + std::to_string(n) + ")");
      }
      if (i > 0 && row[i - 1] == v) {
        return Status::Error("LDPC code: row " + std::to_string(r) + " lists column " +
                             std::to_string(v) + " twice");
      }
      code.edge_variable_.push_back(v);
      ++col_count[static_cast<std::size_t>(v)];
    }
    code.row_start_[r + 1] = static_cast<int>(code.edge_variable_.size());
  }
  code.col_start_.assign(static_cast<std::size_t>(n) + 1, 0);
  for (int v = 0; v < n; ++v) {
    if (col_count[static_cast<std::size_t>(v)] == 0) {
      return Status::Error("LDPC code: column " + std::to_string(v) + " is in no parity check");
    }
    code.col_start_[static_cast<std::size_t>(v) + 1] =
        code.col_start_[static_cast<std::size_t>(v)] + col_count[static_cast<std::size_t>(v)];
  }
  // Rows are visited in increasing order, so each column's edges come out in
  // increasing check order.
  code.col_edge_.assign(code.edge_variable_.size(), 0);
  std::vector<int> fill(code.col_start_.begin(), code.col_start_.end() - 1);
  for (std::size_t e = 0; e < code.edge_variable_.size(); ++e) {
    const auto v = static_cast<std::size_t>(code.edge_variable_[e]);
    code.col_edge_[static_cast<std::size_t>(fill[v]++)] = static_cast<int>(e);
  }
  return code;
}

}  // namespace capgap
