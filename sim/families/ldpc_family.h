// Code family of LDPC codes: its registry entry (sim/chain/registry.cc).
#ifndef CAPGAP_SIM_FAMILIES_LDPC_FAMILY_H_
#define CAPGAP_SIM_FAMILIES_LDPC_FAMILY_H_

#include <cstdint>

#include "sim/chain/registry.h"

namespace capgap {

extern const CodeFamily kLdpcFamily;

// Memory an LDPC scheme needs, estimated from its sizes before anything
// large is allocated (the `memory_limit_mb` rule). Upper estimates:
//   code: H by rows and by columns, the construction's adjacency lists and
//     the decoder's copy of the graph, 32 (n + m) + 24 E bytes;
//   encoder: the general path's bit-packed m x n elimination matrix and
//     packed parity columns (LdpcEncoder::GeneralPathBytes), 0 on the
//     dual-diagonal path;
//   per thread: the decoder's message arrays for up to 64 bytes of SIMD
//     lanes per entry, 64 (4 n + E), plus the chain's batch buffers
//     (LLRs, bits, decisions, symbols), 7 n per frame of a decoder batch
//     (LdpcChannelCode::BatchFrames) + 24 n.
struct LdpcMemoryEstimate {
  std::uint64_t code_bytes = 0;
  std::uint64_t encoder_bytes = 0;
  std::uint64_t per_thread_bytes = 0;
  int threads = 1;
  std::uint64_t total_bytes() const {
    return code_bytes + encoder_bytes + per_thread_bytes * static_cast<std::uint64_t>(threads);
  }
};
// n variables, m checks, `edges` ones of H; `dual_diagonal`: the encoder
// takes its linear-time path.
LdpcMemoryEstimate EstimateLdpcMemory(std::int64_t n, std::int64_t m, std::int64_t edges,
                                      bool dual_diagonal, std::uint32_t unit_frames, int threads);
// Bytes as whole MiB, rounded up ("MB" in messages).
std::uint64_t CeilMegabytes(std::uint64_t bytes);

}  // namespace capgap

#endif  // CAPGAP_SIM_FAMILIES_LDPC_FAMILY_H_
