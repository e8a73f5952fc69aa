// PolarChannelCode: CRC attachment, rate matching and CRC-aided path
// selection around the polar encoder and decoders.
#include "blocks/fec/polar_channel_code.h"

#include <algorithm>
#include <cmath>
#include <vector>

#include "blocks/core/energy.h"

namespace capgap {
namespace {

class PolarWorkspace final : public ChannelCode::Workspace {
 public:
  std::vector<Bit> message, mother, scratch, u_hat;
  std::vector<float> llr;
  // SC kernel: a batch's mother LLRs, decisions and the kernel's scratch.
  std::vector<float> batch_llr, kernel_scratch;
  std::vector<Bit> batch_msg;
  PolarScDecoder::Workspace sc;
  PolarSclDecoder::Workspace scl;
};

}  // namespace

Result<std::shared_ptr<const PolarChannelCode>> PolarChannelCode::Create(
    const PolarCodeOptions& o) {
  if (o.info_bits < 1) return Status::Error("info_bits must be >= 1");
  std::optional<Crc> crc;
  if (o.crc_bits > 0) {
    auto c = Crc::Create(o.crc_bits, o.crc_polynomial);
    if (!c.ok()) return c.status();
    crc = c.value();
  }
  PolarCodeSpec spec;
  spec.length = o.length;
  spec.message_bits = o.info_bits + o.crc_bits;
  spec.construction = o.construction;
  spec.design_ecn0_db =
      o.design_ebno_db + LinearToDb(static_cast<double>(o.info_bits) / o.length);
  spec.rate_matching = o.rate_matching;
  auto code = ConstructPolarCode(spec);
  if (!code.ok()) return code.status();
  auto encoder = PolarEncoder::Create(code.value(), o.systematic);
  if (!encoder.ok()) return encoder.status();
  std::optional<PolarSclDecoder> scl;
  if (o.decoder == PolarDecoderKind::kScl) {
    auto d = PolarSclDecoder::Create(code.value(), o.list_size);
    if (!d.ok()) return d.status();
    scl = std::move(d).value();
  }
  PolarScDecoder sc(code.value());
  return std::shared_ptr<const PolarChannelCode>(
      new PolarChannelCode(o, std::move(encoder).value(), crc, std::move(sc), std::move(scl)));
}

namespace {
// Frames per SC kernel call: enough for every lane of the widest target.
constexpr std::uint32_t kScBatch = 16;
}  // namespace

std::uint32_t PolarChannelCode::batch_frames(std::uint32_t unit_frames) const {
  if (scl_ || !PolarScKernelActive()) return 1;
  return std::max<std::uint32_t>(1, std::min(unit_frames, kScBatch));
}

std::unique_ptr<ChannelCode::Workspace> PolarChannelCode::MakeWorkspace(
    std::uint32_t max_frames) const {
  auto ws = std::make_unique<PolarWorkspace>();
  const auto n = static_cast<std::size_t>(code().mother_length);
  if (!scl_ && PolarScKernelActive()) {
    const std::size_t frames = std::max<std::uint32_t>(max_frames, 1);
    ws->batch_llr.assign(frames * n, 0.0f);
    ws->batch_msg.assign(frames * info_bits(), 0);
    ws->kernel_scratch.assign(PolarScScratch(code().m), 0.0f);
  }
  ws->message.assign(static_cast<std::size_t>(code().message_bits), 0);
  ws->mother.assign(n, 0);
  ws->scratch.assign(n, 0);
  ws->u_hat.assign(n, 0);
  ws->llr.assign(n, 0.0f);
  if (scl_) {
    ws->scl = scl_->MakeWorkspace();
  } else {
    ws->sc = sc_.MakeWorkspace();
  }
  return ws;
}

void PolarChannelCode::Encode(std::span<const Bit> info, std::span<Bit> coded,
                              Workspace& base) const {
  auto& ws = static_cast<PolarWorkspace&>(base);
  std::copy(info.begin(), info.end(), ws.message.begin());
  if (crc_) {
    crc_->Attach(info, std::span<Bit>(ws.message).subspan(info.size()));
  }
  encoder_.Encode(ws.message, ws.mother, coded);
}

void PolarChannelCode::Decode(std::span<const float> llrs, std::span<Bit> info,
                              std::span<FrameDecodeResult> results, Workspace& base) const {
  auto& ws = static_cast<PolarWorkspace&>(base);
  const PolarCode& c = code();
  const auto e = static_cast<std::size_t>(c.length);
  const auto n = static_cast<std::size_t>(c.mother_length);
  const auto k = info_bits();
  const auto first = static_cast<std::size_t>(c.first_transmitted());
  const float fill = c.rate_matching == PolarRateMatching::kShorten ? kShortenedLlr : 0.0f;
  if (!scl_ && !ws.batch_llr.empty() && PolarScKernelActive()) {
    // Frames across lanes; chunks of the workspace's batch size.
    const std::size_t cap = ws.batch_llr.size() / n;
    for (std::size_t f0 = 0; f0 < results.size(); f0 += cap) {
      const std::size_t count = std::min(cap, results.size() - f0);
      for (std::size_t f = 0; f < count; ++f) {
        float* dst = ws.batch_llr.data() + f * n;
        std::fill(dst, dst + n, fill);
        std::copy_n(llrs.begin() + static_cast<std::ptrdiff_t>((f0 + f) * e), e, dst + first);
      }
      // The message bits (the first k of them are the information bits;
      // the CRC is not checked by SC) straight out of the kernel.
      PolarScDecodeFrames(sc_.tree(), ws.batch_llr.data(), count, c.info_positions.data(), k,
                          options_.systematic, ws.batch_msg.data(), ws.kernel_scratch.data());
      std::copy_n(ws.batch_msg.begin(), count * k,
                  info.begin() + static_cast<std::ptrdiff_t>(f0 * k));
      for (std::size_t f = 0; f < count; ++f) results[f0 + f] = FrameDecodeResult{};
    }
    return;
  }
  for (std::size_t f = 0; f < results.size(); ++f) {
    // Rate matching undone: punctured [0, first) -> 0, shortened [E, N) -> known zero.
    std::fill(ws.llr.begin(), ws.llr.end(), fill);
    std::copy_n(llrs.begin() + static_cast<std::ptrdiff_t>(f * e), e,
                ws.llr.begin() + static_cast<std::ptrdiff_t>(first));
    (void)n;
    if (!scl_) {
      sc_.Decode(ws.llr, ws.u_hat, ws.mother, ws.sc);
      if (options_.systematic) {
        encoder_.Message(ws.mother, ws.scratch, ws.message);
      } else {  // u itself: no transform of x back to u
        for (std::size_t i = 0; i < ws.message.size(); ++i) {
          ws.message[i] = ws.u_hat[static_cast<std::size_t>(c.info_positions[i])];
        }
      }
    } else {
      scl_->Decode(ws.llr, ws.scl);
      const int paths = ws.scl.paths();
      int chosen = 0;
      if (crc_) {
        for (int r = 0; r < paths; ++r) {
          encoder_.Message(ws.scl.Codeword(r), ws.scratch, ws.message);
          if (crc_->Check(ws.message)) {
            chosen = r;
            break;
          }
          if (r == paths - 1) chosen = -1;
        }
      }
      if (chosen != 0 || !crc_) {
        encoder_.Message(ws.scl.Codeword(std::max(chosen, 0)), ws.scratch, ws.message);
      }
    }
    std::copy_n(ws.message.begin(), k, info.begin() + static_cast<std::ptrdiff_t>(f * k));
    results[f] = FrameDecodeResult{};
  }
}

}  // namespace capgap
