// Information-bit sources: uniform random bits from a work unit's stream, and
// the ITU-T O.150 pseudo-random binary sequences.
//
// Random bits: block j of the stream supplies bits 128 j .. 128 j + 127 of the
// call, bit i = (word[(i % 128) / 32] >> (i % 32)) & 1; a call for n bits takes
// ceil(n / 128) blocks.
//
// PRBS (ITU-T Rec. O.150; polynomials and inversion from memory of that
// recommendation): 2^9-1 (x^9 + x^5 + 1), 2^15-1 (x^15 + x^14 + 1, inverted),
// 2^23-1 (x^23 + x^18 + 1, inverted), 2^31-1 (x^31 + x^28 + 1, inverted).
// Each is an n-stage Fibonacci shift register whose stage-n and stage-t outputs
// (t = 5, 14, 18, 28) are added modulo 2 and fed back to stage 1.
//
// Register and output, exactly: State::reg bit i (i = 0..n-1) holds stage i+1
// (bits n..31 are zero). One step computes f = reg[n-1] XOR reg[t-1], emits f
// (1 - f for the inverted sequences) and sets reg = ((reg << 1) | f) mod 2^n.
// So the non-inverted sequence a_k obeys a_k = a_{k-n} XOR a_{k-t}: the
// polynomial above is its connection polynomial 1 + x^t + x^n (the
// characteristic polynomial is the reciprocal x^n + x^(n-t) + 1; both are
// primitive), and just before a_k is emitted reg bit i = a_{k-1-i}. Bit 0 of
// the sequence is the first output from the all-ones register, StateAt(0).reg =
// 2^n - 1; e.g. PRBS9 starts 0 0 0 0 0 1 1 1 1 0. The period is 2^n - 1.
//
// The sequence is one continuous stream for a whole sweep point:
// the generator can jump to any bit index in O(order^2 log index) by GF(2)
// matrix powers, so work unit i starts exactly where unit i-1 ended whichever
// thread runs it.
#ifndef CAPGAP_BLOCKS_SOURCE_BIT_SOURCE_H_
#define CAPGAP_BLOCKS_SOURCE_BIT_SOURCE_H_

#include <cstdint>
#include <span>
#include <string>
#include <string_view>

#include "blocks/core/rng_stream.h"
#include "blocks/core/status.h"
#include "blocks/core/types.h"

namespace capgap {

// Uniform i.i.d. bits from `stream` (consumes ceil(bits.size() / 128) blocks).
void GenerateRandomBits(std::span<Bit> bits, RngStream& stream);

enum class PrbsOrder { k9 = 9, k15 = 15, k23 = 23, k31 = 31 };
// Words prbs9, prbs15, prbs23, prbs31 (case-insensitive); an error lists them.
Result<PrbsOrder> ParsePrbsOrder(std::string_view word);
std::string ToString(PrbsOrder order);

class PrbsGenerator {
 public:
  static Result<PrbsGenerator> Create(PrbsOrder order);
  int order() const { return order_; }
  std::uint64_t period() const { return (std::uint64_t{1} << order_) - 1; }

  // Generator state (the shift register, never all zero).
  struct State {
    std::uint32_t reg = 0;
  };
  // State whose next output is bit number `bit_index` of the sequence that
  // starts from the all-ones register: A^bit_index applied to the all-ones
  // register, A the one-step GF(2) matrix, evaluated by square-and-multiply
  // (at most 64 squarings; the index is not reduced modulo the period, so
  // StateAt(period()) == StateAt(0) is a property, not a shortcut).
  State StateAt(std::uint64_t bit_index) const;
  // Writes the next bits.size() sequence bits and advances `state`.
  void Generate(std::span<Bit> bits, State& state) const;

 private:
  int order_ = 9;
  int tap_ = 5;        // second feedback tap: x^order + x^tap + 1
  bool inverted_ = false;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SOURCE_BIT_SOURCE_H_
