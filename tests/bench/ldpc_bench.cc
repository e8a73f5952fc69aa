// LDPC decoder throughput: decoded information bits per second on one core
// for the PEG (2016, 1008) regular (3,6) code (blocks/fec/ldpc_construction.h,
// seed 1), random codewords from the systematic encoder, BPSK over AWGN,
// normalised min-sum (alpha = 0.75) unless named otherwise.
//  * Fixed work: layered, 10 iterations, early stop off, Eb/N0 = 1.5 dB (in
//    the waterfall): the dispatched SIMD int8 kernel, the same kernel on
//    every other compiled target the CPU runs (Highway targets mocked in this
//    program, the way the per-target tests do it), the int16 kernel, the
//    scalar int8 oracle (ForceScalarKernels) and the float reference; plus
//    flooding int8.
//  * Float lane kernel (blocks/kernels/ldpc_float_kernels.h), same fixed
//    work: float min-sum (normalised, offset) SIMD against the scalar float
//    min-sum decoder it reproduces (the reference, forced scalar);
//    sum-product float32 SIMD (layered, flooding) against its scalar oracle
//    and against the double-precision scalar sum-product (arithmetic =
//    float), the decoder sum-product ran before.
//  * With early stop (max 50 iterations), int8 layered at 1.0, 1.5 and
//    2.0 dB, 1024 frames per call (streamed through the lanes), with the
//    mean iteration count and the frame error rate.
// After the runs a summary prints the medians over repetitions and the
// same-run ratios to the scalar paths. Defaults to 5 repetitions:
//   build/bench/ldpc_bench [--benchmark_repetitions=7]
#include <benchmark/benchmark.h>

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <cstdio>
#include <map>
#include <memory>
#include <string>
#include <vector>

// clang-format off
#undef HWY_TARGET_INCLUDE
#define HWY_TARGET_INCLUDE "tests/bench/ldpc_bench.cc"
#include "hwy/foreach_target.h"  // IWYU pragma: keep
// foreach_target.h must come before highway.h.
#include "hwy/highway.h"
#include "blocks/kernels/ldpc_kernels-inl.h"
// clang-format on

HWY_BEFORE_NAMESPACE();
namespace capgap {
namespace HWY_NAMESPACE {
// Decodes `frames` frames on this target; false if it has no kernel.
bool DecodeOnTarget(const LdpcFixedArgs& a, const float* llrs, std::size_t frames, Bit* decided,
                    LdpcFrameResult* results, void* ws) {
  if (LdpcFixedKernelLanes(a.lane) == 0) return false;
  return LdpcDecodeFixedKernel(a, llrs, frames, decided, results, ws);
}
std::size_t LanesOnTarget(LdpcLane lane) { return LdpcFixedKernelLanes(lane); }
// NOLINTNEXTLINE(google-readability-namespace-comments)
}  // namespace HWY_NAMESPACE
}  // namespace capgap
HWY_AFTER_NAMESPACE();

#if HWY_ONCE
#include "blocks/core/energy.h"
#include "blocks/core/rng_stream.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_decoder.h"
#include "blocks/fec/ldpc_encoder.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/source/bit_source.h"
#include "hwy/targets.h"

