// Information-bit sources: uniform random bits from a work unit's stream, and
// the ITU-T O.150 pseudo-random binary sequences.
//
// Random bits: block j of the stream supplies bits 128 j .. 128 j + 127 of the
// call, bit i = (word[(i % 128) / 32] >> (i % 32)) & 1; a call for n bits takes
// ceil(n / 128) blocks.
//
// PRBS (ITU-T Rec. O.150): 2^9-1 (x^9 + x^5 + 1), 2^15-1 (x^15 + x^14 + 1,
// inverted), 2^23-1 (x^23 + x^18 + 1, inverted), 2^31-1 (x^31 + x^28 + 1,
// inverted). The sequence is one continuous stream for a whole sweep point:
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
Result<PrbsOrder> ParsePrbsOrder(std::string_view word);  // prbs9, prbs15, prbs23, prbs31
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
  // starts from the all-ones register.
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
