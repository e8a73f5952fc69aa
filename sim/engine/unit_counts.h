// What a work unit counts and why a point stopped: the vocabulary shared by
// the chain (which fills UnitCounts), the engine (which sums them over the
// counted prefix of units), the checkpoint and the MPI messages (which carry
// every field through ForEachCountField, sim/io/checkpoint.h).
#ifndef CAPGAP_SIM_ENGINE_UNIT_COUNTS_H_
#define CAPGAP_SIM_ENGINE_UNIT_COUNTS_H_

#include <algorithm>
#include <cstdint>
#include <string>

#include "blocks/core/status.h"

namespace capgap {

struct UnitCounts {
  std::uint64_t bits = 0;          // information bits
  std::uint64_t bit_errors = 0;
  std::uint64_t frames = 0;
  std::uint64_t frame_errors = 0;
  // Iterative decoders (LDPC): iterations summed over frames, the largest
  // count of one frame, and frames that converged to a wrong codeword (zero
  // syndrome, info bits wrong). Zero for other schemes.
  std::uint64_t decoder_iterations = 0;
  std::uint32_t max_decoder_iterations = 0;
  std::uint64_t undetected_frame_errors = 0;
  UnitCounts& operator+=(const UnitCounts& o) {
    bits += o.bits;
    bit_errors += o.bit_errors;
    frames += o.frames;
    frame_errors += o.frame_errors;
    decoder_iterations += o.decoder_iterations;
    max_decoder_iterations = std::max(max_decoder_iterations, o.max_decoder_iterations);
    undetected_frame_errors += o.undetected_frame_errors;
    return *this;
  }
  bool operator==(const UnitCounts&) const = default;
};

enum class StopReason { kStopBitErrors, kStopBits, kInterrupted, kStopFrameErrors };
std::string ToString(StopReason reason);
// Inverse of ToString (checkpoint files).
Result<StopReason> ParseStopReason(const std::string& word);

}  // namespace capgap

#endif  // CAPGAP_SIM_ENGINE_UNIT_COUNTS_H_
