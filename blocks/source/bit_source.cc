// Bit sources: Philox blocks unpacked to one bit per byte, and the O.150
// PRBS registers with a GF(2) jump to any bit index.
#include "blocks/source/bit_source.h"

#include <array>
#include <cctype>
#include <cstddef>
#include <cstring>

namespace capgap {
namespace {

// kSpread[v][i] = bit i of v: one byte of a Philox word becomes eight output
// bytes with a single 8-byte copy (byte arrays, so independent of endianness).
constexpr std::array<std::array<Bit, 8>, 256> MakeSpreadTable() {
  std::array<std::array<Bit, 8>, 256> table{};
  for (unsigned v = 0; v < 256; ++v) {
    for (unsigned i = 0; i < 8; ++i) table[v][i] = static_cast<Bit>((v >> i) & 1u);
  }
  return table;
}
constexpr std::array<std::array<Bit, 8>, 256> kSpread = MakeSpreadTable();

// Bits 0..127 of one block: bit i = (word[i / 32] >> (i % 32)) & 1.
inline void UnpackBlock(const PhiloxBlock& block, Bit* out) {
  for (int w = 0; w < 4; ++w) {
    const std::uint32_t word = block[static_cast<std::size_t>(w)];
    for (int byte = 0; byte < 4; ++byte) {
      std::memcpy(out + 32 * w + 8 * byte, kSpread[(word >> (8 * byte)) & 0xFFu].data(), 8);
    }
  }
}

// GF(2) linear maps on n-bit registers, stored by columns: col[j] = A e_j.
struct Gf2Matrix {
  std::array<std::uint32_t, 32> col{};
};

std::uint32_t Apply(const Gf2Matrix& a, std::uint32_t v, int n) {
  std::uint32_t r = 0;
  for (int j = 0; j < n; ++j) {
    // Branch-free: all-ones mask when bit j of v is set.
    r ^= a.col[static_cast<std::size_t>(j)] & (0u - ((v >> j) & 1u));
  }
  return r;
}

Gf2Matrix Multiply(const Gf2Matrix& a, const Gf2Matrix& b, int n) {  // a b
  Gf2Matrix c;
  for (int j = 0; j < n; ++j) {
    c.col[static_cast<std::size_t>(j)] = Apply(a, b.col[static_cast<std::size_t>(j)], n);
  }
  return c;
}

// Word-parallel register steps for x^N + x^T + 1: the next T outputs
// a_k..a_{k+T-1} depend only on the N stored ones (a_{k+j} = reg[N-1-j] XOR
// reg[T-1-j] for j < T), so one XOR of two shifted copies yields T bits at
// once; bit T-1-j of `next` is a_{k+j}. N and T are template parameters so
// the unpacking loop has a constant trip count.
template <int N, int T>
void GenerateFixed(std::span<Bit> bits, std::uint32_t& state_reg, int tap, bool inverted) {
  static_assert(0 < T && T < N && N <= 31);
  CAPGAP_DCHECK(tap == T);
  static_cast<void>(tap);
  constexpr std::uint64_t kMask = (std::uint64_t{1} << N) - 1;
  constexpr std::uint64_t kBlockMask = (std::uint64_t{1} << T) - 1;
  constexpr auto kBlock = static_cast<std::size_t>(T);
  const Bit flip = inverted ? Bit{1} : Bit{0};
  std::uint64_t reg = state_reg;
  Bit* out = bits.data();
  const std::size_t size = bits.size();
  std::size_t i = 0;
  for (; i + kBlock <= size; i += kBlock) {
    const std::uint64_t next = ((reg >> (N - T)) ^ reg) & kBlockMask;
    for (std::size_t j = 0; j < kBlock; ++j) {
      out[i + j] = static_cast<Bit>(((next >> (kBlock - 1 - j)) & 1u) ^ flip);
    }
    reg = ((reg << T) | next) & kMask;
  }
  for (; i < size; ++i) {  // the last < T bits one step at a time
    const std::uint64_t f = ((reg >> (N - 1)) ^ (reg >> (T - 1))) & 1u;
    out[i] = static_cast<Bit>(f ^ flip);
    reg = ((reg << 1) | f) & kMask;
  }
  state_reg = static_cast<std::uint32_t>(reg);
}

}  // namespace

void GenerateRandomBits(std::span<Bit> bits, RngStream& stream) {
  const std::size_t n = bits.size();
  Bit* out = bits.data();
  const std::size_t full = n / 128;
  for (std::size_t j = 0; j < full; ++j) UnpackBlock(stream.NextBlock(), out + 128 * j);
  const std::size_t rest = n - 128 * full;
  if (rest != 0) {
    std::array<Bit, 128> tail;
    UnpackBlock(stream.NextBlock(), tail.data());
    std::memcpy(out + 128 * full, tail.data(), rest);
  }
}

Result<PrbsOrder> ParsePrbsOrder(std::string_view word) {
  std::string w(word);
  for (char& ch : w) ch = static_cast<char>(std::tolower(static_cast<unsigned char>(ch)));
  if (w == "prbs9") return PrbsOrder::k9;
  if (w == "prbs15") return PrbsOrder::k15;
  if (w == "prbs23") return PrbsOrder::k23;
  if (w == "prbs31") return PrbsOrder::k31;
  return Status::Error("unknown PRBS '" + std::string(word) +
                       "'; valid: prbs9, prbs15, prbs23, prbs31");
}

std::string ToString(PrbsOrder order) { return "prbs" + std::to_string(static_cast<int>(order)); }

Result<PrbsGenerator> PrbsGenerator::Create(PrbsOrder order) {
  PrbsGenerator g;
  switch (order) {
    case PrbsOrder::k9:
      g.order_ = 9;
      g.tap_ = 5;
      g.inverted_ = false;
      break;
    case PrbsOrder::k15:
      g.order_ = 15;
      g.tap_ = 14;
      g.inverted_ = true;
      break;
    case PrbsOrder::k23:
      g.order_ = 23;
      g.tap_ = 18;
      g.inverted_ = true;
      break;
    case PrbsOrder::k31:
      g.order_ = 31;
      g.tap_ = 28;
      g.inverted_ = true;
      break;
    default:
      return Status::Error("prbs: unknown order " + std::to_string(static_cast<int>(order)) +
                           "; valid: 9, 15, 23, 31");
  }
  return g;
}

PrbsGenerator::State PrbsGenerator::StateAt(std::uint64_t bit_index) const {
  const int n = order_;
  const std::uint32_t mask = static_cast<std::uint32_t>((std::uint64_t{1} << n) - 1);
  // One step on the basis registers gives the step matrix's columns.
  Gf2Matrix power;
  for (int j = 0; j < n; ++j) {
    const std::uint32_t e = 1u << j;
    const std::uint32_t f = ((e >> (n - 1)) ^ (e >> (tap_ - 1))) & 1u;
    power.col[static_cast<std::size_t>(j)] = ((e << 1) | f) & mask;
  }
  std::uint32_t reg = mask;  // all ones: the state before bit 0
  for (std::uint64_t k = bit_index; k != 0; k >>= 1) {
    if (k & 1u) reg = Apply(power, reg, n);
    if (k > 1) power = Multiply(power, power, n);
  }
  return State{reg};
}

void PrbsGenerator::Generate(std::span<Bit> bits, State& state) const {
  CAPGAP_DCHECK(state.reg != 0 && state.reg < (std::uint64_t{1} << order_));
  switch (order_) {
    case 9:
      GenerateFixed<9, 5>(bits, state.reg, tap_, inverted_);
      break;
    case 15:
      GenerateFixed<15, 14>(bits, state.reg, tap_, inverted_);
      break;
    case 23:
      GenerateFixed<23, 18>(bits, state.reg, tap_, inverted_);
      break;
    default:
      GenerateFixed<31, 28>(bits, state.reg, tap_, inverted_);
      break;
  }
}

}  // namespace capgap
