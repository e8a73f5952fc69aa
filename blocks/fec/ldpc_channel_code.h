// LDPC codes in the code-family role (channel_code.h): an LdpcCode with its
// systematic encoder and its decoder (ldpc_encoder.h, ldpc_decoder.h).
// info_bits() = k = n - rank(H) at the encoder's info_positions();
// coded_bits() = n; rate() = k / n. Decoding takes many frames per call
// (BatchFrames: frames side by side in the decoder's SIMD lanes); every frame's result is
// what decoding it alone gives (ldpc_decoder.h), and its iterations and
// convergence (zero syndrome) are reported.
#ifndef CAPGAP_BLOCKS_FEC_LDPC_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_LDPC_CHANNEL_CODE_H_

#include <atomic>
#include <cstdint>
#include <memory>

#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/ldpc_code.h"
#include "blocks/fec/ldpc_decoder.h"
#include "blocks/fec/ldpc_encoder.h"

namespace capgap {

class LdpcChannelCode final : public ChannelCode {
 public:
  // Messages of the encoder's and decoder's Create() are passed on, prefixed
  // "code: " and "decoder: ".
  // `stop` reaches the encoder's elimination (LdpcEncoder::Create): a
  // Status::Stopped comes back as it is (message prefixed).
  static Result<std::shared_ptr<const LdpcChannelCode>> Create(
      std::shared_ptr<const LdpcCode> code, const LdpcDecoderOptions& options,
      const std::atomic<bool>* stop = nullptr);

  // Frames per Decode call for a unit of unit_frames frames: the whole unit
  // up to about 2^20 coded bits, and at least a few times the decoder's SIMD
  // lanes (frames stream through the lanes; the batch never changes a
  // count). Bounds the chain's batch buffers (frames x n LLRs per thread)
  // and the time between two looks at the chain's stop flag.
  static std::uint32_t BatchFrames(std::uint32_t unit_frames, std::size_t coded_bits,
                                   int decoder_lanes);

  const LdpcCode& code() const { return *code_; }
  const LdpcEncoder& encoder() const { return encoder_; }
  const LdpcDecoder& decoder() const { return decoder_; }

  std::size_t info_bits() const override { return static_cast<std::size_t>(encoder_.info_bits()); }
  std::size_t coded_bits() const override { return static_cast<std::size_t>(code_->length()); }
  double rate() const override {
    return static_cast<double>(encoder_.info_bits()) / code_->length();
  }
  bool iterative() const override { return true; }
  std::uint32_t batch_frames(std::uint32_t unit_frames) const override {
    return BatchFrames(unit_frames, coded_bits(), decoder_.batch_frames());
  }
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const override;
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const override;
  void Decode(std::span<const float> llrs, std::span<Bit> info,
              std::span<FrameDecodeResult> results, Workspace& ws) const override;

 private:
  LdpcChannelCode(std::shared_ptr<const LdpcCode> code, LdpcEncoder encoder, LdpcDecoder decoder)
      : code_(std::move(code)), encoder_(std::move(encoder)), decoder_(std::move(decoder)) {}
  std::shared_ptr<const LdpcCode> code_;
  LdpcEncoder encoder_;
  LdpcDecoder decoder_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_CHANNEL_CODE_H_
