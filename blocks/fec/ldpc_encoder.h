// Systematic encoder for any binary LDPC code (LdpcCode): the k = n - rank(H)
// information bits are copied to info_positions() of the codeword and the
// remaining rank(H) parity bits are computed so that H c = 0 (mod 2).
//
// General path (any H, also rank-deficient): Create() runs GF(2)
// Gauss-Jordan elimination on H once, rows bit-packed in 64-bit words. Pivot
// columns are searched from the last column (n-1) towards the first, so the
// parity positions are the rightmost set of independent columns found
// greedily and the info positions are the remaining ones (for a code whose
// last m columns are independent: info = 0 .. k-1). Rows that become zero
// (redundant checks) are dropped. Each reduced row r reads
// c[pivot_r] = XOR_i M[r][i] u_i over the info bits u_i. Create() sorts the
// rows by pivot column and stores, per four info bits and per 512 rows, a
// table of the 16 XOR combinations of their packed columns (M[.][i]; the
// grouping of the "method of four Russians", V. L. Arlazarov, E. A. Dinic,
// M. A. Kronrod, I. A. Faradzev, 1970; from memory); Encode() XORs one 64-byte entry per four info
// bits into a packed parity accumulator, i.e. k / 4 * ceil(rank / 512)
// cache lines per codeword, and writes the parity bits in runs of
// consecutive positions, eight per byte copy.
//
// Dual-diagonal path (Method::kAuto, a lifted code whose blocks are shifted
// identities and whose base matrix has the dual-diagonal parity part of
// blocks/fec/ldpc_construction.h, FindDualDiagonal): linear-time encoding in
// the manner of T. Richardson and R. Urbanke, "Efficient encoding of
// low-density parity-check codes", IEEE Trans. Inf. Theory 47(2), 2001, for
// that structure. With P^s the block shifted by s ((P^s x)[t] =
// x[(t + s) mod Z]), lambda_i = sum over the information blocks of block row
// i of P^s u_c, and p_0 .. p_{R-1} the parity blocks (block columns K ..
// K+R-1): summing all block rows cancels the staircase and the two P^a
// terms, so P^b p_0 = sum_i lambda_i; then p_1 = lambda_0 + P^a p_0 and
// p_{i+1} = lambda_i + p_i (+ P^b p_0 at i = x) for i = 1 .. R-2 (the last
// block row then holds automatically). Info positions are 0 .. k-1 with
// k = K Z, and the parity part is invertible, so the codeword equals the
// general path's for the same info bits (both put info in 0 .. k-1).
//
// Immutable after Create(); one instance may be shared by all threads.
#ifndef CAPGAP_BLOCKS_FEC_LDPC_ENCODER_H_
#define CAPGAP_BLOCKS_FEC_LDPC_ENCODER_H_

#include <atomic>
#include <cstdint>
#include <memory>
#include <span>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/core/types.h"
#include "blocks/fec/ldpc_code.h"
#include "blocks/fec/ldpc_construction.h"

namespace capgap {

class LdpcEncoder {
 public:
  enum class Method {
    kAuto,     // dual-diagonal path when the structure is found, else general
    kGeneral,  // always the elimination path
  };
  // Errors: null code; a code with no information bits (rank(H) = n).
  // The general path's elimination takes O(m^2 n / 64) word operations
  // (about 3 s at n = 16384, m = 8192); `stop` is checked between pivot
  // columns and, once it reads true, Create returns Status::Stopped.
  static Result<LdpcEncoder> Create(std::shared_ptr<const LdpcCode> code,
                                    Method method = Method::kAuto,
                                    const std::atomic<bool>* stop = nullptr);

  // True when Create(code, kAuto) takes the dual-diagonal path (no dense
  // matrix, linear-time encoding).
  static bool HasDualDiagonalPath(const LdpcCode& code);
  // Peak bytes of the general path's Create for n variables and m checks:
  // the bit-packed m x n elimination matrix plus the nibble tables (16
  // entries of 512 parity bits per four info bits and 512 parity rows:
  // about m n / 8 + m (n - m) / 2). For memory checks before Create.
  static std::uint64_t GeneralPathBytes(std::int64_t n, std::int64_t m);

  int info_bits() const { return k_; }  // k = n - rank(H)
  int length() const { return n_; }     // n
  int rank() const { return n_ - k_; }  // rank of H over GF(2)
  // Where the k info bits sit in the codeword, increasing.
  std::span<const int> info_positions() const { return info_positions_; }
  bool uses_dual_diagonal() const { return dual_diagonal_; }
  const LdpcCode& code() const { return *code_; }

  // REQUIRES: info.size() == info_bits(), codeword.size() == length(); bits
  // 0/1; the two spans do not overlap. No allocation.
  void Encode(std::span<const Bit> info, std::span<Bit> codeword) const;
  // H c = 0 (mod 2). REQUIRES codeword.size() == length().
  bool IsCodeword(std::span<const Bit> codeword) const;

 private:
  LdpcEncoder() = default;
  void EncodeGeneral(std::span<const Bit> info, std::span<Bit> codeword) const;
  void EncodeDualDiagonal(std::span<const Bit> info, std::span<Bit> codeword) const;

  std::shared_ptr<const LdpcCode> code_;
  int n_ = 0;
  int k_ = 0;
  std::vector<int> info_positions_;
  // General path.
  std::vector<int> parity_positions_;  // pivot column of reduced row r, increasing
  int chunks_ = 0;                     // ceil(rank / 512)
  int groups_ = 0;                     // ceil(k / 4)
  // Nibble tables, chunks_ x groups_ x 16 entries of 8 words (see .cc),
  // starting at table_offset_ (64-byte aligned: one entry, one cache line).
  std::vector<std::uint64_t> table_storage_;
  std::size_t table_offset_ = 0;
  // Runs of consecutive indices at consecutive codeword positions: info
  // bits [begin, end) at position.. (chunk 0), or the parity rows
  // [begin, end) of a chunk, relative to its first row.
  struct Run {
    int begin, end, position, chunk;
  };
  std::vector<Run> info_runs_;
  std::vector<Run> parity_runs_;
  // Dual-diagonal path.
  bool dual_diagonal_ = false;
  int z_ = 0;
  int base_rows_ = 0;
  DualDiagonalStructure structure_;
  struct Block {
    int col;    // information block column
    int shift;  // in [0, Z)
  };
  std::vector<int> block_row_start_;  // base_rows_ + 1
  std::vector<Block> info_blocks_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_ENCODER_H_
