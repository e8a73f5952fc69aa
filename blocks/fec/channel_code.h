// The code-family role: what the one simulated chain (sim/chain/chain.h)
// needs of any channel code, and nothing else. A family (uncoded,
// convolutional, LDPC, short block codes, ...) implements it once in blocks/;
// its sim/families/ file builds it from the scheme's keys. The chain never
// asks which family it runs.
//
// Bookkeeping lives inside each implementation: info_bits() information bits
// in, coded_bits() transmitted bits out per frame, and rate() = the effective
// code rate that the Eb/N0 bookkeeping uses (blocks/core/energy.h: Es/N0 =
// rate * bits_per_symbol * Eb/N0), tail bits and puncturing included. Where
// the information bits sit inside a codeword is the family's business:
// Decode returns information-bit decisions.
//
// LLR convention: L = ln P(b=0|y) / P(b=1|y), L > 0 favours bit 0.
//
// Decoding works on batches: Decode takes `frames` frames side by side
// (frames = results.size()), frame f's LLRs at llrs[f * coded_bits() ...]
// and its decisions at info[f * info_bits() ...]. Each frame's decisions are
// exactly what decoding it alone gives, so the batch size never changes a
// count. batch_frames(unit_frames) says how many frames the family wants per
// call (1, or a whole unit for decoders that take frames across SIMD lanes).
//
// Immutable after construction; one instance is shared by all threads, each
// with its own Workspace (MakeWorkspace once per thread). Encode and Decode
// allocate nothing; a virtual call happens once per frame or batch, never per
// bit.
#ifndef CAPGAP_BLOCKS_FEC_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_CHANNEL_CODE_H_

#include <cstddef>
#include <cstdint>
#include <memory>
#include <span>

#include "blocks/core/types.h"

namespace capgap {

// What a decoder reports per frame besides its decisions. Non-iterative
// decoders leave iterations at 0 and converged false.
struct FrameDecodeResult {
  std::uint32_t iterations = 0;  // decoder iterations spent on the frame
  bool converged = false;        // stopped on a valid codeword (zero syndrome)
};

class ChannelCode {
 public:
  // Per-thread mutable state of Encode/Decode (delay lines, path metrics,
  // edge messages, batch buffers).
  class Workspace {
   public:
    virtual ~Workspace() = default;
  };

  virtual ~ChannelCode() = default;

  virtual std::size_t info_bits() const = 0;   // per frame
  virtual std::size_t coded_bits() const = 0;  // transmitted per frame
  // Effective rate, information bits over transmitted bits.
  virtual double rate() const = 0;
  // True when coded bits are the information bits (no code): the chain may
  // then take its uncoded fast paths (fused BPSK, hard decisions straight
  // from the demapper).
  virtual bool identity() const { return false; }
  // True when the decoder is iterative and reports iterations and
  // convergence (the output then carries iteration statistics).
  virtual bool iterative() const { return false; }
  // Frames per Decode call wanted for a work unit of unit_frames frames.
  virtual std::uint32_t batch_frames(std::uint32_t /*unit_frames*/) const { return 1; }

  // A workspace for batches of up to max_frames frames.
  virtual std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const = 0;

  // One frame. REQUIRES: info.size() == info_bits(), coded.size() ==
  // coded_bits(); bits are 0/1.
  virtual void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const = 0;

  // results.size() frames. REQUIRES: llrs.size() == frames * coded_bits(),
  // info.size() == frames * info_bits(), frames <= the workspace's max_frames.
  virtual void Decode(std::span<const float> llrs, std::span<Bit> info,
                      std::span<FrameDecodeResult> results, Workspace& ws) const = 0;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_CHANNEL_CODE_H_