namespace capgap {
namespace {

HWY_EXPORT(DecodeOnTarget);
HWY_EXPORT(LanesOnTarget);

// Resolve the library's dispatch before any target is mocked below.
const char* const kLibraryTarget = LdpcKernelTarget();

struct Setup {
  std::shared_ptr<const LdpcCode> code;
  int n = 0;
  int k = 0;
};

const Setup& GetSetup() {
  static const Setup setup = [] {
    PegSpec spec;
    spec.length = 2016;
    spec.checks = 1008;
    spec.degrees = ParseVariableDegrees("3").value();
    spec.seed = 1;
    Setup s;
    s.code = std::make_shared<const LdpcCode>(BuildPegCode(spec).value());
    s.n = s.code->length();
    s.k = LdpcEncoder::Create(s.code).value().info_bits();
    return s;
  }();
  return setup;
}

struct Frames {
  std::vector<Bit> codewords;
  std::vector<float> llrs;
};

// `count` random codewords through BPSK (0 -> +1) and AWGN at ebno_db; LLR =
// 4 y / N0 with N0 from ComputeNoiseLevel (R = k / n, one bit per symbol).
const Frames& GetFrames(double ebno_db, std::size_t count) {
  static std::map<std::pair<double, std::size_t>, Frames> cache;
  auto it = cache.find({ebno_db, count});
  if (it != cache.end()) return it->second;
  const Setup& s = GetSetup();
  const LdpcEncoder enc = LdpcEncoder::Create(s.code).value();
  const auto n = static_cast<std::size_t>(s.n);
  NoiseSpec spec;
  spec.ebno_db = ebno_db;
  spec.code_rate = static_cast<double>(s.k) / s.n;
  const NoiseLevel noise = ComputeNoiseLevel(spec);
  RngStream bits(DeriveKey(7, "ldpc_bench"), 0, 0, Substream::kBits);
  RngStream awgn(DeriveKey(7, "ldpc_bench"), 0, 0, Substream::kNoise);
  Frames f;
  f.codewords.resize(count * n);
  f.llrs.resize(count * n);
  std::vector<Bit> info(static_cast<std::size_t>(s.k));
  for (std::size_t i = 0; i < count; ++i) {
    GenerateRandomBits(info, bits);
    std::span<Bit> c(f.codewords.data() + i * n, n);
    enc.Encode(info, c);
    std::span<float> y(f.llrs.data() + i * n, n);
    for (std::size_t v = 0; v < n; ++v) y[v] = c[v] ? -1.0f : 1.0f;
    AddRealNoise(y, static_cast<float>(noise.sigma_per_dim), awgn);
    for (float& x : y) x = static_cast<float>(4.0 * x / noise.n0);
  }
  return cache.emplace(std::make_pair(ebno_db, count), std::move(f)).first->second;
}

LdpcDecoder MakeDecoder(LdpcSchedule schedule, LdpcArithmetic arithmetic, int iterations,
                        bool early_stop,
                        LdpcAlgorithm algorithm = LdpcAlgorithm::kMinSumNormalized) {
  LdpcDecoderOptions o;
  o.algorithm = algorithm;
  o.schedule = schedule;
  o.arithmetic = arithmetic;
  o.max_iterations = iterations;
  o.early_stop = early_stop;
  return LdpcDecoder::Create(GetSetup().code, o).value();
}

void Report(benchmark::State& state, std::size_t frames, const Frames& f,
            const std::vector<Bit>& decided) {
  const auto n = static_cast<std::size_t>(GetSetup().n);
  state.counters["info_bits_per_s"] = benchmark::Counter(
      static_cast<double>(state.iterations()) * static_cast<double>(frames) * GetSetup().k,
      benchmark::Counter::kIsRate);
  if (frames < 256) return;  // too few frames for a frame error rate
  std::size_t frame_errors = 0;
  for (std::size_t i = 0; i < frames; ++i) {
    frame_errors += std::equal(decided.begin() + static_cast<std::ptrdiff_t>(i * n),
                               decided.begin() + static_cast<std::ptrdiff_t>((i + 1) * n),
                               f.codewords.begin() + static_cast<std::ptrdiff_t>(i * n))
                        ? 0u
                        : 1u;
  }
  state.counters["fer"] = static_cast<double>(frame_errors) / static_cast<double>(frames);
}

void ReportIterations(benchmark::State& state,
                      const std::vector<LdpcDecoder::FrameResult>* results) {
  if (results != nullptr) {
    double sum = 0;
    for (const auto& r : *results) sum += r.iterations;
    state.counters["mean_iterations"] = sum / static_cast<double>(results->size());
  }
}

// Through LdpcDecoder (the production path).
void RunDecoder(benchmark::State& state, LdpcSchedule schedule, LdpcArithmetic arithmetic,
                bool force_scalar, double ebno_db, int iterations, bool early_stop,
                std::size_t frames,
                LdpcAlgorithm algorithm = LdpcAlgorithm::kMinSumNormalized) {
  const Frames& f = GetFrames(ebno_db, frames);
  const LdpcDecoder dec = MakeDecoder(schedule, arithmetic, iterations, early_stop, algorithm);
  LdpcDecoder::Workspace ws = dec.MakeWorkspace();
  std::vector<Bit> decided(f.llrs.size());
  std::vector<LdpcDecoder::FrameResult> results(frames);
  const bool prev = ForceScalarKernels(force_scalar);
  state.SetLabel(dec.kernel_target());
  for (auto _ : state) {
    dec.Decode(f.llrs, decided, results, ws);
    benchmark::DoNotOptimize(decided.data());
    benchmark::ClobberMemory();
  }
  ForceScalarKernels(prev);
  Report(state, frames, f, decided);
  ReportIterations(state, &results);
}

constexpr double kFixedEbno = 1.5;
constexpr int kFixedIterations = 10;

void BM_Int8LayeredSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kInt8, false, kFixedEbno, kFixedIterations,
             false, 256);
}
void BM_Int16LayeredSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kInt16, false, kFixedEbno, kFixedIterations,
             false, 256);
}
void BM_Int8FloodingSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kFlooding, LdpcArithmetic::kInt8, false, kFixedEbno, kFixedIterations,
             false, 256);
}
void BM_Int8LayeredScalar(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kInt8, true, kFixedEbno, kFixedIterations,
             false, 16);
}
// The float min-sum reference (the scalar decoder arithmetic = float ran
// before the lane kernel; forced scalar it still runs).
void BM_FloatLayeredScalar(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat, true, kFixedEbno, kFixedIterations,
             false, 16);
}
void BM_FloatLayeredSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat, false, kFixedEbno, kFixedIterations,
             false, 256);
}
void BM_FloatOffsetLayeredSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat, false, kFixedEbno, kFixedIterations,
             false, 256, LdpcAlgorithm::kMinSumOffset);
}
void BM_FloatOffsetLayeredScalar(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat, true, kFixedEbno, kFixedIterations,
             false, 16, LdpcAlgorithm::kMinSumOffset);
}
void BM_FloatFloodingSimd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kFlooding, LdpcArithmetic::kFloat, false, kFixedEbno,
             kFixedIterations, false, 256);
}
void BM_SpLayeredFloat32Simd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat32, false, kFixedEbno,
             kFixedIterations, false, 256, LdpcAlgorithm::kSumProduct);
}
void BM_SpFloodingFloat32Simd(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kFlooding, LdpcArithmetic::kFloat32, false, kFixedEbno,
             kFixedIterations, false, 256, LdpcAlgorithm::kSumProduct);
}
void BM_SpLayeredFloat32Scalar(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat32, true, kFixedEbno,
             kFixedIterations, false, 16, LdpcAlgorithm::kSumProduct);
}
// Sum-product as it ran before the lane kernel (tanh rule in double).
void BM_SpLayeredDoubleScalar(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kFloat, false, kFixedEbno,
             kFixedIterations, false, 8, LdpcAlgorithm::kSumProduct);
}
BENCHMARK(BM_Int8LayeredSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_Int16LayeredSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_Int8FloodingSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_Int8LayeredScalar)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FloatLayeredScalar)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FloatLayeredSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FloatOffsetLayeredSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FloatOffsetLayeredScalar)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FloatFloodingSimd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_SpLayeredFloat32Simd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_SpFloodingFloat32Simd)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_SpLayeredFloat32Scalar)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_SpLayeredDoubleScalar)->Unit(benchmark::kMillisecond);

