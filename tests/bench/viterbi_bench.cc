// Viterbi decoder throughput: decoded information bits per second on one
// core for the K = 7 (133,171) rate-1/2 code, soft input, terminated frames
// of 4096 bits, default traceback (35). Three paths in the same run: the
// float scalar reference (ViterbiMetric::kFloat), the int16 ACS forced to its
// scalar oracle, and the int16 ACS dispatched to the best SIMD target; the
// report gives medians over repetitions and the same-run ratios.
//   build/bench/viterbi_bench --benchmark_repetitions=7 --benchmark_report_aggregates_only=true
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <string>
#include <random>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/fec/conv_code.h"
#include "blocks/fec/viterbi_decoder.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/viterbi_kernels.h"

namespace capgap {
namespace {

constexpr std::size_t kInfoBits = 4096;

struct Frame {
  ConvCode code;
  std::vector<float> llr;
};

const Frame& GetFrame() {
  static const Frame frame = [] {
    ConvCodeSpec spec;
    spec.generators = {0133, 0171};
    ConvCode code = ConvCode::Create(spec).value();
    std::mt19937_64 rng(1);
    std::vector<Bit> info(kInfoBits), coded(code.CodedLength(kInfoBits));
    for (auto& b : info) b = static_cast<Bit>(rng() & 1u);
    code.Encode(info, coded);
    // Eb/N0 = 3 dB, BPSK, LLR = 4 y / N0.
    const double n0 = 1.0 / (code.EffectiveRate(kInfoBits) * std::pow(10.0, 0.3));
    std::vector<float> y(coded.size());
    for (std::size_t i = 0; i < y.size(); ++i) y[i] = coded[i] ? -1.0f : 1.0f;
    RngStream stream(DeriveKey(1, "bench"), 0, 0, Substream::kNoise);
    AddRealNoise(y, static_cast<float>(std::sqrt(n0 / 2)), stream);
    for (auto& v : y) v = static_cast<float>(4.0 * v / n0);
    return Frame{std::move(code), std::move(y)};
  }();
  return frame;
}

void Run(benchmark::State& state, ViterbiMetric metric, bool force_scalar) {
  const Frame& f = GetFrame();
  ViterbiOptions o;
  o.metric = metric;
  const ViterbiDecoder dec = ViterbiDecoder::Create(f.code, o).value();
  ViterbiDecoder::Workspace ws = dec.MakeWorkspace(kInfoBits);
  std::vector<Bit> out(kInfoBits);
  const bool prev = ForceScalarKernels(force_scalar);
  state.SetLabel(dec.AcsTarget());
  for (auto _ : state) {
    dec.Decode(f.llr, out, ws);
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  ForceScalarKernels(prev);
  state.counters["info_bits_per_s"] = benchmark::Counter(
      static_cast<double>(state.iterations()) * kInfoBits, benchmark::Counter::kIsRate);
}

void BM_ViterbiK7SoftFloatScalar(benchmark::State& s) { Run(s, ViterbiMetric::kFloat, false); }
void BM_ViterbiK7SoftInt16Scalar(benchmark::State& s) { Run(s, ViterbiMetric::kInt16, true); }
void BM_ViterbiK7SoftInt16Simd(benchmark::State& s) { Run(s, ViterbiMetric::kInt16, false); }
BENCHMARK(BM_ViterbiK7SoftFloatScalar)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_ViterbiK7SoftInt16Scalar)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_ViterbiK7SoftInt16Simd)->Unit(benchmark::kMicrosecond);

// Console output as usual, plus the same-run ratios of the three paths from
// the medians (or the single runs without --benchmark_repetitions).
class RatioReporter : public benchmark::ConsoleReporter {
 public:
  void ReportRuns(const std::vector<Run>& runs) override {
    ConsoleReporter::ReportRuns(runs);
    for (const Run& r : runs) {
      const bool use = r.run_type == Run::RT_Iteration ? r.repetitions <= 1
                                                       : r.aggregate_name == "median";
      if (!use) continue;
      const auto it = r.counters.find("info_bits_per_s");
      if (it != r.counters.end()) rate_[r.run_name.function_name] = it->second.value;
    }
  }
  void PrintRatios() const {
    const double f = Get("BM_ViterbiK7SoftFloatScalar"), s = Get("BM_ViterbiK7SoftInt16Scalar"),
                 v = Get("BM_ViterbiK7SoftInt16Simd");
    if (f <= 0 || s <= 0 || v <= 0) return;
    std::printf("\nK=7 r1/2 soft, decoded info bits/s per core (medians, same run):\n"
                "  float scalar %.1f Mbit/s, int16 scalar %.1f Mbit/s, int16 SIMD %.1f Mbit/s\n"
                "  SIMD / int16 scalar = %.1fx, SIMD / float scalar = %.1fx\n",
                f / 1e6, s / 1e6, v / 1e6, v / s, v / f);
  }

 private:
  double Get(const std::string& name) const {
    const auto it = rate_.find(name);
    return it == rate_.end() ? 0.0 : it->second;
  }
  std::map<std::string, double> rate_;
};

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  capgap::RatioReporter reporter;
  benchmark::RunSpecifiedBenchmarks(&reporter);
  reporter.PrintRatios();
  benchmark::Shutdown();
  return 0;
}
