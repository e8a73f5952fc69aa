// Throughput of the uncoded chains, one thread: information bits per second
// for BPSK (hard decisions) and 16-QAM (max-log LLRs), the share of time spent
// generating noise, and the ratio to a careful numpy implementation of the
// same chains measured in the same run (tests/bench/numpy_chains.py) — the
// figure that survives a noisy shared machine; and QPSK with root-raised-cosine
// shaping (a = 0.35, S = 4, span 10) with the share of its time spent in the
// transmit and matched filters; and the coded chain of QPSK with the PEG
// (2016, 1008) (3,6) LDPC code, layered normalised min-sum (int8 lanes), 10
// iterations at Eb/N0 = 0.5 dB (every frame runs all 10), against the same
// decoder alone on one unit's LLRs in the same run: the share of the chain's
// time spent decoding (decoder-only time per bit over chain time per bit),
// both in thread CPU time.
// Medians of --repeats runs.
//
// With --orders: the uncoded chains of QPSK, 16/64/256-QAM and 8/16-PSK, hard
// and max-log, with their noise shares (where a fused kernel would pay).
//
// Usage: chain_bench [--repeats N] [--units N] [--no-numpy] [--scalar] [--coded-only] [--orders]
#include <algorithm>
#include <chrono>
#include <ctime>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <optional>
#include <string>
#include <vector>

#include "blocks/channel/awgn_channel.h"
#include "blocks/kernels/awgn_kernels.h"
#include "blocks/mapping/demapper.h"
#include "blocks/mapping/mapper.h"
#include "blocks/source/bit_source.h"
#include "sim/config/config.h"
#include "sim/io/build_info.h"
#include "blocks/shaping/fir_filter.h"
#include "sim/chain/chain.h"

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

SchemeConfig Scheme(const char* modulation, DemapMethod demapper) {
  SchemeConfig s;
  s.name = std::string("bench_") + modulation;
  s.modulation = ParseModulation(modulation).value();
  s.demapper = demapper;
  s.frame_bits = 3840;
  s.unit_frames = 16;
  return s;
}

// QPSK, root-raised cosine a = 0.35, S = 4, span 10 (the shaped figure the
// issue asks for), max-log LLRs.
SchemeConfig ShapedQpsk() {
  SchemeConfig s = Scheme("qpsk", DemapMethod::kMaxLog);
  s.name = "bench_qpsk_rrc";
  s.shaping = PulseShape::kRootRaisedCosine;
  s.rolloff = 0.35;
  s.span = 10;
  s.samples_per_symbol = 4;
  return s;
}

// share: time of the stage named by `stage` alone on the same amount of data,
// over the chain's time: noise generation (unshaped) or the two filters
// (shaped: transmitter + matched filter on a frame plus its guard symbols).
ChainFigures MeasureChain(const SchemeConfig& s, int units, int repeats) {
  auto chain = Chain::Create(s, 1).value();
  NoiseSpec spec;
  spec.ebno_db = 6.0;
  spec.bits_per_symbol = s.modulation.bits_per_symbol();
  spec.samples_per_symbol = chain.samples_per_symbol();
  const AwgnChannel channel(spec);
  ChainWorkspace ws = chain.MakeWorkspace();
  std::uint64_t sink = 0;
  sink += chain.RunUnit(channel, 0, 0, ws).bit_errors;  // warm-up

  std::vector<double> rates, shares;
  const bool real = s.modulation.order == 2 && !chain.shaped();
  const std::size_t symbols = s.frame_bits / static_cast<std::uint32_t>(spec.bits_per_symbol);
  std::vector<float> rbuf(symbols);
  std::vector<cf32> cbuf(symbols);
  // Shaped: the filters alone on [frame | guard] blocks, as the chain runs them.
  const std::size_t block = symbols + static_cast<std::size_t>(s.span);
  std::vector<cf32> sym(block, cf32(0.7f, -0.7f)), samples(block * static_cast<std::size_t>(s.samples_per_symbol)),
      out(block);
  std::optional<Transmitter> tx;
  std::optional<Receiver> rx;
  FirWorkspace tx_ws, rx_ws;
  if (chain.shaped()) {
    PulseSpec ps;
    ps.shape = s.shaping;
    ps.rolloff = s.rolloff;
    ps.span_symbols = s.span;
    ps.samples_per_symbol = s.samples_per_symbol;
    tx = Transmitter::Create(ps).value();
    rx = Receiver::Create(ps).value();
    tx_ws = tx->MakeWorkspace();
    rx_ws = rx->MakeWorkspace();
  }
  for (int r = 0; r < repeats; ++r) {
    const auto t0 = Clock::now();
    for (int u = 0; u < units; ++u) {
      sink += chain.RunUnit(channel, 1, static_cast<std::uint32_t>(u), ws).bit_errors;
    }
    const double chain_s = std::chrono::duration<double>(Clock::now() - t0).count();
    RngStream stream(PhiloxKey{1, 2}, 0, static_cast<std::uint32_t>(r), Substream::kNoise);
    const auto t1 = Clock::now();
    for (int u = 0; u < units * static_cast<int>(s.unit_frames); ++u) {
      if (chain.shaped()) {
        tx->Shape(sym, samples, tx_ws);
        rx->Receive(samples, out, rx_ws);
      } else if (real) {
        channel.AddNoiseReal(rbuf, stream);
      } else {
        channel.AddNoise(cbuf, stream);
      }
    }
    const double stage_s = std::chrono::duration<double>(Clock::now() - t1).count();
    sink += static_cast<std::uint64_t>(out[0].real() > 0);
    rates.push_back(static_cast<double>(chain.unit_bits()) * units / chain_s);
    shares.push_back(stage_s / chain_s);
  }
  if (sink == 42) std::printf(" ");
  return {Median(rates), Median(shares)};
}

