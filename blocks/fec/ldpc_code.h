// Binary LDPC code given by its parity-check matrix H (m checks x n
// variables), stored sparsely twice: by rows (the edge numbering) and by
// columns (the edges of each variable, as indices into the row order). This
// is the structure every LDPC encoder, decoder and analysis in capgap reads.
//
// Edge numbering: the edges of check r are e = row_start()[r] ..
// row_start()[r+1]-1, in increasing variable order; edge e joins check r and
// variable edge_variable()[e]. The edges of variable v are
// col_edge()[col_start()[v] .. col_start()[v+1]-1], in increasing check order.
//
// A code built by lifting a base matrix keeps its lifting size Z
// (lifting() > 0): then rows r*Z .. r*Z+Z-1 form block row r, and no two
// rows of one block row share a variable, which layered decoders may use.
//
// Immutable after creation; one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_FEC_LDPC_CODE_H_
#define CAPGAP_BLOCKS_FEC_LDPC_CODE_H_

#include <cstdint>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"

namespace capgap {

class LdpcCode {
 public:
  // rows[r] lists the variables (columns) of check r, each in [0, n), no
  // duplicates within a row (order free; stored sorted). Every column must
  // appear in at least one row. Errors name the row and the column.
  static Result<LdpcCode> FromRows(int n, const std::vector<std::vector<int>>& rows,
                                   int lifting = 0);

  int length() const { return n_; }                        // n
  int checks() const { return static_cast<int>(row_start_.size()) - 1; }  // m
  int edges() const { return static_cast<int>(edge_variable_.size()); }
  int lifting() const { return lifting_; }                 // 0: not lifted
  std::span<const int> row_start() const { return row_start_; }        // m + 1
  std::span<const int> edge_variable() const { return edge_variable_; }  // E
  std::span<const int> col_start() const { return col_start_; }        // n + 1
  std::span<const int> col_edge() const { return col_edge_; }          // E
  int row_degree(int r) const { return row_start_[static_cast<std::size_t>(r) + 1] - row_start_[static_cast<std::size_t>(r)]; }
  int col_degree(int v) const { return col_start_[static_cast<std::size_t>(v) + 1] - col_start_[static_cast<std::size_t>(v)]; }

  // Free text carried with the code (construction and its parameters).
  const std::string& description() const { return description_; }
  void set_description(std::string d) { description_ = std::move(d); }

 private:
  LdpcCode() = default;
  int n_ = 0;
  int lifting_ = 0;
  std::vector<int> row_start_, edge_variable_, col_start_, col_edge_;
  std::string description_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_CODE_H_
