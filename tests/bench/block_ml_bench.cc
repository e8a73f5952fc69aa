// Exhaustive ML block decoder throughput: decoded information bits per
// second on one core, for the extended Golay (24, 12) code (and the extended
// Hamming (8, 4) and a random (40, 16) code for scale), a batch of BPSK LLRs
// at Eb/N0 = 3 dB per Decode call (about 2^25 adds: 341 Golay frames), run
// by the kernel 64 frames at a time (the default frames_per_call). Two paths in the
// same run: the kernel dispatched to the best SIMD target, and the scalar
// oracle (ForceScalarKernels). Defaults to 5 repetitions; the summary gives
// the medians and the same-run SIMD / scalar ratio:
//   build/bench/block_ml_bench [--benchmark_repetitions=7]
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <random>
#include <string>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/fec/block_code.h"
#include "blocks/fec/block_ml_decoder.h"
#include "blocks/kernels/awgn_kernels.h"

namespace capgap {
namespace {

// Frames per Decode call: about 2^25 adds of work, in [16, 4096].
std::size_t FramesFor(const BlockCode& code) {
  const std::size_t work = static_cast<std::size_t>(code.n()) << code.k();
  const std::size_t f = (std::size_t{1} << 25) / work;
  return f < 16 ? 16 : (f > 4096 ? 4096 : f);
}

BlockCode MakeCode(const std::string& name) {
  if (name != "random40") return BlockCode::BuiltIn(name).value();
  std::mt19937_64 rng(13u);
  std::vector<Bit> g(40 * 16);
  do {
    for (Bit& b : g) b = static_cast<Bit>(rng() & 1u);
  } while (BlockCode::FirstDependentRow(40, 16, g) >= 0);
  return BlockCode::Create(40, 16, g, name).value();
}

// Random codewords, BPSK, AWGN at 3 dB, L = 4 y / N0.
std::vector<float> MakeLlrs(const BlockCode& code) {
  const auto n = static_cast<std::size_t>(code.n());
  const auto k = static_cast<std::size_t>(code.k());
  const std::size_t frames = FramesFor(code);
  std::mt19937_64 rng(1);
  std::vector<Bit> info(frames * k), coded(frames * n);
  for (auto& b : info) b = static_cast<Bit>(rng() & 1u);
  code.Encode(info, coded);
  const double n0 = 1.0 / (code.rate() * std::pow(10.0, 0.3));
  std::vector<float> y(coded.size());
  for (std::size_t i = 0; i < y.size(); ++i) y[i] = coded[i] ? -1.0f : 1.0f;
  RngStream stream(DeriveKey(1, "block_ml_bench"), 0, 0, Substream::kNoise);
  AddRealNoise(y, static_cast<float>(std::sqrt(n0 / 2)), stream);
  for (auto& v : y) v = static_cast<float>(4.0 * v / n0);
  return y;
}

void Run(benchmark::State& state, const std::string& name, bool force_scalar) {
  const BlockCode code = MakeCode(name);
  const std::vector<float> llrs = MakeLlrs(code);
  const BlockMlDecoder dec = BlockMlDecoder::Create(code).value();
  BlockMlDecoder::Workspace ws = dec.MakeWorkspace();
  std::vector<Bit> out(llrs.size() / static_cast<std::size_t>(code.n()) *
                       static_cast<std::size_t>(code.k()));
  const bool prev = ForceScalarKernels(force_scalar);
  state.SetLabel(dec.KernelTarget());
  for (auto _ : state) {
    dec.Decode(llrs, out, ws);
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  ForceScalarKernels(prev);
  state.counters["info_bits_per_s"] =
      benchmark::Counter(static_cast<double>(state.iterations()) * static_cast<double>(out.size()),
                         benchmark::Counter::kIsRate);
}

// Console output, plus the medians (or single runs) and same-run ratios.
class RatioReporter : public benchmark::ConsoleReporter {
 public:
  void ReportRuns(const std::vector<Run>& runs) override {
    ConsoleReporter::ReportRuns(runs);
    for (const Run& r : runs) {
      const bool use =
          r.run_type == Run::RT_Iteration ? r.repetitions <= 1 : r.aggregate_name == "median";
      if (!use) continue;
      const auto it = r.counters.find("info_bits_per_s");
      if (it != r.counters.end()) rate_[r.run_name.function_name] = it->second.value;
    }
  }
  void PrintRatios() const {
    std::printf("\nExhaustive ML, decoded info bits/s per core (medians, same run):\n");
    for (const char* code : {"golay24", "hamming8", "random40"}) {
      const double v = Get(std::string("BM_BlockMl/") + code + "/simd");
      const double s = Get(std::string("BM_BlockMl/") + code + "/scalar");
      if (v <= 0 || s <= 0) continue;
      std::printf("  %-9s SIMD %9.3f Mbit/s, scalar %9.3f Mbit/s, SIMD / scalar = %.1fx\n", code,
                  v / 1e6, s / 1e6, v / s);
    }
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
  using namespace capgap;  // NOLINT(build/namespaces)
  for (const char* code : {"golay24", "hamming8", "random40"}) {
    for (const bool scalar : {false, true}) {
      const std::string name = std::string("BM_BlockMl/") + code + (scalar ? "/scalar" : "/simd");
      const std::string c = code;
      benchmark::RegisterBenchmark(name.c_str(), [c, scalar](benchmark::State& s) {
        Run(s, c, scalar);
      })->Unit(benchmark::kMillisecond);
    }
  }
  std::vector<char*> args(argv, argv + argc);
  bool has_reps = false;
  for (int i = 1; i < argc; ++i) {
    has_reps = has_reps || std::string(argv[i]).rfind("--benchmark_repetitions", 0) == 0;
  }
  std::string reps = "--benchmark_repetitions=5";
  std::string agg = "--benchmark_report_aggregates_only=true";
  if (!has_reps) {
    args.push_back(reps.data());
    args.push_back(agg.data());
  }
  int count = static_cast<int>(args.size());
  benchmark::Initialize(&count, args.data());
  if (benchmark::ReportUnrecognizedArguments(count, args.data())) return 1;
#ifndef NDEBUG
  std::printf("WARNING: assertions are on; timings are not representative.\n");
#endif
  RatioReporter reporter;
  benchmark::RunSpecifiedBenchmarks(&reporter);
  reporter.PrintRatios();
  benchmark::Shutdown();
  return 0;
}
