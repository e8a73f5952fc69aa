// Chain: the one path. Source, encoder, mapper, shaping, channel, matched
// filter, demapper, decoder, error counting.
#include "sim/chain/chain.h"

#include <algorithm>
#include <cstring>
#include <numbers>

#include "blocks/channel/channel_words.h"
#include "blocks/kernels/bpsk_kernels.h"
#include "blocks/kernels/channel_llr_kernels.h"

namespace capgap {
namespace {

// Positions where two arrays of 0/1 bytes differ: eight bytes per XOR; the
// XOR's bytes are 0 or 1, and multiplying by 0x0101010101010101 sums them
// into the top byte (partial sums stay <= 8, nothing carries). No popcount
// instruction is needed (baseline x86-64 has none; GCC would call libgcc).
std::uint64_t CountBitErrors(const Bit* a, const Bit* b, std::size_t n) {
  std::uint64_t errors = 0;
  std::size_t j = 0;
  for (; j + 8 <= n; j += 8) {
    std::uint64_t x, y;
    std::memcpy(&x, a + j, 8);
    std::memcpy(&y, b + j, 8);
    errors += ((x ^ y) * 0x0101010101010101ull) >> 56;
  }
  for (; j < n; ++j) errors += static_cast<std::uint64_t>(a[j] ^ b[j]);
  return errors;
}

}  // namespace

Result<Chain> Chain::Create(const SchemeConfig& scheme, std::uint64_t seed,
                            const BuildContext& context) {
  Chain chain;
  chain.scheme_ = scheme;
  const std::string p = "scheme." + scheme.name + ".";
  const CodeFamily* family = FindCodeFamily(scheme.code);
  if (!family) {
    return Status::Error(p + "code = '" + scheme.code + "': valid: " + CodeFamilyNames());
  }
  BuildContext code_context = context;
  code_context.key = DeriveKey(seed, scheme.name);
  auto code = family->build(scheme, p, code_context);
  if (!code.ok()) return code.status();
  chain.code_ = std::move(code).value();
  // The family fixes the information bits per frame (LDPC: the code's k).
  chain.scheme_.frame_bits = static_cast<std::uint32_t>(chain.code_->info_bits());
  chain.channel_family_ = FindChannelFamily(ToString(scheme.channel.law));
  if (!chain.channel_family_) {
    return Status::Error(p + "channel = '" + ToString(scheme.channel.law) + "': not in the registry");
  }
  chain.key_ = DeriveKey(seed, scheme.name);
  chain.unit_frames_ = chain.scheme_.ResolvedUnitFrames();
  auto mapper = Mapper::Create(scheme.modulation);
  if (!mapper.ok()) return Status::Error("scheme." + scheme.name + ": " + mapper.status().message());
  chain.mapper_ = std::make_shared<const Mapper>(std::move(mapper).value());
  auto demapper = Demapper::Create(*chain.mapper_, scheme.demapper);
  if (!demapper.ok()) return Status::Error("scheme." + scheme.name + ": " + demapper.status().message());
  chain.demapper_ = std::make_shared<const Demapper>(std::move(demapper).value());
  const bool carrier = scheme.phase_offset_deg != 0 || scheme.frequency_offset != 0;
  // A BPSK chain stays on the real axis only without shaping or carrier
  // offset, on an additive-only channel (asked of an instance).
  chain.real_axis_ = scheme.modulation.family == ModulationFamily::kPsk &&
                     scheme.modulation.order == 2 && scheme.shaping == PulseShape::kNone &&
                     !carrier && chain.MakePointChannel(0.0)->additive_only();
  // QPSK without shaping or carrier offset: bits to LLRs in one fused kernel
  // (channel_llr_kernels.h) on additive-only channels.
  chain.qpsk_fused_ = scheme.modulation.order == 4 &&
                      scheme.modulation.family == ModulationFamily::kPsk &&
                      scheme.shaping == PulseShape::kNone && !carrier &&
                      scheme.demapper != DemapMethod::kHard;
  // Uncoded Gray 16-QAM, hard or max-log decisions, unshaped, no carrier
  // offset: bits to error count in one fused kernel on additive-only channels.
  chain.qam16_fused_ = scheme.modulation.order == 16 &&
                       scheme.modulation.family == ModulationFamily::kQam &&
                       scheme.shaping == PulseShape::kNone && !carrier &&
                       (scheme.demapper == DemapMethod::kHard ||
                        scheme.demapper == DemapMethod::kMaxLog);
  // Uncoded Gray 64- and 256-QAM, the same conditions.
  chain.qam_axis_fused_ = (scheme.modulation.order == 64 || scheme.modulation.order == 256) &&
                          scheme.modulation.family == ModulationFamily::kQam &&
                          scheme.shaping == PulseShape::kNone && !carrier &&
                          (scheme.demapper == DemapMethod::kHard ||
                           scheme.demapper == DemapMethod::kMaxLog);
  chain.psk_fused_ = (scheme.modulation.order == 8 || scheme.modulation.order == 16) &&
                     scheme.modulation.family == ModulationFamily::kPsk &&
                     scheme.shaping == PulseShape::kNone && !carrier &&
                     (scheme.demapper == DemapMethod::kHard ||
                      scheme.demapper == DemapMethod::kMaxLog);
  if (chain.qpsk_fused_) {
    for (std::size_t l = 0; l < 4; ++l) {
      chain.qpsk_re_[l] = chain.mapper_->points()[l].real();
      chain.qpsk_im_[l] = chain.mapper_->points()[l].imag();
    }
  }
  if (scheme.shaping != PulseShape::kNone) {
    PulseSpec spec;
    spec.shape = scheme.shaping;
    spec.rolloff = scheme.rolloff;
    spec.span_symbols = scheme.span;
    spec.samples_per_symbol = scheme.samples_per_symbol;
    auto tx = Transmitter::Create(spec);
    if (!tx.ok()) return Status::Error("scheme." + scheme.name + ": " + tx.status().message());
    auto rx = Receiver::Create(spec, scheme.timing_offset);
    if (!rx.ok()) return Status::Error("scheme." + scheme.name + ": " + rx.status().message());
    chain.tx_ = std::move(tx).value();
    chain.rx_ = std::move(rx).value();
    chain.guard_symbols_ = chain.rx_->delay_symbols();
  }
  if (carrier) {
    auto co = CarrierOffset::Create(scheme.phase_offset_deg, scheme.frequency_offset,
                                    chain.samples_per_symbol());
    if (!co.ok()) return Status::Error("scheme." + scheme.name + ": " + co.status().message());
    chain.carrier_ = std::move(co).value();
  }
  if (scheme.source != SourceKind::kRandom) {
    PrbsOrder order = PrbsOrder::k9;
    switch (scheme.source) {
      case SourceKind::kPrbs9: order = PrbsOrder::k9; break;
      case SourceKind::kPrbs15: order = PrbsOrder::k15; break;
      case SourceKind::kPrbs23: order = PrbsOrder::k23; break;
      case SourceKind::kPrbs31: order = PrbsOrder::k31; break;
      case SourceKind::kRandom: break;
    }
    auto prbs = PrbsGenerator::Create(order);
    if (!prbs.ok()) return prbs.status();
    chain.prbs_ = std::move(prbs).value();
  }
  chain.batch_frames_ = std::max<std::uint32_t>(1, chain.code_->batch_frames(chain.unit_frames_));
  if (scheme.interleaver.kind != InterleaverKind::kNone) {
    if (!chain.coded()) {
      return Status::Error(p + "interleaver = " + ToString(scheme.interleaver.kind) +
                           ": applies to coded schemes only");
    }
    // Groups of interleaver_frames frames: whole groups per unit (the
    // config's unit_frames rule) and per decoder batch.
    const std::uint32_t f = scheme.interleaver.frames;
    if (chain.unit_frames_ % f != 0) {
      return Status::Error(p + "unit_frames = " + std::to_string(chain.unit_frames_) +
                           ": must be a multiple of interleaver_frames = " + std::to_string(f));
    }
    chain.batch_frames_ = std::min(chain.unit_frames_, (chain.batch_frames_ + f - 1) / f * f);
    auto il = Interleaver::Create(scheme.interleaver, chain.code_->coded_bits() * f, chain.key_);
    if (!il.ok()) return Status::Error(p + il.status().message());
    chain.interleaver_ = std::make_shared<const Interleaver>(std::move(il).value());
  }
  return chain;
}


std::unique_ptr<const Channel> Chain::MakePointChannel(double ebno_db) const {
  NoiseSpec spec;
  spec.ebno_db = ebno_db;
  spec.code_rate = code_rate();
  spec.bits_per_symbol = mapper_->bits_per_symbol();
  spec.samples_per_symbol = samples_per_symbol();
  return channel_family_->make(spec, scheme_.channel);
}

ChainWorkspace Chain::MakeWorkspace() const {
  ChainWorkspace ws;
  const std::size_t k = scheme_.frame_bits;
  const std::size_t n = code_->coded_bits();
  const std::size_t symbols = n / static_cast<std::size_t>(mapper_->bits_per_symbol());
  ws.code = code_->MakeWorkspace(batch_frames_);
  ws.coded.resize(n);
  ws.batch_bits.resize(batch_frames_ * k);
  ws.batch_llrs.resize(batch_frames_ * n);
  ws.batch_decided.resize(batch_frames_ * k);
  ws.batch_results.resize(batch_frames_);
  if (interleaver_) {
    ws.group_coded.resize(interleaver_->length());
    ws.group_mixed.resize(interleaver_->length());
    ws.group_llrs.resize(interleaver_->length());
  }
  if (real_axis_) {
    ws.real_symbols.resize(symbols);
  } else {
    ws.symbols.resize(symbols);
  }
  const auto guard = static_cast<std::size_t>(guard_symbols_);
  ws.state_gain.resize(symbols + guard);
  ws.state_n0.resize(symbols + guard);
  if (shaped()) {
    const auto s = static_cast<std::size_t>(scheme_.samples_per_symbol);
    ws.tx = tx_->MakeWorkspace();
    ws.rx = rx_->MakeWorkspace();
    ws.guard_bits.resize(guard * static_cast<std::size_t>(mapper_->bits_per_symbol()));
    ws.block_symbols.resize(symbols + guard);
    ws.samples.resize((symbols + guard) * s);
    ws.received.resize(symbols + guard);
  }
  return ws;
}

void Chain::FillSource(std::uint32_t unit_index, std::uint32_t frame, RngStream& bit_stream,
                       std::span<Bit> bits) const {
  if (!prbs_) {
    GenerateRandomBits(bits, bit_stream);
    return;
  }
  // One continuous sequence per point: frame f of unit u starts at bit
  // (u * unit_frames + f) * frame_bits, whichever thread runs it.
  const std::uint64_t start =
      (static_cast<std::uint64_t>(unit_index) * unit_frames_ + frame) * scheme_.frame_bits;
  PrbsGenerator::State state = prbs_->StateAt(start % prbs_->period());
  prbs_->Generate(bits, state);
}

Chain::Streams Chain::UnitStreams(std::uint32_t point_index, std::uint32_t unit_index) const {
  return Streams{RngStream(key_, point_index, unit_index, Substream::kBits),
                 RngStream(key_, point_index, unit_index, Substream::kNoise),
                 RngStream(key_, point_index, unit_index, Substream::kChannel),
                 RngStream(key_, point_index, unit_index, Substream::kFading)};
}

void Chain::ApplyChannel(const Channel& channel, std::span<cf32> samples, Streams& s,
                         ChainWorkspace& ws) const {
  channel.Apply(samples, samples_per_symbol(), s.noise, s.process,
                ChannelStateStorage{ws.state_gain, ws.state_n0, &ws.process}, ws.state);
}

// One frame through the shaped channel. The receiver lags the transmitter by
// guard_symbols_ (the matched filter's delay), so every frame is followed by
// that many guard symbols: the block [frame | guard] goes through transmitter,
// carrier offset, channel and receiver, and the block's last `frame` outputs
// are exactly the estimates of the frame's symbols (the first outputs belong
// to the previous block's guard). The unit is primed with one guard block
// whose outputs are discarded, so no filter start-up transient is ever
// counted. Guard symbols come from their own substream, so the information
// bits and their noise draw are the same whatever the guard length.
//
// A fading channel fades shaped chains at the symbol rate (channel.h): the
// block's symbols take their gains before the transmit filter (frame, then
// guard symbols, in transmission order), and the frame's matched-filter
// outputs are equalised with the gains of the block's first n symbols.
void Chain::ShapedFrame(const Channel& channel, Streams& s, ChainWorkspace& ws) const {
  const std::size_t n = ws.symbols.size();
  const auto guard = static_cast<std::size_t>(guard_symbols_);
  std::copy(ws.symbols.begin(), ws.symbols.end(), ws.block_symbols.begin());
  GenerateRandomBits(ws.guard_bits, s.guard);
  mapper_->Map(ws.guard_bits, std::span<cf32>(ws.block_symbols).subspan(n, guard));
  const bool fade = channel.fades_symbols();
  if (fade) {
    channel.FadeSymbols(ws.block_symbols, s.process,
                        ChannelStateStorage{ws.state_gain, ws.state_n0, &ws.process});
  }
  tx_->Shape(ws.block_symbols, ws.samples, ws.tx);
  if (carrier_) carrier_->Apply(ws.samples, ws.carrier);
  ApplyChannel(channel, ws.samples, s, ws);
  rx_->Receive(ws.samples, ws.received, ws.rx);
  std::copy(ws.received.begin() + static_cast<std::ptrdiff_t>(guard), ws.received.end(),
            ws.symbols.begin());
  if (fade) {
    channel.EqualiseSymbols(ws.symbols, std::span<const cf32>(ws.state_gain.data(), n),
                            std::span<float>(ws.state_n0.data(), n), ws.state);
  }
}

// Shaped chains: one guard block (D symbols) whose outputs are discarded, so
// the filters hold a steady state when the first frame arrives. Carrier
// offset: the phase ramp restarts with every unit.
void Chain::PrimeUnit(const Channel& channel, Streams& s, ChainWorkspace& ws) const {
  // A unit's channel process starts afresh (its kFading stream only).
  ws.process.Reset();
  if (shaped()) {
    ws.tx.Reset();
    ws.rx.Reset();
    ws.carrier.Reset();
    const auto guard = static_cast<std::size_t>(guard_symbols_);
    const std::span<cf32> block(ws.block_symbols.data(), guard);
    GenerateRandomBits(ws.guard_bits, s.guard);
    mapper_->Map(ws.guard_bits, block);
    if (channel.fades_symbols()) {
      channel.FadeSymbols(block, s.process,
                          ChannelStateStorage{ws.state_gain, ws.state_n0, &ws.process});
    }
    const std::span<cf32> samples(ws.samples.data(),
                                  guard * static_cast<std::size_t>(scheme_.samples_per_symbol));
    tx_->Shape(block, samples, ws.tx);
    if (carrier_) carrier_->Apply(samples, ws.carrier);
    ApplyChannel(channel, samples, s, ws);
    rx_->Receive(samples, std::span<cf32>(ws.received.data(), guard), ws.rx);
  } else if (carrier_) {
    ws.carrier.Reset();
  }
}

// Complex path: map, then the shaped channel or carrier offset + channel at
// one sample per symbol; ws.symbols ends as the demapper's input.
void Chain::TransmitComplex(std::span<const Bit> tx_bits, const Channel& channel, Streams& s,
                            ChainWorkspace& ws) const {
  mapper_->Map(tx_bits, ws.symbols);
  if (shaped()) {
    ShapedFrame(channel, s, ws);
  } else {
    if (carrier_) carrier_->Apply(ws.symbols, ws.carrier);
    ApplyChannel(channel, ws.symbols, s, ws);
  }
}

std::vector<cf32> Chain::CaptureDemapperInput(const Channel& channel,
                                              std::size_t max_symbols) const {
  ChainWorkspace ws = MakeWorkspace();
  Streams s = UnitStreams(kDisplayPointIndex, 0);
  PrimeUnit(channel, s, ws);
  std::vector<cf32> out;
  out.reserve(max_symbols);
  const std::span<Bit> bits(ws.batch_bits.data(), scheme_.frame_bits);
  while (out.size() < max_symbols) {
    GenerateRandomBits(bits, s.bits);
    code_->Encode(bits, ws.coded, *ws.code);
    if (real_axis_) {
      for (std::size_t i = 0; i < ws.real_symbols.size(); ++i) {
        ws.real_symbols[i] = 1.0f - 2.0f * static_cast<float>(ws.coded[i]);
      }
      channel.ApplyReal(ws.real_symbols, s.noise);
      for (float x : ws.real_symbols) {
        if (out.size() == max_symbols) break;
        out.emplace_back(x, 0.0f);
      }
    } else {
      TransmitComplex(ws.coded, channel, s, ws);
      for (const cf32& z : ws.symbols) {
        if (out.size() == max_symbols) break;
        out.push_back(z);
      }
    }
  }
  return out;
}

void Chain::ChannelLlrs(std::span<const Bit> tx_bits, const Channel& channel, Streams& s,
                        ChainWorkspace& ws, std::span<float> llrs) const {
  if (real_axis_ && channel.additive_only()) {
    // BPSK on the real axis: bit 0 -> +1, bit 1 -> -1; only I noise;
    // L = 4 y / N0 (LLR > 0 favours bit 0); fused: the same LLRs as the
    // steps below, bit for bit (channel_llr_kernels.h).
    BpskChannelLlrs(tx_bits.data(), ws.real_symbols.size(),
                    static_cast<float>(channel.level().sigma_per_dim), 4.0f / channel.n0(),
                    s.noise, llrs.data());
    return;
  }
  if (qpsk_fused_ && channel.additive_only()) {
    // Mapper, complex noise and the demapper's QPSK LLRs (gain 2 sqrt2 / N0,
    // formed as the demapper forms it) in one pass, bit for bit the same.
    const float gain = 2.0f * std::numbers::sqrt2_v<float> * (1.0f / channel.n0());
    QpskChannelLlrs(tx_bits.data(), tx_bits.size() / 2, qpsk_re_, qpsk_im_,
                    static_cast<float>(channel.level().sigma_per_dim), gain, s.noise,
                    llrs.data());
    return;
  }
  if (real_axis_) {
    // BPSK on the real axis: bit 0 -> +1, bit 1 -> -1; only I noise;
    // L = 4 y / N0 (LLR > 0 favours bit 0).
    float* x = ws.real_symbols.data();
    const std::size_t n = ws.real_symbols.size();
    for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(tx_bits[i]);
    channel.ApplyReal(ws.real_symbols, s.noise);
    const float scale = 4.0f / channel.n0();
    float* l = llrs.data();
    for (std::size_t i = 0; i < n; ++i) l[i] = scale * x[i];
    return;
  }
  TransmitComplex(tx_bits, channel, s, ws);
  // Per-symbol channel state (gain, N0) from the channel; AWGN reports a
  // uniform state and the demapper keeps its scalar-N0 fast paths.
  demapper_->Demap(ws.symbols, ws.state, llrs);
}

// A unit: frames in batches of batch_frames_ (1, or the whole unit for
// decoders that take frames across SIMD lanes). Each frame's bits, encoding
// and channel draw from the unit's streams in frame order, whatever the
// batch size, and each frame decodes as it would alone: the counts do not
// depend on the batching.
UnitCounts Chain::RunUnit(const Channel& channel, std::uint32_t point_index,
                          std::uint32_t unit_index, ChainWorkspace& ws) const {
  return *RunUnitUnlessStopped(channel, point_index, unit_index, ws, nullptr);
}

std::optional<UnitCounts> Chain::RunUnitUnlessStopped(const Channel& channel,
                                                      std::uint32_t point_index,
                                                      std::uint32_t unit_index,
                                                      ChainWorkspace& ws,
                                                      const std::atomic<bool>* stop) const {
  Streams s = UnitStreams(point_index, unit_index);
  const std::size_t k = scheme_.frame_bits, n = code_->coded_bits();
  const bool uncoded = code_->identity();
  const bool hard = scheme_.demapper == DemapMethod::kHard;
  // Uncoded BPSK with hard decisions on an additive-only channel runs fused
  // (blocks/kernels/bpsk_kernels.h): bit 0 -> +1, bit 1 -> -1, I noise
  // (sigma as in ApplyReal), y < 0 and the error count in registers, random
  // bits drawn inside; the same counts and stream use as doing those steps
  // one at a time.
  const bool fused = real_axis_ && hard && uncoded && channel.additive_only();
  // Uncoded complex chains with a hard demapper decide symbols directly.
  const bool direct_hard = !real_axis_ && hard && uncoded;
  // Uncoded 16-QAM, hard or max-log (channel_llr_kernels.h): symbols, noise,
  // the demapper's decisions and the count in registers; the same counts and
  // stream use as the composed path.
  const bool fused_qam16 = qam16_fused_ && uncoded && !interleaver_ && channel.additive_only();
  // The same over a fading channel that offers it (one-branch fast fading,
  // Channel::counts_qam16): gains, noise, equaliser, decisions and count in
  // one kernel, the decider at N0 = 1 (the demapper's per-symbol path).
  const bool faded_qam16 = qam16_fused_ && uncoded && !interleaver_ && !shaped() &&
                           !channel.additive_only() && channel.counts_qam16();
  Qam16Decider qam16{};
  if (fused_qam16 || faded_qam16) {
    qam16 = MakeQam16Decider(mapper_->pam_levels().data(), demapper_->kernel_args().level_scale,
                             faded_qam16 ? 1.0f : channel.n0(), !hard);
  }
  // 8-/16-PSK likewise (CountPskErrors).
  const bool fused_psk = psk_fused_ && uncoded && !interleaver_ && channel.additive_only();
  PskDecider psk{};
  if (fused_psk) {
    const DemapKernelArgs a = demapper_->kernel_args();
    psk = MakePskDecider(mapper_->bits_per_symbol(), mapper_->points().data(), a.point_re,
                         a.point_im, a.boundary_cos, a.boundary_sin, channel.n0(), !hard);
  }
  // 64-/256-QAM likewise (CountQamAxisErrors).
  const bool fused_qam_axis =
      qam_axis_fused_ && uncoded && !interleaver_ && channel.additive_only();
  QamAxisDecider qam_axis{};
  if (fused_qam_axis) {
    qam_axis = MakeQamAxisDecider(mapper_->bits_per_symbol() / 2, mapper_->pam_levels().data(),
                                  demapper_->kernel_args().level_scale, channel.n0(), !hard);
  }
  PrimeUnit(channel, s, ws);
  UnitCounts counts;
  for (std::uint32_t f0 = 0; f0 < unit_frames_; f0 += batch_frames_) {
    // A relaxed load per frame or batch: nothing next to the frame's work.
    if (stop && stop->load(std::memory_order_relaxed)) return std::nullopt;
    const std::uint32_t batch = std::min(batch_frames_, unit_frames_ - f0);
    for (std::uint32_t b = 0; b < batch; ++b) {
      const std::span<Bit> bits(ws.batch_bits.data() + b * k, k);
      if (fused) {
        // Errors counted in the kernel: the decisions are not needed.
        const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
        std::uint64_t errors = 0;
        if (prbs_) {
          FillSource(unit_index, f0 + b, s.bits, bits);
          errors = CountBpskHardErrors(bits, sigma, s.noise);
        } else {
          errors = CountBpskHardErrorsOfRandomBits(k, s.bits, sigma, s.noise);
        }
        counts.bits += k;
        counts.bit_errors += errors;
        counts.frames += 1;
        counts.frame_errors += errors > 0 ? 1 : 0;
        continue;
      }
      FillSource(unit_index, f0 + b, s.bits, bits);
      if (fused_qam16 || faded_qam16 || fused_qam_axis || fused_psk) {
        const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
        const std::uint64_t errors =
            faded_qam16
                ? channel.CountQam16Errors(
                      bits.data(), k / 4, qam16, s.noise, s.process,
                      ChannelStateStorage{ws.state_gain, ws.state_n0, &ws.process})
            : fused_qam16 ? CountQam16Errors(bits.data(), k / 4, qam16, sigma, s.noise)
            : fused_psk   ? CountPskErrors(bits.data(), k / static_cast<std::size_t>(psk.bits), psk,
                                           sigma, s.noise)
                          : CountQamAxisErrors(bits.data(),
                                               k / static_cast<std::size_t>(qam_axis.axis_bits * 2),
                                               qam_axis, sigma, s.noise);
        counts.bits += k;
        counts.bit_errors += errors;
        counts.frames += 1;
        counts.frame_errors += errors > 0 ? 1 : 0;
        continue;
      }
      if (interleaver_) {
        // Groups of F frames (batches hold whole groups): encode into the
        // group, then interleave it, send it frame by frame and put the
        // group's LLRs back in code order.
        const std::uint32_t f = scheme_.interleaver.frames;
        const std::span<Bit> group(ws.group_coded);
        code_->Encode(bits, group.subspan((b % f) * n, n), *ws.code);
        if ((b + 1) % f == 0) {
          interleaver_->Interleave(ws.group_coded, ws.group_mixed);
          for (std::uint32_t j = 0; j < f; ++j) {
            ChannelLlrs(std::span<const Bit>(ws.group_mixed).subspan(j * n, n), channel, s, ws,
                        std::span<float>(ws.group_llrs).subspan(j * n, n));
          }
          interleaver_->Deinterleave(
              ws.group_llrs, std::span<float>(ws.batch_llrs.data() + (b + 1 - f) * n, f * n));
        }
        continue;
      }
      std::span<const Bit> tx_bits = bits;
      if (!uncoded) {
        code_->Encode(bits, ws.coded, *ws.code);
        tx_bits = ws.coded;
      }
      if (direct_hard) {
        TransmitComplex(tx_bits, channel, s, ws);
        demapper_->HardDecide(ws.symbols, std::span<Bit>(ws.batch_decided.data() + b * k, k));
      } else {
        ChannelLlrs(tx_bits, channel, s, ws, std::span<float>(ws.batch_llrs.data() + b * n, n));
      }
    }
    if (fused || fused_qam16 || faded_qam16 || fused_qam_axis || fused_psk) continue;
    const std::span<FrameDecodeResult> results(ws.batch_results.data(), batch);
    if (direct_hard) {
      std::fill(results.begin(), results.end(), FrameDecodeResult{});
    } else {
      code_->Decode(std::span<const float>(ws.batch_llrs.data(), batch * n),
                    std::span<Bit>(ws.batch_decided.data(), batch * k), results, *ws.code);
    }
    for (std::uint32_t b = 0; b < batch; ++b) {
      const Bit* info = ws.batch_bits.data() + b * k;
      const Bit* decided = ws.batch_decided.data() + b * k;
      const std::uint64_t errors = CountBitErrors(info, decided, k);
      const FrameDecodeResult& r = results[b];
      counts.bits += k;
      counts.bit_errors += errors;
      counts.frames += 1;
      counts.frame_errors += errors > 0 ? 1 : 0;
      counts.decoder_iterations += r.iterations;
      counts.max_decoder_iterations = std::max(counts.max_decoder_iterations, r.iterations);
      // Converged to a codeword that is not the one sent.
      counts.undetected_frame_errors += (r.converged && errors > 0) ? 1 : 0;
    }
  }
  return counts;
}

}  // namespace capgap
