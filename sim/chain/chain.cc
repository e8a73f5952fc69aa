// Chain: source, encoder, mapper, shaping, AWGN, matched filter, demapper,
// decoder, decisions, error counting.
#include "sim/chain/chain.h"

#include <algorithm>

#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "blocks/kernels/bpsk_kernels.h"

namespace capgap {

Result<Chain> Chain::Create(const SchemeConfig& scheme, std::uint64_t seed) {
  Chain chain;
  chain.scheme_ = scheme;
  chain.coded_bits_ = scheme.frame_bits;
  const std::string p = "scheme." + scheme.name + ".";
  if (scheme.code == "conv") {
    const ConvSchemeConfig& c = scheme.conv;
    ConvCodeSpec spec;
    auto gens = ParseGenerators(c.generators);
    if (!gens.ok()) {
      return Status::Error(p + "generators = '" + c.generators + "': " + gens.status().message());
    }
    spec.generators = gens.value();
    spec.constraint_length = c.constraint_length;
    if (c.puncture != "none") {
      auto pat = ParsePuncturePattern(c.puncture);
      if (!pat.ok()) {
        return Status::Error(p + "puncture = '" + c.puncture + "': " + pat.status().message());
      }
      spec.puncture = pat.value();
    }
    spec.termination = c.termination == "tailbiting" ? Termination::kTailBiting
                                                     : Termination::kTerminated;
    auto code = ConvCode::Create(spec);
    if (!code.ok()) return Status::Error(p + "generators/puncture: " + code.status().message());
    chain.conv_ = std::move(code).value();
    if (c.decoder == "bcjr") {
      auto dec = BcjrDecoder::Create(*chain.conv_);
      if (!dec.ok()) return Status::Error(p + "decoder = 'bcjr': " + dec.status().message());
      chain.bcjr_ = std::move(dec).value();
    } else {
      ViterbiOptions opt;
      opt.traceback_length = c.traceback == 0 ? -1 : c.traceback;
      auto dec = ViterbiDecoder::Create(*chain.conv_, opt);
      if (!dec.ok()) return Status::Error(p + "decoder = '" + c.decoder + "': " + dec.status().message());
      chain.viterbi_ = std::move(dec).value();
      chain.hard_decoding_ = c.decoder == "viterbi_hard";
    }
    chain.coded_bits_ = chain.conv_->CodedLength(scheme.frame_bits);
    chain.code_rate_ = chain.conv_->EffectiveRate(scheme.frame_bits);
    const auto m = static_cast<std::size_t>(scheme.modulation.bits_per_symbol());
    if (chain.coded_bits_ % m != 0) {
      return Status::Error(p + "frame_bits = " + std::to_string(scheme.frame_bits) + ": gives " +
                           std::to_string(chain.coded_bits_) +
                           " coded bits, not a multiple of " + std::to_string(m) +
                           " bits per symbol of " + ToString(scheme.modulation) +
                           "; choose frame_bits so that the coded length is");
    }
  } else if (scheme.code == "ldpc") {
    if (Status st = chain.BuildLdpc(p); !st.ok()) return st;
  } else if (scheme.code != "none") {
    return Status::Error(p + "code = '" + scheme.code + "': valid: none, conv, ldpc");
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

// The LDPC code of the scheme (PEG, lifted base matrix or matrix file), its
// encoder and decoder; frame_bits becomes the code's k.
Status Chain::BuildLdpc(const std::string& p) {
  const LdpcSchemeConfig& c = scheme_.ldpc;
  Result<LdpcCode> code = Status::Error("unset");
  if (c.construction == "peg") {
    auto degrees = ParseVariableDegrees(c.degrees);
    if (!degrees.ok()) {
      return Status::Error(p + "degrees = '" + c.degrees + "': " + degrees.status().message());
    }
    PegSpec spec;
    spec.length = c.length;
    spec.checks = ChecksForRate(c.length, c.rate);
    spec.degrees = degrees.value();
    spec.seed = c.construction_seed;
    code = BuildPegCode(spec);
    if (!code.ok()) return Status::Error(p + "length/rate/degrees: " + code.status().message());
  } else if (c.construction == "qc") {
    auto base = ReadBaseMatrixFile(c.ResolvePath(c.base_matrix));
    if (!base.ok()) return Status::Error(p + "base_matrix: " + base.status().message());
    const int z = c.lifting > 0 ? c.lifting : base.value().design_lifting;
    code = LiftBaseMatrix(base.value(), z);
    if (!code.ok()) return Status::Error(p + "lifting = " + std::to_string(z) + ": " + code.status().message());
  } else if (c.construction == "file") {
    code = ReadLdpcMatrixFile(c.ResolvePath(c.matrix_file));
    if (!code.ok()) return Status::Error(p + "matrix_file: " + code.status().message());
  } else {
    return Status::Error(p + "construction = '" + c.construction + "': valid: peg, qc, file");
  }
  ldpc_code_ = std::make_shared<const LdpcCode>(std::move(code).value());
  const int n = ldpc_code_->length();
  const int m = scheme_.modulation.bits_per_symbol();
  if (n % m != 0) {
    return Status::Error(p + "code length n = " + std::to_string(n) + " is not a multiple of " +
                         std::to_string(m) + " bits per symbol of " + ToString(scheme_.modulation));
  }
  auto encoder = LdpcEncoder::Create(ldpc_code_);
  if (!encoder.ok()) return Status::Error(p + "code: " + encoder.status().message());
  ldpc_encoder_ = std::move(encoder).value();
  LdpcDecoderOptions opt;
  auto algorithm = ParseLdpcAlgorithm(c.decoder);
  if (!algorithm.ok()) return Status::Error(p + "decoder = '" + c.decoder + "': " + algorithm.status().message());
  opt.algorithm = algorithm.value();
  auto schedule = ParseLdpcSchedule(c.schedule);
  if (!schedule.ok()) return Status::Error(p + "schedule = '" + c.schedule + "': " + schedule.status().message());
  opt.schedule = schedule.value();
  opt.max_iterations = c.max_iterations;
  auto arithmetic = ParseLdpcArithmetic(c.arithmetic);
  if (!arithmetic.ok()) {
    return Status::Error(p + "arithmetic = '" + c.arithmetic + "': " + arithmetic.status().message());
  }
  opt.arithmetic = arithmetic.value();
  opt.normalization = static_cast<float>(c.normalization);
  opt.offset = static_cast<float>(c.offset);
  auto decoder = LdpcDecoder::Create(ldpc_code_, opt);
  if (!decoder.ok()) return Status::Error(p + "decoder: " + decoder.status().message());
  ldpc_decoder_ = std::move(decoder).value();
  scheme_.frame_bits = static_cast<std::uint32_t>(ldpc_encoder_->info_bits());
  coded_bits_ = static_cast<std::size_t>(n);
  code_rate_ = static_cast<double>(ldpc_encoder_->info_bits()) / n;
  return Status::Ok();
}

ChainWorkspace Chain::MakeWorkspace() const {
  ChainWorkspace ws;
  const std::size_t n = scheme_.frame_bits;
  const std::size_t symbols = coded_bits_ / static_cast<std::size_t>(mapper_->bits_per_symbol());
  ws.bits.resize(n);
  ws.decided.resize(n);
  ws.llrs.resize(coded_bits_);
  if (coded()) {
    ws.coded.resize(coded_bits_);
    ws.coded_hard.resize(coded_bits_);
    if (viterbi_) ws.viterbi = viterbi_->MakeWorkspace(n);
    if (bcjr_) {
      ws.bcjr = bcjr_->MakeWorkspace(n);
      ws.info_llrs.resize(n);
    }
    if (ldpc_decoder_) {
      ws.ldpc = ldpc_decoder_->MakeWorkspace();
      ws.unit_bits.resize(unit_frames_ * n);
      ws.unit_llrs.resize(unit_frames_ * coded_bits_);
      ws.unit_decided.resize(unit_frames_ * coded_bits_);
      ws.ldpc_results.resize(unit_frames_);
    }
  }
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

// Shaped chains: one guard block (D symbols) whose outputs are discarded, so
// the filters hold a steady state when the first frame arrives. Carrier
// offset: the phase ramp restarts with every unit.
void Chain::PrimeUnit(const AwgnChannel& channel, RngStream& guard_stream,
                      RngStream& noise_stream, ChainWorkspace& ws) const {
  if (shaped()) {
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
}

// Complex path: map, then the shaped channel or carrier offset + noise at
// one sample per symbol; ws.symbols ends as the demapper's input.
void Chain::TransmitComplex(std::span<const Bit> tx_bits, const AwgnChannel& channel,
                            RngStream& guard_stream, RngStream& noise_stream,
                            ChainWorkspace& ws) const {
  mapper_->Map(tx_bits, ws.symbols);
  if (shaped()) {
    ShapedFrame(channel, guard_stream, noise_stream, ws);
  } else {
    if (carrier_) carrier_->Apply(ws.symbols, ws.carrier);
    channel.AddNoise(ws.symbols, noise_stream);
  }
}

std::vector<cf32> Chain::CaptureDemapperInput(const AwgnChannel& channel,
                                              std::size_t max_symbols) const {
  // Point index 0xFFFFFFFE is never a sweep point: the display draws its own
  // streams and never touches a counted unit's.
  constexpr std::uint32_t kDisplayPoint = 0xFFFFFFFEu;
  ChainWorkspace ws = MakeWorkspace();
  RngStream bit_stream(key_, kDisplayPoint, 0, Substream::kBits);
  RngStream noise_stream(key_, kDisplayPoint, 0, Substream::kNoise);
  RngStream guard_stream(key_, kDisplayPoint, 0, Substream::kChannel);
  PrimeUnit(channel, guard_stream, noise_stream, ws);
  std::vector<cf32> out;
  out.reserve(max_symbols);
  while (out.size() < max_symbols) {
    GenerateRandomBits(ws.bits, bit_stream);
    const std::span<const Bit> tx_bits = EncodeFrame(ws.bits, ws);
    if (real_axis_) {
      for (std::size_t i = 0; i < ws.real_symbols.size(); ++i) {
        ws.real_symbols[i] = 1.0f - 2.0f * static_cast<float>(tx_bits[i]);
      }
      channel.AddNoiseReal(ws.real_symbols, noise_stream);
      for (float x : ws.real_symbols) {
        if (out.size() == max_symbols) break;
        out.emplace_back(x, 0.0f);
      }
    } else {
      TransmitComplex(tx_bits, channel, guard_stream, noise_stream, ws);
      for (const cf32& z : ws.symbols) {
        if (out.size() == max_symbols) break;
        out.push_back(z);
      }
    }
  }
  return out;
}

std::span<const Bit> Chain::EncodeFrame(std::span<const Bit> bits, ChainWorkspace& ws) const {
  if (conv_) {
    conv_->Encode(bits, ws.coded);
    return ws.coded;
  }
  if (ldpc_encoder_) {
    ldpc_encoder_->Encode(bits, ws.coded);
    return ws.coded;
  }
  return bits;
}

void Chain::ChannelLlrs(std::span<const Bit> tx_bits, const AwgnChannel& channel,
                        RngStream& guard_stream, RngStream& noise_stream, ChainWorkspace& ws,
                        std::span<float> llrs) const {
  if (real_axis_) {
    // BPSK on the real axis: bit 0 -> +1, bit 1 -> -1; only I noise;
    // L = 4 y / N0 (LLR > 0 favours bit 0).
    float* x = ws.real_symbols.data();
    const std::size_t n = ws.real_symbols.size();
    for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(tx_bits[i]);
    channel.AddNoiseReal(ws.real_symbols, noise_stream);
    const float scale = 4.0f / channel.n0();
    float* l = llrs.data();
    for (std::size_t i = 0; i < n; ++i) l[i] = scale * x[i];
    return;
  }
  TransmitComplex(tx_bits, channel, guard_stream, noise_stream, ws);
  demapper_->Demap(ws.symbols, channel.n0(), llrs);
}

// An LDPC unit: every frame encoded and sent, its LLRs kept; then one
// decoder call for the whole unit (frames side by side in SIMD lanes; each
// frame's result is what it gets decoded alone, ldpc_decoder.h), then the
// counts. Streams are used frame by frame exactly as in RunUnit.
UnitCounts Chain::RunLdpcUnit(const AwgnChannel& channel, std::uint32_t point_index,
                              std::uint32_t unit_index, ChainWorkspace& ws) const {
  RngStream bit_stream(key_, point_index, unit_index, Substream::kBits);
  RngStream noise_stream(key_, point_index, unit_index, Substream::kNoise);
  RngStream guard_stream(key_, point_index, unit_index, Substream::kChannel);
  PrimeUnit(channel, guard_stream, noise_stream, ws);
  const std::size_t k = scheme_.frame_bits, n = coded_bits_;
  for (std::uint32_t f = 0; f < unit_frames_; ++f) {
    const std::span<Bit> bits(ws.unit_bits.data() + f * k, k);
    FillSource(point_index, unit_index, f, bit_stream, bits);
    ldpc_encoder_->Encode(bits, ws.coded);
    ChannelLlrs(ws.coded, channel, guard_stream, noise_stream, ws,
                std::span<float>(ws.unit_llrs.data() + f * n, n));
  }
  ldpc_decoder_->Decode(ws.unit_llrs, ws.unit_decided, ws.ldpc_results, ws.ldpc);
  UnitCounts counts;
  const std::span<const int> positions = ldpc_encoder_->info_positions();
  for (std::uint32_t f = 0; f < unit_frames_; ++f) {
    const Bit* info = ws.unit_bits.data() + f * k;
    const Bit* decided = ws.unit_decided.data() + f * n;
    std::uint64_t errors = 0;
    for (std::size_t j = 0; j < k; ++j) {
      errors += static_cast<std::uint64_t>(info[j] ^ decided[static_cast<std::size_t>(positions[j])]);
    }
    const LdpcDecoder::FrameResult& r = ws.ldpc_results[f];
    counts.bits += k;
    counts.bit_errors += errors;
    counts.frames += 1;
    counts.frame_errors += errors > 0 ? 1 : 0;
    counts.decoder_iterations += static_cast<std::uint64_t>(r.iterations);
    counts.max_decoder_iterations =
        std::max(counts.max_decoder_iterations, static_cast<std::uint32_t>(r.iterations));
    // Converged to a codeword that is not the one sent.
    counts.undetected_frame_errors += (r.converged && errors > 0) ? 1 : 0;
  }
  return counts;
}

UnitCounts Chain::RunUnit(const AwgnChannel& channel, std::uint32_t point_index,
                          std::uint32_t unit_index, ChainWorkspace& ws) const {
  if (ldpc_decoder_) return RunLdpcUnit(channel, point_index, unit_index, ws);
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
  const bool fused = real_axis_ && hard && !coded();
  RngStream guard_stream(key_, point_index, unit_index, Substream::kChannel);
  PrimeUnit(channel, guard_stream, noise_stream, ws);
  for (std::uint32_t f = 0; f < unit_frames_; ++f) {
    if (!fused || prbs_) FillSource(point_index, unit_index, f, bit_stream, bits);
    // What goes on the channel: the information bits, or their codeword.
    std::span<const Bit> tx_bits = bits;
    if (coded()) {
      conv_->Encode(bits, ws.coded);
      tx_bits = ws.coded;
    }
    std::uint64_t errors = 0;
    if (fused) {
      const auto sigma = static_cast<float>(channel.level().sigma_per_dim);
      errors = prbs_ ? CountBpskHardErrors(bits, sigma, noise_stream)
                     : CountBpskHardErrorsOfRandomBits(bits.size(), bit_stream, sigma, noise_stream);
    } else if (real_axis_) {
      // BPSK on the real axis: bit 0 -> +1, bit 1 -> -1; only I noise.
      float* x = ws.real_symbols.data();
      const std::size_t n = ws.real_symbols.size();
      for (std::size_t i = 0; i < n; ++i) x[i] = 1.0f - 2.0f * static_cast<float>(tx_bits[i]);
      channel.AddNoiseReal(ws.real_symbols, noise_stream);
      // L = 4 y / N0 (LLR > 0 favours bit 0); decisions from the LLR sign.
      const float scale = 4.0f / n0;
      float* l = llrs.data();
      for (std::size_t i = 0; i < n; ++i) l[i] = scale * x[i];
      if (!coded()) LlrToBits(llrs, decided);
    } else {
      TransmitComplex(tx_bits, channel, guard_stream, noise_stream, ws);
      if (coded()) {
        // The decoder takes the demapper's LLRs (a hard demapper gives +-1).
        demapper_->Demap(ws.symbols, n0, llrs);
      } else if (hard) {
        demapper_->HardDecide(ws.symbols, decided);
      } else {
        demapper_->Demap(ws.symbols, n0, llrs);
        LlrToBits(llrs, decided);
      }
    }
    if (coded()) {
      if (bcjr_) {
        bcjr_->Decode(llrs, ws.info_llrs, ws.bcjr);
        LlrToBits(ws.info_llrs, decided);
      } else if (hard_decoding_) {
        LlrToBits(llrs, ws.coded_hard);
        viterbi_->DecodeHard(ws.coded_hard, decided, ws.viterbi);
      } else {
        viterbi_->Decode(llrs, decided, ws.viterbi);
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
