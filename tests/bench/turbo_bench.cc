// Turbo decoder throughput: decoded information bits per second on one core,
// K = 6144 rate 1/3 ((13,15), QPP), BPSK LLRs at Eb/N0 = 0.8 dB, exactly 6
// full iterations (early stop off), 4 frames per benchmark iteration through
// TurboChannelCode::Decode (depuncturing and decisions included). Decoders:
// max-log-MAP (scaled 0.7) and log-MAP, scalar reference only so far (no SIMD
// kernel yet; the target is 30 Mbit/s per core for max-log-MAP).
// Quote medians:
//   build/bench/turbo_bench --benchmark_repetitions=5 --benchmark_report_aggregates_only=true
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/fec/turbo_channel_code.h"
#include "blocks/kernels/awgn_kernels.h"

namespace capgap {
namespace {

constexpr std::size_t kFrames = 4;
constexpr std::uint32_t kK = 6144;

void Run(benchmark::State& state, TurboDecoderKind kind) {
  const RscCode rsc = RscCode::Create(013, 015).value();
  TurboInterleaverSpec spec;
  const TurboCode tc =
      TurboCode::Create(rsc, TurboInterleaver::Create(spec, kK, PhiloxKey{}).value(), {}).value();
  TurboDecoderOptions o;
  o.kind = kind;
  o.extrinsic_scale = static_cast<float>(DefaultExtrinsicScale(kind));
  o.max_iterations = 6;
  o.early_stop = false;
  const auto code = TurboChannelCode::Create(tc, o).value();
  const std::size_t n = code->coded_bits();
  auto ws = code->MakeWorkspace(1);
  std::mt19937_64 rng(1);
  std::vector<Bit> info(kFrames * kK), coded(kFrames * n), out(info.size());
  for (auto& b : info) b = static_cast<Bit>(rng() & 1u);
  for (std::size_t f = 0; f < kFrames; ++f) {
    code->Encode(std::span<const Bit>(info).subspan(f * kK, kK),
                 std::span<Bit>(coded).subspan(f * n, n), *ws);
  }
  const double n0 = 1.0 / (code->rate() * std::pow(10.0, 0.08));
  std::vector<float> y(coded.size());
  for (std::size_t i = 0; i < y.size(); ++i) y[i] = coded[i] ? -1.0f : 1.0f;
  RngStream stream(DeriveKey(1, "turbo_bench"), 0, 0, Substream::kNoise);
  AddRealNoise(y, static_cast<float>(std::sqrt(n0 / 2)), stream);
  for (auto& v : y) v = static_cast<float>(4.0 * v / n0);
  std::vector<FrameDecodeResult> res(1);
  for (auto _ : state) {
    for (std::size_t f = 0; f < kFrames; ++f) {
      code->Decode(std::span<const float>(y).subspan(f * n, n),
                   std::span<Bit>(out).subspan(f * kK, kK), res, *ws);
    }
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  state.counters["info_bits_per_s"] = benchmark::Counter(
      static_cast<double>(state.iterations()) * static_cast<double>(out.size()),
      benchmark::Counter::kIsRate);
}

void BM_TurboMaxLogScalar(benchmark::State& s) { Run(s, TurboDecoderKind::kMaxLogMap); }
void BM_TurboLogMapScalar(benchmark::State& s) { Run(s, TurboDecoderKind::kLogMap); }
BENCHMARK(BM_TurboMaxLogScalar)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_TurboLogMapScalar)->Unit(benchmark::kMillisecond);

}  // namespace
}  // namespace capgap

BENCHMARK_MAIN();
