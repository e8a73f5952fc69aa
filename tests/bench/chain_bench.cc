// Throughput of the uncoded chains, one thread: information bits per second
// for BPSK (hard decisions) and 16-QAM (max-log LLRs), the share of time spent
// generating noise, and the ratio to a careful numpy implementation of the
// same chains measured in the same run (tests/bench/numpy_chains.py) — the
// figure that survives a noisy shared machine. Medians of --repeats runs.
//
// Usage: chain_bench [--repeats N] [--units N] [--no-numpy] [--scalar]
#include <algorithm>
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "blocks/channel/awgn_channel.h"
#include "blocks/kernels/awgn_kernels.h"
#include "sim/build_info.h"
#include "sim/chain.h"

namespace capgap {
namespace {

using Clock = std::chrono::steady_clock;

double Median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  const std::size_t n = v.size();
  return n % 2 ? v[n / 2] : 0.5 * (v[n / 2 - 1] + v[n / 2]);
}

struct ChainFigures {
  double bits_per_second;
  double noise_share;
};

ChainFigures MeasureChain(const char* modulation, DemapMethod demapper, int units, int repeats) {
  SchemeConfig s;
  s.name = std::string("bench_") + modulation;
  s.modulation = ParseModulation(modulation).value();
  s.demapper = demapper;
  s.frame_bits = 3840;
  s.unit_frames = 16;
  auto chain = Chain::Create(s, 1).value();
  NoiseSpec spec;
  spec.ebn0_db = 6.0;
  spec.bits_per_symbol = s.modulation.bits_per_symbol();
  const AwgnChannel channel(spec);
  ChainWorkspace ws = chain.MakeWorkspace();
  std::uint64_t sink = 0;
  sink += chain.RunUnit(channel, 0, 0, ws).bit_errors;  // warm-up

  std::vector<double> rates, shares;
  const bool real = s.modulation.order == 2;
  const std::size_t symbols = s.frame_bits / static_cast<std::uint32_t>(spec.bits_per_symbol);
  std::vector<float> rbuf(symbols);
  std::vector<cf32> cbuf(symbols);
  for (int r = 0; r < repeats; ++r) {
    const auto t0 = Clock::now();
    for (int u = 0; u < units; ++u) {
      sink += chain.RunUnit(channel, 1, static_cast<std::uint32_t>(u), ws).bit_errors;
    }
    const double chain_s = std::chrono::duration<double>(Clock::now() - t0).count();
    // Noise alone, on the same number of samples.
    RngStream stream(PhiloxKey{1, 2}, 0, static_cast<std::uint32_t>(r), Substream::kNoise);
    const auto t1 = Clock::now();
    for (int u = 0; u < units * static_cast<int>(s.unit_frames); ++u) {
      if (real) {
        channel.AddNoiseReal(rbuf, stream);
      } else {
        channel.AddNoise(cbuf, stream);
      }
    }
    const double noise_s = std::chrono::duration<double>(Clock::now() - t1).count();
    rates.push_back(static_cast<double>(chain.unit_bits()) * units / chain_s);
    shares.push_back(noise_s / chain_s);
  }
  if (sink == 42) std::printf(" ");
  return {Median(rates), Median(shares)};
}

bool RunNumpy(double& bpsk, double& qam16) {
  const std::string script = std::string(CAPGAP_SOURCE_DIR) + "/tests/bench/numpy_chains.py";
  const std::string cmd = "/usr/bin/python3 " + script + " 2>&1";
  FILE* p = popen(cmd.c_str(), "r");
  if (!p) return false;
  char buf[4096];
  std::string out;
  while (std::fgets(buf, sizeof buf, p)) out += buf;
  if (pclose(p) != 0) {
    std::fprintf(stderr, "numpy reference failed:\n%s\n", out.c_str());
    return false;
  }
  auto field = [&](const char* key, double& v) {
    const auto pos = out.find(key);
    if (pos == std::string::npos) return false;
    v = std::strtod(out.c_str() + out.find(':', pos) + 1, nullptr);
    return v > 0;
  };
  return field("bpsk_hard_bits_per_second", bpsk) && field("qam16_maxlog_bits_per_second", qam16);
}

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  using namespace capgap;
  int repeats = 7, units = 40;
  bool numpy = true;
  for (int i = 1; i < argc; ++i) {
    if (!std::strcmp(argv[i], "--repeats") && i + 1 < argc) repeats = std::atoi(argv[++i]);
    else if (!std::strcmp(argv[i], "--units") && i + 1 < argc) units = std::atoi(argv[++i]);
    else if (!std::strcmp(argv[i], "--no-numpy")) numpy = false;
    else if (!std::strcmp(argv[i], "--scalar")) ForceScalarKernels(true);
    else {
      std::fprintf(stderr, "usage: chain_bench [--repeats N] [--units N] [--no-numpy] [--scalar]\n");
      return 2;
    }
  }
  std::printf("capgap %s (%s), %s, kernels %s, one thread, median of %d runs of %d units x 61440 bits\n",
              ProgramVersion(), GitRevision(), BuildType(), NoiseKernelTarget(), repeats, units);
  if (AssertionsEnabled()) std::printf("WARNING: assertions are on; timings are not representative\n");
  const ChainFigures bpsk = MeasureChain("bpsk", DemapMethod::kHard, units, repeats);
  const ChainFigures qam = MeasureChain("16qam", DemapMethod::kMaxLog, units, repeats);
  std::printf("%-18s %12s %12s\n", "chain", "Mbit/s/core", "noise share");
  std::printf("%-18s %12.1f %11.0f%%\n", "bpsk hard", bpsk.bits_per_second / 1e6, 100 * bpsk.noise_share);
  std::printf("%-18s %12.1f %11.0f%%\n", "16qam maxlog", qam.bits_per_second / 1e6, 100 * qam.noise_share);
  double np_bpsk = 0, np_qam = 0;
  if (numpy && RunNumpy(np_bpsk, np_qam)) {
    std::printf("numpy reference (same run): bpsk hard %.1f Mbit/s, 16qam maxlog %.1f Mbit/s\n",
                np_bpsk / 1e6, np_qam / 1e6);
    std::printf("ratio capgap/numpy: bpsk hard %.1fx, 16qam maxlog %.1fx\n",
                bpsk.bits_per_second / np_bpsk, qam.bits_per_second / np_qam);
  }
  return 0;
}