// The coded chain: QPSK, PEG (2016, 1008) (3,6), layered normalised min-sum
// (auto arithmetic: int8 lanes), 10 iterations, 0.5 dB.
constexpr const char* kCodedScheme = R"([sweep]
ebno_db = 0.5
[scheme.bench_qpsk_peg]
modulation = qpsk
demapper = maxlog
code = ldpc
construction = peg
length = 2016
rate = 0.5
degrees = 3
construction_seed = 1
decoder = min_sum_normalized
schedule = layered
max_iterations = 10
)";

// This thread's CPU time in seconds: on the shared 2-core machine the
// wall clock counts other processes' time slices too.
double ThreadSeconds() {
  timespec t{};
  clock_gettime(CLOCK_THREAD_CPUTIME_ID, &t);
  return static_cast<double>(t.tv_sec) + 1e-9 * static_cast<double>(t.tv_nsec);
}

struct CodedFigures {
  double chain_bits_per_second;
  double decoder_bits_per_second;
  double decoder_share;  // median of the per-run ratios
};

// Chain: `units` work units through RunUnit. Decoder alone: the code's
// Decode on one unit's channel LLRs (encoded random bits, mapped, noisy,
// demapped as the chain does), as many times as the chain decoded units.
CodedFigures MeasureCoded(int units, int repeats) {
  const RunConfig config = ParseRunConfig(kCodedScheme, "chain_bench", {}).value();
  const SchemeConfig& s = config.schemes.front();
  auto chain = Chain::Create(s, 1).value();
  NoiseSpec spec;
  spec.ebno_db = 0.5;
  spec.code_rate = chain.code_rate();
  spec.bits_per_symbol = s.modulation.bits_per_symbol();
  const AwgnChannel channel(spec);
  ChainWorkspace ws = chain.MakeWorkspace();
  std::uint64_t sink = chain.RunUnit(channel, 0, 0, ws).bit_errors;  // warm-up

  const ChannelCode& code = chain.code();
  const std::uint32_t frames = chain.unit_frames();
  const std::size_t k = code.info_bits(), n = code.coded_bits();
  std::vector<Bit> info(frames * k), coded(n), decided(frames * k);
  std::vector<float> llrs(frames * n);
  std::vector<cf32> symbols(n / 2);
  std::vector<FrameDecodeResult> results(frames);
  auto code_ws = code.MakeWorkspace(frames);
  const Mapper& mapper = chain.mapper();
  const Demapper demapper = Demapper::Create(mapper, DemapMethod::kMaxLog).value();
  RngStream bits_stream(PhiloxKey{3, 4}, 0, 0, Substream::kBits);
  RngStream noise_stream(PhiloxKey{3, 4}, 0, 0, Substream::kNoise);
  for (std::uint32_t f = 0; f < frames; ++f) {
    const std::span<Bit> u(info.data() + f * k, k);
    GenerateRandomBits(u, bits_stream);
    code.Encode(u, coded, *code_ws);
    mapper.Map(coded, symbols);
    channel.AddNoise(symbols, noise_stream);
    demapper.Demap(symbols, channel.n0(), std::span<float>(llrs.data() + f * n, n));
  }
  std::vector<double> chain_rates, decoder_rates, shares;
  for (int r = 0; r < repeats; ++r) {
    const double t0 = ThreadSeconds();
    for (int u = 0; u < units; ++u) {
      sink += chain.RunUnit(channel, 1, static_cast<std::uint32_t>(u), ws).bit_errors;
    }
    const double chain_s = ThreadSeconds() - t0;
    const double t1 = ThreadSeconds();
    for (int u = 0; u < units; ++u) {
      code.Decode(llrs, decided, results, *code_ws);
      sink += decided[static_cast<std::size_t>(u) % decided.size()];
    }
    const double decoder_s = ThreadSeconds() - t1;
    const double bits = static_cast<double>(frames) * static_cast<double>(k) * units;
    chain_rates.push_back(bits / chain_s);
    decoder_rates.push_back(bits / decoder_s);
    shares.push_back(decoder_s / chain_s);
  }
  if (sink == 42) std::printf(" ");
  return {Median(chain_rates), Median(decoder_rates), Median(shares)};
}

