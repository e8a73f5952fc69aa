// Polar codes in the code-family role (channel_code.h): a PolarCode
// (polar_construction.h) rate-matched to E transmitted bits, an optional CRC
// (crc.h) appended to the information bits, non-systematic or systematic
// encoding (polar_encoder.h), SC or CRC-aided SCL decoding
// (polar_decoder.h; SC runs the frames-across-lanes kernel of
// polar_sc_kernels.h unless the scalar kernels are forced, same decisions).
// A frame is one codeword: info_bits() = k information
// bits, coded_bits() = E, rate() = k / E (the CRC counts against the rate).
//
// Message layout: the k information bits, then the CRC parity of them
// (crc_bits, most significant coefficient first), placed on the information
// positions in ascending index order (systematic: on x, else on u).
//
// Decoding: the E LLRs go to the mother positions they were sent from; a
// punctured position gets LLR 0 (nothing known), a shortened one +1e20
// (known zero). SC returns its path's message. SCL ranks its paths by
// metric and returns the first whose message passes the CRC, else (or
// without a CRC) the best-metric path (CRC-aided selection: K. Niu and K.
// Chen, "CRC-aided decoding of polar codes", IEEE Commun. Lett. 16(10),
// 2012; Tal and Vardy 2015).
#ifndef CAPGAP_BLOCKS_FEC_POLAR_CHANNEL_CODE_H_
#define CAPGAP_BLOCKS_FEC_POLAR_CHANNEL_CODE_H_

#include <memory>
#include <optional>

#include "blocks/core/status.h"
#include "blocks/fec/channel_code.h"
#include "blocks/fec/crc.h"
#include "blocks/fec/polar_construction.h"
#include "blocks/fec/polar_decoder.h"
#include "blocks/fec/polar_encoder.h"

namespace capgap {

enum class PolarDecoderKind { kSc, kScl };

struct PolarCodeOptions {
  int info_bits = 0;   // k
  int length = 0;      // E
  PolarConstruction construction = PolarConstruction::kGa;
  double design_ebno_db = 2.0;  // per information bit; design Ec/N0 = k/E * Eb/N0
  PolarRateMatching rate_matching = PolarRateMatching::kAuto;
  int crc_bits = 0;
  std::uint32_t crc_polynomial = 0;
  PolarDecoderKind decoder = PolarDecoderKind::kScl;
  int list_size = 8;
  bool systematic = false;
};

class PolarChannelCode final : public ChannelCode {
 public:
  // LLR given to a shortened (known zero) mother position.
  static constexpr float kShortenedLlr = 1e20f;

  static Result<std::shared_ptr<const PolarChannelCode>> Create(const PolarCodeOptions& options);

  const PolarCodeOptions& options() const { return options_; }
  const PolarCode& code() const { return encoder_.code(); }
  const PolarEncoder& encoder() const { return encoder_; }

  std::size_t info_bits() const override { return static_cast<std::size_t>(options_.info_bits); }
  std::size_t coded_bits() const override { return static_cast<std::size_t>(options_.length); }
  double rate() const override {
    return static_cast<double>(options_.info_bits) / static_cast<double>(options_.length);
  }
  // SC takes whole batches (frames across SIMD lanes, polar_sc_kernels.h).
  std::uint32_t batch_frames(std::uint32_t unit_frames) const override;
  std::unique_ptr<Workspace> MakeWorkspace(std::uint32_t max_frames) const override;
  void Encode(std::span<const Bit> info, std::span<Bit> coded, Workspace& ws) const override;
  void Decode(std::span<const float> llrs, std::span<Bit> info,
              std::span<FrameDecodeResult> results, Workspace& ws) const override;

 private:
  PolarChannelCode(const PolarCodeOptions& options, PolarEncoder encoder, std::optional<Crc> crc,
                   PolarScDecoder sc, std::optional<PolarSclDecoder> scl)
      : options_(options), encoder_(std::move(encoder)), crc_(crc), sc_(std::move(sc)),
        scl_(std::move(scl)) {}
  PolarCodeOptions options_;
  PolarEncoder encoder_;
  std::optional<Crc> crc_;
  PolarScDecoder sc_;
  std::optional<PolarSclDecoder> scl_;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_POLAR_CHANNEL_CODE_H_