void BM_Int8LayeredEarlyStop(benchmark::State& s) {
  RunDecoder(s, LdpcSchedule::kLayered, LdpcArithmetic::kInt8, false,
             static_cast<double>(s.range(0)) / 10.0, 50, true, 1024);
}
BENCHMARK(BM_Int8LayeredEarlyStop)->Arg(10)->Arg(15)->Arg(20)->Unit(benchmark::kMillisecond);

// The kernel on one given Highway target (int8, layered, fixed work).
void RunOnTarget(benchmark::State& state, std::int64_t target) {
  const Frames& f = GetFrames(kFixedEbno, 256);
  const LdpcDecoder dec =
      MakeDecoder(LdpcSchedule::kLayered, LdpcArithmetic::kInt8, kFixedIterations, false);
  hwy::SetSupportedTargetsForTest(target);
  hwy::GetChosenTarget().Update(hwy::SupportedTargets());
  const std::size_t lanes = HWY_DYNAMIC_DISPATCH(LanesOnTarget)(LdpcLane::kInt8);
  std::vector<std::uint8_t> ws(
      LdpcFixedWorkspaceBytes(dec.fixed_args(), std::max<std::size_t>(lanes, 1)));
  std::vector<Bit> decided(f.llrs.size());
  std::vector<LdpcFrameResult> results(256);
  state.SetLabel(std::string(hwy::TargetName(target)) + " int8 x" + std::to_string(lanes) +
                 " lanes");
  for (auto _ : state) {
    if (!HWY_DYNAMIC_DISPATCH(DecodeOnTarget)(dec.fixed_args(), f.llrs.data(), 256, decided.data(),
                                              results.data(), ws.data())) {
      state.SkipWithError("no kernel on this target");
      break;
    }
    benchmark::DoNotOptimize(decided.data());
    benchmark::ClobberMemory();
  }
  hwy::SetSupportedTargetsForTest(0);
  hwy::GetChosenTarget().Update(hwy::SupportedTargets());
  Report(state, 256, f, decided);
}

