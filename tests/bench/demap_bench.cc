// Throughput of the demapper (blocks/mapping/demapper.h) on the dispatched
// kernel target: 16-QAM and 64-PSK with max-log and log-MAP LLRs, plus the
// hard decisions, on a frame of noisy symbols at Es/N0 = 10 dB.
// items_per_second is symbols per second. Only the public Demapper API is
// used, so the same file times an older build of the library: compare two
// binaries by running them interleaved, e.g.
//   for i in 1 2 3 4 5; do old/demap_bench; new/demap_bench; done
// with --benchmark_repetitions=7 --benchmark_report_aggregates_only=true.
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstddef>
#include <cstdio>
#include <random>
#include <string>
#include <vector>

#include "blocks/core/types.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/mapping/modulation.h"
#include "sim/io/build_info.h"

namespace capgap {
namespace {

constexpr std::size_t kSymbols = 4096;
constexpr float kN0 = 0.1f;  // Es/N0 = 10 dB

void RunDemap(benchmark::State& state, const char* modulation, DemapMethod method) {
  const Mapper mapper = Mapper::Create(ParseModulation(modulation).value()).value();
  const Demapper demapper = Demapper::Create(mapper, method).value();
  const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
  std::mt19937 gen(7u);
  std::vector<Bit> bits(m * kSymbols);
  for (Bit& b : bits) b = static_cast<Bit>(gen() & 1u);
  std::vector<cf32> y(kSymbols);
  mapper.Map(bits, y);
  std::normal_distribution<float> noise(0.0f, std::sqrt(kN0 / 2.0f));
  for (cf32& v : y) v += cf32(noise(gen), noise(gen));
  std::vector<float> llrs(m * kSymbols);
  for (auto _ : state) {
    demapper.Demap(y, kN0, llrs);
    benchmark::DoNotOptimize(llrs.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(kSymbols));
  state.SetLabel(NoiseKernelTarget());
}

void RunHardDecide(benchmark::State& state, const char* modulation) {
  const Mapper mapper = Mapper::Create(ParseModulation(modulation).value()).value();
  const Demapper demapper = Demapper::Create(mapper, DemapMethod::kHard).value();
  const auto m = static_cast<std::size_t>(mapper.bits_per_symbol());
  std::mt19937 gen(8u);
  std::vector<Bit> bits(m * kSymbols);
  for (Bit& b : bits) b = static_cast<Bit>(gen() & 1u);
  std::vector<cf32> y(kSymbols);
  mapper.Map(bits, y);
  for (auto _ : state) {
    demapper.HardDecide(y, bits);
    benchmark::DoNotOptimize(bits.data());
    benchmark::ClobberMemory();
  }
  state.SetItemsProcessed(state.iterations() * static_cast<std::int64_t>(kSymbols));
}

void BM_Demap_16qam_MaxLog(benchmark::State& s) { RunDemap(s, "16qam", DemapMethod::kMaxLog); }
void BM_Demap_16qam_LogMap(benchmark::State& s) { RunDemap(s, "16qam", DemapMethod::kLogMap); }
void BM_Demap_64psk_MaxLog(benchmark::State& s) { RunDemap(s, "64psk", DemapMethod::kMaxLog); }
void BM_Demap_64psk_LogMap(benchmark::State& s) { RunDemap(s, "64psk", DemapMethod::kLogMap); }
void BM_Demap_64qam_MaxLog(benchmark::State& s) { RunDemap(s, "64qam", DemapMethod::kMaxLog); }
void BM_Demap_8psk_MaxLog(benchmark::State& s) { RunDemap(s, "8psk", DemapMethod::kMaxLog); }
void BM_Demap_16qam_Hard(benchmark::State& s) { RunDemap(s, "16qam", DemapMethod::kHard); }

void BM_HardDecide_16qam(benchmark::State& s) { RunHardDecide(s, "16qam"); }
void BM_HardDecide_8psk(benchmark::State& s) { RunHardDecide(s, "8psk"); }

BENCHMARK(BM_Demap_16qam_MaxLog);
BENCHMARK(BM_Demap_16qam_LogMap);
BENCHMARK(BM_Demap_64psk_MaxLog);
BENCHMARK(BM_Demap_64psk_LogMap);
BENCHMARK(BM_Demap_64qam_MaxLog);
BENCHMARK(BM_Demap_8psk_MaxLog);
BENCHMARK(BM_Demap_16qam_Hard);
BENCHMARK(BM_HardDecide_16qam);
BENCHMARK(BM_HardDecide_8psk);

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  benchmark::AddCustomContext("assertions", capgap::AssertionsEnabled() ? "on (slow)" : "off");
  benchmark::AddCustomContext("kernel_target", capgap::NoiseKernelTarget());
  if (capgap::AssertionsEnabled()) std::fprintf(stderr, "warning: assertions are on\n");
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}
