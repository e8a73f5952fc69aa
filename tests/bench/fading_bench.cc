// Cost of fading in the uncoded chain: 16-QAM max-log over fast Rayleigh
// (one branch, and two with MRC) against the same chain over AWGN, one
// thread, in the same run (units alternate between the channels so machine
// noise hits all alike; thread CPU time), median of the per-round ratios. The issue's
// target: fast Rayleigh at most 1.4x the AWGN chain's time.
//   build/bench/fading_bench [--repeats N] [--units N]
#include <algorithm>
#include <chrono>
#include <ctime>
#include <memory>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <string>
#include <vector>

#include "blocks/kernels/awgn_kernels.h"
#include "sim/chain/chain.h"
#include "sim/io/build_info.h"

namespace capgap {
namespace {


double Median(std::vector<double> v) {
  std::sort(v.begin(), v.end());
  return v[v.size() / 2];
}

SchemeConfig Scheme(FadingLaw law, int branches, DemapMethod demapper) {
  SchemeConfig s;
  s.name = "bench_16qam";
  s.modulation = ParseModulation("16qam").value();
  s.demapper = demapper;
  s.frame_bits = 3840;
  s.unit_frames = 16;
  s.channel.law = law;
  s.channel.branches = branches;
  return s;
}

// Thread CPU seconds (less disturbed by other processes on a shared
// machine than wall time).
double CpuSeconds() {
  timespec ts{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &ts);
  return static_cast<double>(ts.tv_sec) + 1e-9 * static_cast<double>(ts.tv_nsec);
}

// One round: `units` units of each chain at 12 dB, alternating unit by unit
// so that machine noise hits every chain alike; CPU seconds per chain.
std::vector<double> Round(const std::vector<const Chain*>& chains, int units, int round,
                          std::uint64_t& sink) {
  std::vector<std::unique_ptr<const Channel>> channels;
  std::vector<ChainWorkspace> ws;
  for (const Chain* c : chains) {
    channels.push_back(c->MakePointChannel(12.0));
    ws.push_back(c->MakeWorkspace());
    sink += c->RunUnit(*channels.back(), 0, 0, ws.back()).bit_errors;  // warm-up
  }
  std::vector<double> t(chains.size(), 0.0);
  for (int u = 0; u < units; ++u) {
    for (std::size_t c = 0; c < chains.size(); ++c) {
      const double t0 = CpuSeconds();
      sink += chains[c]
                  ->RunUnit(*channels[c], 1, static_cast<std::uint32_t>(round * units + u), ws[c])
                  .bit_errors;
      t[c] += CpuSeconds() - t0;
    }
  }
  return t;
}

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  using namespace capgap;
  int repeats = 7, units = 40;
  for (int i = 1; i < argc; ++i) {
    if (!std::strcmp(argv[i], "--repeats") && i + 1 < argc) repeats = std::atoi(argv[++i]);
    else if (!std::strcmp(argv[i], "--units") && i + 1 < argc) units = std::atoi(argv[++i]);
    else {
      std::fprintf(stderr, "usage: fading_bench [--repeats N] [--units N]\n");
      return 2;
    }
  }
  std::printf("capgap %s (%s), %s, kernels %s, one thread, median of %d rounds of %d units x 61440 bits\n",
              ProgramVersion(), GitRevision(), BuildType(), NoiseKernelTarget(), repeats, units);
  if (AssertionsEnabled()) std::printf("WARNING: assertions are on; timings are not representative\n");
  std::uint64_t sink = 0;
  for (const DemapMethod method : {DemapMethod::kMaxLog, DemapMethod::kHard}) {
    const Chain awgn = Chain::Create(Scheme(FadingLaw::kAwgn, 1, method), 1).value();
    const Chain ray1 = Chain::Create(Scheme(FadingLaw::kRayleigh, 1, method), 1).value();
    const Chain ray2 = Chain::Create(Scheme(FadingLaw::kRayleigh, 2, method), 1).value();
    std::vector<double> t_awgn, t_ray1, t_ray2, r1, r2;
    for (int r = 0; r < repeats; ++r) {
      const std::vector<double> t = Round({&awgn, &ray1, &ray2}, units, r, sink);
      t_awgn.push_back(t[0]);
      t_ray1.push_back(t[1]);
      t_ray2.push_back(t[2]);
      r1.push_back(t[1] / t[0]);
      r2.push_back(t[2] / t[0]);
    }
    const double bits = static_cast<double>(awgn.unit_bits()) * units;
    std::printf("16qam %s: awgn %.1f Mbit/s, rayleigh fast %.1f Mbit/s (time ratio %.2f), "
                "rayleigh 2x mrc %.1f Mbit/s (ratio %.2f)\n",
                ToString(method).c_str(), bits / Median(t_awgn) / 1e6, bits / Median(t_ray1) / 1e6,
                Median(r1), bits / Median(t_ray2) / 1e6, Median(r2));
  }
  if (sink == 42) std::printf(" ");
  return 0;
}