// Collects the median (or the only) info_bits_per_s of each benchmark.
class SummaryReporter : public benchmark::ConsoleReporter {
 public:
  void ReportRuns(const std::vector<Run>& runs) override {
    ConsoleReporter::ReportRuns(runs);
    for (const Run& r : runs) {
      if (r.error_occurred) continue;
      const bool median = r.run_type == Run::RT_Aggregate && r.aggregate_name == "median";
      if (!median && r.run_type == Run::RT_Aggregate) continue;
      const auto it = r.counters.find("info_bits_per_s");
      if (it == r.counters.end()) continue;
      const std::string name =
          r.run_name.function_name + (r.run_name.args.empty() ? "" : "/" + r.run_name.args);
      if (median || rates_.count(name) == 0) rates_[name] = it->second.value;
      const auto mi = r.counters.find("mean_iterations");
      if (mi != r.counters.end()) iters_[name] = mi->second.value;
      const auto fe = r.counters.find("fer");
      if (fe != r.counters.end()) fer_[name] = fe->second.value;
    }
  }
  void Summary() const {
    std::printf("\nSummary (median info bits/s, one core):\n");
    for (const auto& [name, rate] : rates_) {
      std::printf("  %-40s %9.2f Mbit/s", name.c_str(), rate / 1e6);
      if (iters_.count(name) != 0) std::printf("  mean iterations %.2f", iters_.at(name));
      if (fer_.count(name) != 0) std::printf("  FER %.4f", fer_.at(name));
      std::printf("\n");
    }
    const auto ratio = [&](const char* a, const char* b) {
      if (rates_.count(a) != 0 && rates_.count(b) != 0) {
        std::printf("  %s / %s = %.1f\n", a, b, rates_.at(a) / rates_.at(b));
      }
    };
    std::printf("Same-run ratios:\n");
    ratio("BM_Int8LayeredSimd", "BM_Int8LayeredScalar");
    ratio("BM_Int8LayeredSimd", "BM_FloatLayeredScalar");
    ratio("BM_Int8LayeredScalar", "BM_FloatLayeredScalar");
    ratio("BM_Int8LayeredSimd", "BM_Int16LayeredSimd");
    ratio("BM_FloatLayeredSimd", "BM_FloatLayeredScalar");
    ratio("BM_FloatOffsetLayeredSimd", "BM_FloatOffsetLayeredScalar");
    ratio("BM_SpLayeredFloat32Simd", "BM_SpLayeredFloat32Scalar");
    ratio("BM_SpLayeredFloat32Simd", "BM_SpLayeredDoubleScalar");
    ratio("BM_Int8LayeredSimd", "BM_SpLayeredFloat32Simd");
    for (const auto& [name, rate] : rates_) {
      if (name.rfind("BM_Int8LayeredOnTarget", 0) == 0) ratio(name.c_str(), "BM_Int8LayeredScalar");
    }
  }

 private:
  std::map<std::string, double> rates_, iters_, fer_;
};

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  using namespace capgap;  // NOLINT(build/namespaces)
  for (std::int64_t target : hwy::SupportedAndGeneratedTargets()) {
    benchmark::RegisterBenchmark(
        (std::string("BM_Int8LayeredOnTarget/") + hwy::TargetName(target)).c_str(),
        [target](benchmark::State& s) { RunOnTarget(s, target); })
        ->Unit(benchmark::kMillisecond);
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
#ifndef NDEBUG
  std::printf("WARNING: assertions are on; timings are not representative.\n");
#endif
  std::printf("Library dispatch: %s\n", kLibraryTarget);
  SummaryReporter reporter;
  benchmark::RunSpecifiedBenchmarks(&reporter);
  reporter.Summary();
  benchmark::Shutdown();
  return 0;
}
#endif  // HWY_ONCE
