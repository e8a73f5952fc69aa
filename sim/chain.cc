// Uncoded chain: source, mapper, AWGN, demapper, decisions, error counting.
#include "sim/chain.h"

#include <algorithm>

#include "blocks/kernels/bpsk_kernels.h"

namespace capgap {

Result<Chain> Chain::Create(const SchemeConfig& scheme, std::uint64_t seed) {
  if (scheme.code != "none") {
    return Status::Error("scheme." + scheme.name + ".code = '" + scheme.code +
                         "': convolutional codes are not wired into the chain yet");
  }
  Chain chain;
  chain.scheme_ = scheme;
  chain.key_ = DeriveKey(seed, scheme.name);
  chain.unit_frames_ = scheme.ResolvedUnitFrames();
  auto mapper = Mapper::Create(scheme.modulation);
  if (!mapper.ok()) return Status::Error("scheme." + scheme.name + ": " + mapper.status().message());
  chain.mapper_ = std::make_shared<const Mapper>(std::move(mapper).value());
  auto demapper = Demapper::Create(*chain.mapper_, scheme.demapper);
  if (!demapper.ok()) return Status::Error("scheme." + scheme.name + ": " + demapper.status().message());
  chain.demapper_ = std::make_shared<const Demapper>(std::move(demapper).value());
  const bool carrier = scheme.phase_offset_deg != 0 || scheme.frequency_offset != 0;
  // A BPSK chain stays on the real axis only without shaping or carrier offset.
  chain.real_axis_ = scheme.modulation.order == 2 && scheme.shaping == PulseShape::kNone && !carrier;
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
  return chain;
}

ChainWorkspace Chain::MakeWorkspace() const {
  ChainWorkspace ws;
  const std::size_t n = scheme_.frame_bits;
  const std::size_t symbols = n / static_cast<std::size_t>(mapper_->bits_per_symbol());
  ws.bits.resize(n);
  ws.decided.resize(n);
  ws.llrs.resize(n);
  if (real_axis_) {
    ws.real_symbols.resize(symbols);
  } else {
    ws.symbols.resize(symbols);
  }
  if (shaped()) {
    const auto guard = static_cast<std::size_t>(guard_symbols_);
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

void Chain::FillSource(std::uint32_t /*point_index*/, std::uint32_t unit_index,
                       std::uint32_t frame, RngStream& bit_stream, std::span<Bit> bits) const {
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

// One frame through the shaped channel. The receiver lags the transmitter by
// guard_symbols_ (the matched filter's delay), so every frame is followed by
// that many guard symbols: the block [frame | guard] goes through transmitter,
// carrier offset, noise and receiver, and the block's last `frame` outputs are
// exactly the estimates of the frame's symbols (the first outputs belong to the
// previous block's guard). The unit is primed with one guard block whose
// outputs are discarded, so no filter start-up transient is ever counted.
// Guard symbols come from their own substream, so the information bits and
// their noise draw are the same whatever the guard length.
void Chain::ShapedFrame(const AwgnChannel& channel, RngStream& guard_stream,
                        RngStream& noise_stream, ChainWorkspace& ws) const {
  const std::size_t n = ws.symbols.size();
  const auto guard = static_cast<std::size_t>(guard_symbols_);
  std::copy(ws.symbols.begin(), ws.symbols.end(), ws.block_symbols.begin());
  GenerateRandomBits(ws.guard_bits, guard_stream);
  mapper_->Map(ws.guard_bits, std::span<cf32>(ws.block_symbols).subspan(n, guard));
  tx_->Shape(ws.block_symbols, ws.samples, ws.tx);
  if (carrier_) carrier_->Apply(ws.samples, ws.carrier);
  channel.AddNoise(ws.samples, noise_stream);
  rx_->Receive(ws.samples, ws.received, ws.rx);
  std::copy(ws.received.begin() + static_cast<std::ptrdiff_t>(guard), ws.received.end(),
            ws.symbols.begin());
}

UnitCounts Chain::RunUnit(const AwgnChannel& channel, std::uint32_t point_index,
                          std::uint32_t unit_index, ChainWorkspace& ws) const {
  RngStream bit_stream(key_, point_index, unit_index, Substream::kBits);
  RngStream noise_stream(key_, point_index, unit_index, Substream::kNoise);
  const float n0 = channel.n0();
  UnitCounts counts;
  const std::span<Bit> bits(ws.bits);
  const std::span<Bit> decided(ws.decided);
  const std::span<float> llrs(ws.llrs);
  const bool hard = scheme_.demapper == DemapMethod::kHard;
  // Uncoded BPSK with hard decisions runs fused (blocks/kernels/bpsk_kernels.h):
  // bit 0 -> +1, bit 1 -> -1, I noise (sigma as in AddNoiseReal), y < 0 and the
  // error count in registers, random bits drawn inside; the same counts and
  // stream use as doing those steps one at a time.
  const bool fused = real_axis_ && hard && scheme_.code == "none";
  RngStream guard_stream(key_, point_index, unit_index, Substream::kChannel);
  if (shaped()) {
    // Prime: one guard block (D symbols) whose outputs are discarded.
    ws.tx.Reset();
    ws.rx.Reset();
    ws.carrier.Reset();
    const auto guard = static_cast<std::size_t>(guard_symbols_);
    const std::span<cf32> block(ws.block_symbols.data(), guard);
    GenerateRandomBits(ws.guard_bits, guard_stream);
    mapper_->Map(ws.guard_bits, block);
    const std::span<cf32> samples(ws.samples.data(),
                                  guard * static_cast<std::size_t>(scheme_.samples_per_symbol));
    tx_->Shape(block, samples, ws.tx);
    if (carrier_) carrier_->Apply(samples, ws.carrier);
    channel.AddNoise(samples, noise_stream);
    rx_->Receive(samples, std::span<cf32>(ws.received.data(), guard), ws.rx);
  } else if (carrier_) {
    ws.carrier.Reset();
  }
  for (std::uint32_t f = 0; f < unit_frames_; ++f) {
    if (!fused || prbs_) FillSource(point_index, unit_index, f, bit_stream, bits);
    std::uint64_t errors = 0;
    if (fused) {
      const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
      errors = prbs_ ? CountBpskHardErrors(bits, sigma, noise_stream)
                     : CountBpskHardErrorsOfRandomBits(bits.size(), bit_stream, sigma, noise_stream);
    } else if (real_axis_) {
      // BPSK on the real axis: bit 0 -> +1, bit 1 -> -1; only I noise.
      float* x = ws.real_symbols.data();
      const std::size_t n = ws.real_symbols.size();
      for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(bits[i]);
      channel.AddNoiseReal(ws.real_symbols, noise_stream);
      // L = 4 y / N0 (LLR > 0 favours bit 0); decisions from the LLR sign.
      const float scale = 4.0f / n0;
      float* l = llrs.data();
      for (std::size_t i = 0; i < n; ++i) l[i] = scale * x[i];
      LlrToBits(llrs, decided);
    } else {
      mapper_->Map(bits, ws.symbols);
      if (shaped()) {
        ShapedFrame(channel, guard_stream, noise_stream, ws);
      } else {
        if (carrier_) carrier_->Apply(ws.symbols, ws.carrier);
        channel.AddNoise(ws.symbols, noise_stream);
      }
      if (hard) {
        demapper_->HardDecide(ws.symbols, decided);
      } else {
        demapper_->Demap(ws.symbols, n0, llrs);
        LlrToBits(llrs, decided);
      }
    }
    const std::size_t n = bits.size();
    if (!fused) {
      for (std::size_t i = 0; i < n; ++i) errors += static_cast<std::uint64_t>(bits[i] ^ decided[i]);
    }
    counts.bits += n;
    counts.bit_errors += errors;
    counts.frames += 1;
    counts.frame_errors += errors > 0 ? 1 : 0;
  }
  return counts;
}

}  // namespace capgap