bool RunNumpy(double& bpsk, double& qam16, double& qam16_careful) {
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
  return field("bpsk_hard_bits_per_second", bpsk) && field("qam16_maxlog_bits_per_second", qam16) &&
         field("qam16_maxlog_careful_bits_per_second", qam16_careful);
}

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  using namespace capgap;
  int repeats = 7, units = 40;
  bool numpy = true, coded_only = false, orders = false;
  for (int i = 1; i < argc; ++i) {
    if (!std::strcmp(argv[i], "--repeats") && i + 1 < argc) repeats = std::atoi(argv[++i]);
    else if (!std::strcmp(argv[i], "--units") && i + 1 < argc) units = std::atoi(argv[++i]);
    else if (!std::strcmp(argv[i], "--no-numpy")) numpy = false;
    else if (!std::strcmp(argv[i], "--scalar")) ForceScalarKernels(true);
    else if (!std::strcmp(argv[i], "--coded-only")) coded_only = true;
    else if (!std::strcmp(argv[i], "--orders")) orders = true;
    else {
      std::fprintf(stderr,
                   "usage: chain_bench [--repeats N] [--units N] [--no-numpy] [--scalar] "
                   "[--coded-only] [--orders]\n");
      return 2;
    }
  }
  std::printf("capgap %s (%s), %s, kernels %s, one thread, median of %d runs of %d units x 61440 bits\n",
              ProgramVersion(), GitRevision(), BuildType(), NoiseKernelTarget(), repeats, units);
  if (AssertionsEnabled()) std::printf("WARNING: assertions are on; timings are not representative\n");
  if (orders) {
    // Uncoded chains of every order, hard and max-log: which ones a fused
    // bits-to-count kernel would pay for (a chain whose time is mostly noise
    // gains little). 16-QAM runs fused (CountQam16Errors), the others composed.
    std::printf("%-30s %12s %14s\n", "uncoded chain", "Mbit/s/core", "noise share");
    for (const char* m : {"qpsk", "16qam", "64qam", "256qam", "8psk", "16psk"}) {
      for (const DemapMethod d : {DemapMethod::kHard, DemapMethod::kMaxLog}) {
        const ChainFigures f = MeasureChain(Scheme(m, d), units, repeats);
        std::printf("%-30s %12.1f %8.0f%% noise\n",
                    (std::string(m) + (d == DemapMethod::kHard ? " hard" : " maxlog")).c_str(),
                    f.bits_per_second / 1e6, 100 * f.noise_share);
      }
    }
    return 0;
  }
  // Coded units hold 64 frames of 1008 bits (64512 bits, about the
  // uncoded units' 61440).
  const CodedFigures coded = MeasureCoded(units, repeats);
  std::printf("%-30s %12.1f %8.0f%% of it decoding; decoder alone %.1f Mbit/s\n",
              "qpsk ldpc peg2016 0.5dB 10it", coded.chain_bits_per_second / 1e6,
              100 * coded.decoder_share, coded.decoder_bits_per_second / 1e6);
  if (coded_only) return 0;
  const ChainFigures bpsk = MeasureChain(Scheme("bpsk", DemapMethod::kHard), units, repeats);
  const ChainFigures qam = MeasureChain(Scheme("16qam", DemapMethod::kMaxLog), units, repeats);
  const ChainFigures shaped = MeasureChain(ShapedQpsk(), units, repeats);
  std::printf("%-30s %12s %14s\n", "chain", "Mbit/s/core", "stage share");
  std::printf("%-30s %12.1f %8.0f%% noise\n", "bpsk hard", bpsk.bits_per_second / 1e6,
              100 * bpsk.noise_share);
  std::printf("%-30s %12.1f %8.0f%% noise\n", "16qam maxlog", qam.bits_per_second / 1e6,
              100 * qam.noise_share);
  std::printf("%-30s %12.1f %8.0f%% filters (%s)\n", "qpsk rrc a=0.35 S=4 span=10 maxlog",
              shaped.bits_per_second / 1e6, 100 * shaped.noise_share,
              ToString(Receiver::Create(PulseSpec{PulseShape::kRootRaisedCosine, 0.35, 10, 4})
                           .value()
                           .filter()
                           .method())
                  .c_str());
  double np_bpsk = 0, np_qam = 0, np_qam_careful = 0;
  if (numpy && RunNumpy(np_bpsk, np_qam, np_qam_careful)) {
    std::printf(
        "numpy reference (same run): bpsk hard %.1f Mbit/s, 16qam maxlog %.1f Mbit/s (careful: "
        "%.1f)\n",
        np_bpsk / 1e6, np_qam / 1e6, np_qam_careful / 1e6);
    std::printf("ratio capgap/numpy: bpsk hard %.1fx, 16qam maxlog %.1fx (careful numpy: %.1fx)\n",
                bpsk.bits_per_second / np_bpsk, qam.bits_per_second / np_qam,
                qam.bits_per_second / np_qam_careful);
  }
  return 0;
}
