// Throughput of the Gaussian noise kernels (blocks/kernels/awgn_kernels.h):
// the dispatched SIMD target, the scalar oracle (awgn_reference.h, also what
// ForceScalarKernels(true) runs), and Boost.Random's normal_distribution on
// mt19937 as a yardstick for a library Gaussian generator. items_per_second is
// real normals per second for the Fill/Boost cases and complex samples (two
// normals each) per second for AddComplexNoise. The dispatched target and
// whether assertions are compiled in are written into the report's context;
// compare targets as ratios within one run (the machine may be shared).
#include <benchmark/benchmark.h>

#include <boost/random/mersenne_twister.hpp>
#include <boost/random/normal_distribution.hpp>
#include <cstddef>
#include <cstdio>
#include <string>
#include <vector>

#include "blocks/core/rng_stream.h"
#include "blocks/core/types.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/kernels/awgn_reference.h"
#include "sim/io/build_info.h"

namespace capgap {
namespace {

RngStream BenchStream() {
  return RngStream(DeriveKey(1u, "noise_bench"), 0u, 0u, Substream::kNoise);
}

void BM_FillStandardNormal_Dispatched(benchmark::State& state) {
  std::vector<float> out(static_cast<std::size_t>(state.range(0)));
  RngStream stream = BenchStream();
  for (auto _ : state) {
    FillStandardNormal(out, stream);
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
  state.SetLabel(NoiseKernelTarget());
}

void BM_FillStandardNormal_ScalarReference(benchmark::State& state) {
  std::vector<float> out(static_cast<std::size_t>(state.range(0)));
  RngStream stream = BenchStream();
  for (auto _ : state) {
    reference::FillStandardNormal(out, stream);
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
}

void BM_AddComplexNoise_Dispatched(benchmark::State& state) {
  std::vector<cf32> samples(static_cast<std::size_t>(state.range(0)), cf32(1.0f, -1.0f));
  RngStream stream = BenchStream();
  for (auto _ : state) {
    AddComplexNoise(samples, 1e-3f, stream);
    benchmark::DoNotOptimize(samples.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
  state.SetLabel(std::string(NoiseKernelTarget()) + ", complex samples");
}

void BM_AddComplexNoise_ScalarReference(benchmark::State& state) {
  std::vector<cf32> samples(static_cast<std::size_t>(state.range(0)), cf32(1.0f, -1.0f));
  RngStream stream = BenchStream();
  for (auto _ : state) {
    reference::AddComplexNoise(samples, 1e-3f, stream);
    benchmark::DoNotOptimize(samples.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
  state.SetLabel("complex samples");
}

void BM_BoostNormalMt19937(benchmark::State& state) {
  std::vector<float> out(static_cast<std::size_t>(state.range(0)));
  boost::random::mt19937 gen(5489u);
  boost::random::normal_distribution<float> normal(0.0f, 1.0f);
  for (auto _ : state) {
    for (float& v : out) v = normal(gen);
    benchmark::DoNotOptimize(out.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * state.range(0));
}

// 4096 normals (16 KiB) stay in L1, like one frame of a chain; 2^18 (1 MiB)
// shows the cost once the buffer lives in L2.
BENCHMARK(BM_FillStandardNormal_Dispatched)->Arg(4096)->Arg(1 << 18);
BENCHMARK(BM_FillStandardNormal_ScalarReference)->Arg(4096);
BENCHMARK(BM_AddComplexNoise_Dispatched)->Arg(2048);
BENCHMARK(BM_AddComplexNoise_ScalarReference)->Arg(2048);
BENCHMARK(BM_BoostNormalMt19937)->Arg(4096);

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::AddCustomContext("noise_kernel_target", capgap::NoiseKernelTarget());
  benchmark::AddCustomContext("build_type", capgap::BuildType());
  benchmark::AddCustomContext("assertions", capgap::AssertionsEnabled() ? "on" : "off");
  if (capgap::AssertionsEnabled()) {
    std::fprintf(stderr,
                 "WARNING: assertions are compiled in (build type %s); timings are "
                 "not representative. Use -DCMAKE_BUILD_TYPE=Release.\n",
                 capgap::BuildType());
  }
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
