// Systematic LDPC encoder: GF(2) elimination of H once, packed-column parity
// accumulation per codeword, and the linear-time dual-diagonal QC path.
#include "blocks/fec/ldpc_encoder.h"

#include <algorithm>
#include <bit>
#include <cstdint>
#include <cstring>
#include <string>

namespace capgap {
namespace {

using Index = std::size_t;
Index U(int i) { return static_cast<Index>(i); }

// Parity words accumulated per pass in Encode: a fixed 8 words (512 parity
// bits) so that the accumulator lives in registers (four 128-bit vectors
// with the baseline x86-64 instruction set) and the inner loop is fully
// unrolled; the packed columns are stored chunk by chunk so each pass reads
// one contiguous array.
constexpr int kChunkWords = 8;

}  // namespace

bool LdpcEncoder::HasDualDiagonalPath(const LdpcCode& code) {
  const std::optional<BaseMatrix> base = RecoverBaseMatrix(code);
  return base && FindDualDiagonal(*base).has_value();
}

std::uint64_t LdpcEncoder::GeneralPathBytes(std::int64_t n, std::int64_t m) {
  if (n <= 0 || m <= 0) return 0;
  const auto un = static_cast<std::uint64_t>(n), um = static_cast<std::uint64_t>(m);
  const std::uint64_t rank = std::min(um, un);
  const std::uint64_t k = un - rank;
  const auto chunk_words = static_cast<std::uint64_t>(kChunkWords);
  const std::uint64_t chunk_bits = 64 * chunk_words;
  const std::uint64_t rows = um * ((un + 63) / 64) * 8;
  const std::uint64_t tables = (rank + chunk_bits - 1) / chunk_bits * ((k + 3) / 4) * 16 *
                               chunk_words * 8;
  return rows + tables + un;  // + the pivot flags
}

Result<LdpcEncoder> LdpcEncoder::Create(std::shared_ptr<const LdpcCode> code, Method method,
                                        const std::atomic<bool>* stop) {
  if (!code) return Status::Error("LDPC encoder: no code");
  LdpcEncoder enc;
  enc.code_ = std::move(code);
  const LdpcCode& h = *enc.code_;
  const int n = h.length();
  const int m = h.checks();
  enc.n_ = n;

  if (method == Method::kAuto) {
    const std::optional<BaseMatrix> base = RecoverBaseMatrix(h);
    if (base) {
      const std::optional<DualDiagonalStructure> dd = FindDualDiagonal(*base);
      if (dd) {
        enc.dual_diagonal_ = true;
        enc.z_ = h.lifting();
        enc.base_rows_ = base->rows;
        enc.structure_ = *dd;
        enc.k_ = dd->info_block_cols * enc.z_;
        enc.info_positions_.resize(U(enc.k_));
        for (int i = 0; i < enc.k_; ++i) enc.info_positions_[U(i)] = i;
        enc.block_row_start_.assign(U(base->rows) + 1, 0);
        for (int r = 0; r < base->rows; ++r) {
          for (int c = 0; c < dd->info_block_cols; ++c) {
            const int s = base->shift(r, c);
            if (s >= 0) enc.info_blocks_.push_back({c, s});
          }
          enc.block_row_start_[U(r) + 1] = static_cast<int>(enc.info_blocks_.size());
        }
        return enc;
      }
    }
  }

  // General path: Gauss-Jordan on packed rows, pivots searched from column
  // n-1 down to 0.
  const int row_words = (n + 63) / 64;
  std::vector<std::uint64_t> rows(U(m) * U(row_words), 0);
  const auto row_start = h.row_start();
  const auto var = h.edge_variable();
  for (int r = 0; r < m; ++r) {
    std::uint64_t* row = &rows[U(r) * U(row_words)];
    for (int e = row_start[U(r)]; e < row_start[U(r) + 1]; ++e) {
      const int v = var[U(e)];
      row[U(v / 64)] |= std::uint64_t{1} << (v % 64);
    }
  }
  auto bit = [&](int r, int c) { return (rows[U(r) * U(row_words) + U(c / 64)] >> (c % 64)) & 1u; };
  std::vector<int> pivot_col;
  std::vector<std::uint8_t> is_pivot(U(n), 0);
  int rank = 0;
  for (int c = n - 1; c >= 0 && rank < m; --c) {
    // One column costs at most m row operations of n/64 words (about 10 ms
    // at n = 65536), so the flag is seen well within a second.
    if (stop && stop->load(std::memory_order_relaxed)) {
      return Status::Stopped("LDPC encoder: stopped during the elimination (" +
                             std::to_string(n - 1 - c) + " of " + std::to_string(n) +
                             " columns done)");
    }
    int p = -1;
    for (int r = rank; r < m; ++r) {
      if (bit(r, c)) {
        p = r;
        break;
      }
    }
    if (p < 0) continue;
    if (p != rank) {
      std::swap_ranges(rows.begin() + static_cast<std::ptrdiff_t>(U(p) * U(row_words)),
                       rows.begin() + static_cast<std::ptrdiff_t>(U(p + 1) * U(row_words)),
                       rows.begin() + static_cast<std::ptrdiff_t>(U(rank) * U(row_words)));
    }
    const std::uint64_t* prow = &rows[U(rank) * U(row_words)];
    for (int r = 0; r < m; ++r) {
      if (r == rank || !bit(r, c)) continue;
      std::uint64_t* row = &rows[U(r) * U(row_words)];
      for (int w = 0; w < row_words; ++w) row[U(w)] ^= prow[U(w)];
    }
    pivot_col.push_back(c);
    is_pivot[U(c)] = 1;
    ++rank;
  }
  enc.k_ = n - rank;
  if (enc.k_ == 0) {
    return Status::Error("LDPC encoder: H has full column rank " + std::to_string(n) +
                         ": no information bits");
  }
  for (int c = 0; c < n; ++c) {
    if (!is_pivot[U(c)]) enc.info_positions_.push_back(c);
  }
  // Reduced rows in the order of their pivot columns (increasing): the
  // parity bits then come out in runs of consecutive codeword positions
  // (PEG codes: one run, the last m columns). Reordering the rows of the
  // reduced system changes no codeword.
  std::vector<int> order(U(rank));
  for (int r = 0; r < rank; ++r) order[U(r)] = r;
  std::sort(order.begin(), order.end(),
            [&](int a, int b) { return pivot_col[U(a)] < pivot_col[U(b)]; });
  enc.parity_positions_.resize(U(rank));
  for (int r = 0; r < rank; ++r) enc.parity_positions_[U(r)] = pivot_col[U(order[U(r)])];
  enc.chunks_ = (rank + 64 * kChunkWords - 1) / (64 * kChunkWords);
  enc.groups_ = (enc.k_ + 3) / 4;
  // Nibble tables: entry (chunk, g, idx) is the XOR of the packed parity
  // columns of info bits 4g + j (j = 0..3) for which bit 3 - j of idx is
  // set; bit b of word w is M[r][i] with r = (chunk * kChunkWords + w) * 64
  // + b in the sorted row order (zero beyond rank and beyond k).
  enc.table_storage_.assign(U(enc.chunks_) * U(enc.groups_) * 16 * U(kChunkWords) + 8, 0);
  enc.table_offset_ = 0;
  while ((reinterpret_cast<std::uintptr_t>(enc.table_storage_.data() + enc.table_offset_) & 63) != 0) {
    ++enc.table_offset_;
  }
  std::uint64_t* tables = enc.table_storage_.data() + enc.table_offset_;
  for (int chunk = 0; chunk < enc.chunks_; ++chunk) {
    const int r_begin = chunk * kChunkWords * 64;
    const int r_end = std::min(rank, r_begin + kChunkWords * 64);
    for (int g = 0; g < enc.groups_; ++g) {
      std::uint64_t col[4][kChunkWords] = {};
      for (int j = 0; j < 4 && 4 * g + j < enc.k_; ++j) {
        const int c = enc.info_positions_[U(4 * g + j)];
        for (int r = r_begin; r < r_end; ++r) {
          if (bit(order[U(r)], c)) {
            const int rel = r - r_begin;
            col[j][rel / 64] |= std::uint64_t{1} << (rel % 64);
          }
        }
      }
      std::uint64_t* entry = tables + (U(chunk) * U(enc.groups_) + U(g)) * 16 * U(kChunkWords);
      for (int idx = 0; idx < 16; ++idx) {
        for (int j = 0; j < 4; ++j) {
          if ((idx >> (3 - j)) & 1) {
            for (int w = 0; w < kChunkWords; ++w) entry[U(idx) * U(kChunkWords) + U(w)] ^= col[j][w];
          }
        }
      }
    }
    // Parity runs of this chunk: consecutive rows at consecutive positions.
    for (int r = r_begin; r < r_end;) {
      int e = r + 1;
      while (e < r_end && enc.parity_positions_[U(e)] == enc.parity_positions_[U(e - 1)] + 1) ++e;
      enc.parity_runs_.push_back({r - r_begin, e - r_begin, enc.parity_positions_[U(r)], chunk});
      r = e;
    }
  }
  // Info runs: consecutive info bits at consecutive positions.
  for (int i = 0; i < enc.k_;) {
    int e = i + 1;
    while (e < enc.k_ && enc.info_positions_[U(e)] == enc.info_positions_[U(e - 1)] + 1) ++e;
    enc.info_runs_.push_back({i, e, enc.info_positions_[U(i)], 0});
    i = e;
  }
  return enc;
}

void LdpcEncoder::Encode(std::span<const Bit> info, std::span<Bit> codeword) const {
  CAPGAP_DCHECK(info.size() == U(k_));
  CAPGAP_DCHECK(codeword.size() == U(n_));
  if (dual_diagonal_) {
    EncodeDualDiagonal(info, codeword);
  } else {
    EncodeGeneral(info, codeword);
  }
}

namespace {

// kSpreadBits[x][j] = bit j of x: eight decisions of one byte as eight
// 0/1 bytes, written with one 8-byte copy.
struct SpreadTable {
  std::uint8_t bytes[256][8];
  constexpr SpreadTable() : bytes{} {
    for (int x = 0; x < 256; ++x) {
      for (int j = 0; j < 8; ++j) bytes[x][j] = static_cast<std::uint8_t>((x >> j) & 1);
    }
  }
};
constexpr SpreadTable kSpreadBits;

// Index of the nibble table entry of info bits b0..b3 (one per byte, only
// the lowest bit of each read): b0 8 + b1 4 + b2 2 + b3. With the four
// bytes as a little-endian word x = b0 + b1 2^8 + b2 2^16 + b3 2^24 (after
// masking the lowest bits), x (1 + 2^9 + 2^18 + 2^27) holds b3, b2, b1, b0
// in bits 24..27 and, below bit 24, only the partial products b0 (bits 0,
// 9, 18), b1 (8, 17) and b2 (16), which never overlap, so nothing carries
// into them.
inline unsigned NibbleIndex(const Bit* b) {
  std::uint32_t x;
  std::memcpy(&x, b, 4);
  if constexpr (std::endian::native != std::endian::little) {
    x = (std::uint32_t{b[0]}) | (std::uint32_t{b[1]} << 8) | (std::uint32_t{b[2]} << 16) |
        (std::uint32_t{b[3]} << 24);
  }
  return ((x & 0x01010101u) * 0x08040201u) >> 24 & 0xFu;
}

}  // namespace

void LdpcEncoder::EncodeGeneral(std::span<const Bit> info, std::span<Bit> codeword) const {
  const int k = k_;
  const Bit* in = info.data();
  Bit* out = codeword.data();
  for (const Run& run : info_runs_) {
    std::memcpy(out + run.position, in + run.begin, U(run.end - run.begin));
  }
  const int full_groups = k / 4;
  const std::uint64_t* tables = table_storage_.data() + table_offset_;
  std::size_t next_run = 0;
  for (int chunk = 0; chunk < chunks_; ++chunk) {
    // Four 2 x 64-bit accumulators (GCC/Clang vector extension: SSE2 on
    // baseline x86-64, NEON on Arm, plain words elsewhere); one 64-byte
    // table entry per four info bits.
    typedef std::uint64_t V2 __attribute__((vector_size(16)));
    V2 a0 = {0, 0}, a1 = a0, a2 = a0, a3 = a0;
    const std::uint64_t* t = tables + U(chunk) * U(groups_) * 16 * U(kChunkWords);
    auto add = [&](const std::uint64_t* e) {
      V2 c0, c1, c2, c3;
      std::memcpy(&c0, e + 0, sizeof(V2));
      std::memcpy(&c1, e + 2, sizeof(V2));
      std::memcpy(&c2, e + 4, sizeof(V2));
      std::memcpy(&c3, e + 6, sizeof(V2));
      a0 ^= c0;
      a1 ^= c1;
      a2 ^= c2;
      a3 ^= c3;
    };
    for (int g = 0; g < full_groups; ++g, t += 16 * kChunkWords) {
      add(t + NibbleIndex(in + 4 * g) * kChunkWords);
    }
    if (full_groups < groups_) {
      Bit last[4] = {0, 0, 0, 0};
      for (int i = 4 * full_groups; i < k; ++i) last[i - 4 * full_groups] = in[i];
      add(t + NibbleIndex(last) * kChunkWords);
    }
    const std::uint64_t acc[kChunkWords] = {a0[0], a0[1], a1[0], a1[1], a2[0], a2[1], a3[0], a3[1]};
    // Parity runs of this chunk, eight decisions per byte copy.
    for (; next_run < parity_runs_.size() && parity_runs_[next_run].chunk == chunk; ++next_run) {
      const Run& run = parity_runs_[next_run];
      Bit* dst = out + run.position;
      int r = run.begin;
      for (; r + 8 <= run.end; r += 8, dst += 8) {
        const int w = r / 64, o = r % 64;
        std::uint64_t v = acc[w] >> o;
        if (o > 56) v |= acc[w + 1] << (64 - o);
        std::memcpy(dst, kSpreadBits.bytes[v & 0xFFu], 8);
      }
      for (; r < run.end; ++r, ++dst) *dst = static_cast<Bit>((acc[r / 64] >> (r % 64)) & 1u);
    }
  }
}

void LdpcEncoder::EncodeDualDiagonal(std::span<const Bit> info, std::span<Bit> codeword) const {
  const int z = z_;
  const int rr = base_rows_;
  const int k = k_;
  std::copy(info.begin(), info.end(), codeword.begin());
  Bit* p = codeword.data() + k;  // parity block j at p + j*z
  auto slot = [&](int j) { return p + static_cast<std::ptrdiff_t>(j) * z; };
  // lambda_i into slot i+1 for i < R-1 and lambda_{R-1} into slot 0.
  for (int br = 0; br < rr; ++br) {
    Bit* dst = slot(br + 1 < rr ? br + 1 : 0);
    std::fill(dst, dst + z, Bit{0});
    for (int b = block_row_start_[U(br)]; b < block_row_start_[U(br) + 1]; ++b) {
      const Block& blk = info_blocks_[U(b)];
      const Bit* u = codeword.data() + static_cast<std::ptrdiff_t>(blk.col) * z;
      const int s = blk.shift;
      // (P^s u)[t] = u[(t + s) mod Z], in two straight runs.
      for (int t = 0; t < z - s; ++t) dst[t] ^= u[t + s];
      for (int t = z - s; t < z; ++t) dst[t] ^= u[t + s - z];
    }
  }
  // sigma = sum of all lambda, in slot 0.
  Bit* p0 = slot(0);
  for (int j = 1; j < rr; ++j) {
    const Bit* l = slot(j);
    for (int t = 0; t < z; ++t) p0[t] ^= l[t];
  }
  // P^b p0 = sigma  =>  p0[t] = sigma[(t - b) mod Z]: rotate right by b.
  const int b = structure_.shift_b;
  std::rotate(p0, p0 + (z - b) % z, p0 + z);
  // p1 = lambda_0 + P^a p0.
  {
    const int a = structure_.shift_a;
    Bit* p1 = slot(1);
    for (int t = 0; t < z - a; ++t) p1[t] ^= p0[t + a];
    for (int t = z - a; t < z; ++t) p1[t] ^= p0[t + a - z];
  }
  // p_{i+1} = lambda_i + p_i (+ P^b p0 at the middle row x).
  for (int i = 1; i + 1 < rr; ++i) {
    Bit* next = slot(i + 1);
    const Bit* cur = slot(i);
    for (int t = 0; t < z; ++t) next[t] ^= cur[t];
    if (i == structure_.middle_row) {
      for (int t = 0; t < z - b; ++t) next[t] ^= p0[t + b];
      for (int t = z - b; t < z; ++t) next[t] ^= p0[t + b - z];
    }
  }
}

bool LdpcEncoder::IsCodeword(std::span<const Bit> codeword) const {
  CAPGAP_DCHECK(codeword.size() == U(n_));
  const LdpcCode& h = *code_;
  const auto row_start = h.row_start();
  const auto var = h.edge_variable();
  for (int r = 0; r < h.checks(); ++r) {
    unsigned parity = 0;
    for (int e = row_start[U(r)]; e < row_start[U(r) + 1]; ++e) {
      parity ^= codeword[U(var[U(e)])];
    }
    if (parity & 1u) return false;
  }
  return true;
}

}  // namespace capgap
