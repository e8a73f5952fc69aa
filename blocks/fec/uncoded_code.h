// No channel code: the code-family role (channel_code.h) for uncoded
// schemes. Coded bits are the information bits; decisions are the signs of
// the LLRs (L > 0 favours bit 0, a zero LLR decides 0 as LlrToBits does).
#ifndef CAPGAP_BLOCKS_FEC_UNCODED_CODE_H_
#define CAPGAP_BLOCKS_FEC_UNCODED_CODE_H_

#include <algorithm>
#include <memory>

#include "blocks/fec/channel_code.h"
#include "blocks/mapping/demapper.h"

namespace capgap {

class UncodedCode final : public ChannelCode {
 public:
  explicit UncodedCode(std::size_t frame_bits) : n_(frame_bits) {}
  std::size_t info_bits() const override { return n_; }
  std::size_t coded_bits() const override { return n_; }
  double rate() const override { return 1.0; }
  bool identity() const override { return true; }
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t) const override {
    return std::make_unique<Workspace>();
  }
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace&) const override {
    std::copy(info.begin(), info.end(), coded.begin());
  }
  void Decode(std::span<const float> llrs, std::span<Bit> info, std::span<FrameDecodeResult>,
              Workspace&) const override {
    LlrToBits(llrs, info);
  }

 private:
  std::size_t n_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_UNCODED_CODE_H_
