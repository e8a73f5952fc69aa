// Normalisation study: the Eb/N0 at which layered normalised min-sum reaches
// a frame error rate of 1e-3, for factors 0.625 .. 1.0, against offset
// min-sum (offset 0.5) and sum-product (float32), on the shipped LDPC codes
// and an irregular code with high-degree variables; QPSK (Gray, max-log
// LLRs, which are exact for QPSK), AWGN, at most 50 iterations with early
// stop, the default arithmetic of each decoder (auto: int8 for min-sum when
// the largest variable degree is at most 4, else int16), plus float min-sum
// at 0.75.
//
// Method: every decoder of a code runs the same scheme name and seed, so at
// each Eb/N0 point it sees the same information bits and the same noise
// (paired comparison: differences between factors are far more precise than
// each curve alone). A point runs whole work units until 100 frame errors or
// 150000 frames; a decoder's sweep walks up the Eb/N0 grid (0.25 dB steps)
// and stops at the first point with FER below 1e-3. The Eb/N0 at FER 1e-3
// is interpolated linearly in log10(FER) between the last point above and
// the first below. With 100 frame errors a point's FER is known to about
// +-20 % (95 %, common practice), i.e. a few hundredths of a dB on these
// waterfalls. Two threads run decoders side by side; the results do not
// depend on that (each decoder's counts are a function of seed, scheme,
// point and unit). Takes a few minutes on 2 cores.
//
// Usage: normalisation_study [--threads N] [--quick]
//   --quick: 30 frame errors or 30000 frames per point (a smoke run).
#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "blocks/channel/awgn_channel.h"
#include "sim/chain/chain.h"
#include "sim/config/config.h"
#include "sim/io/build_info.h"

namespace capgap {
namespace {

struct Code {
  const char* label;
  std::string keys;  // the code's keys of a [scheme.study] section
  double first_db;   // start of the Eb/N0 grid
};

struct Decoder {
  std::string label;
  std::string keys;
};

struct Point {
  double ebno_db;
  std::uint64_t frames, frame_errors;
};

struct StudyResult {
  std::vector<Point> points;
  double db_at_target = NAN;  // Eb/N0 at FER 1e-3 (NaN: not bracketed)
};

constexpr double kTargetFer = 1e-3;

std::string SchemeText(const Code& code, const Decoder& decoder) {
  return "[sweep]\nebno_db = 1\nseed = 7\n[scheme.study]\nmodulation = qpsk\ndemapper = maxlog\n"
         "code = ldpc\nschedule = layered\nmax_iterations = 50\n" +
         code.keys + decoder.keys;
}

StudyResult RunDecoder(const Code& code, const Decoder& decoder, std::uint64_t target_frame_errors,
                  std::uint64_t max_frames) {
  const auto config = ParseRunConfig(SchemeText(code, decoder), "normalisation_study", {});
  if (!config.ok()) {
    std::fprintf(stderr, "%s\n", config.status().message().c_str());
    std::exit(1);
  }
  SchemeConfig scheme = config.value().schemes.front();
  scheme.ldpc.config_dir = std::string(CAPGAP_SOURCE_DIR) + "/configs";
  auto chain = Chain::Create(scheme, 7);
  if (!chain.ok()) {
    std::fprintf(stderr, "%s\n", chain.status().message().c_str());
    std::exit(1);
  }
  ChainWorkspace ws = chain.value().MakeWorkspace();
  StudyResult result;
  Point previous{0, 0, 0};
  for (int p = 0; p < 16; ++p) {
    const double ebno_db = code.first_db + 0.25 * p;
    const auto channel = chain.value().MakePointChannel(ebno_db);
    Point point{ebno_db, 0, 0};
    for (std::uint32_t unit = 0;
         point.frame_errors < target_frame_errors && point.frames < max_frames; ++unit) {
      const UnitCounts c =
          chain.value().RunUnit(*channel, static_cast<std::uint32_t>(p), unit, ws);
      point.frames += c.frames;
      point.frame_errors += c.frame_errors;
    }
    result.points.push_back(point);
    const double fer = static_cast<double>(point.frame_errors) / static_cast<double>(point.frames);
    if (fer < kTargetFer) {
      if (p > 0 && point.frame_errors > 0) {
        const double f0 = std::log10(static_cast<double>(previous.frame_errors) /
                                     static_cast<double>(previous.frames));
        const double f1 = std::log10(fer);
        const double t = (std::log10(kTargetFer) - f0) / (f1 - f0);
        result.db_at_target = previous.ebno_db + t * (ebno_db - previous.ebno_db);
      }
      break;
    }
    previous = point;
  }
  return result;
}

}  // namespace
}  // namespace capgap

int main(int argc, char** argv) {
  using namespace capgap;
  int threads = 2;
  bool quick = false;
  for (int i = 1; i < argc; ++i) {
    if (!std::strcmp(argv[i], "--threads") && i + 1 < argc) {
      threads = std::max(1, std::atoi(argv[++i]));
    } else if (!std::strcmp(argv[i], "--quick")) {
      quick = true;
    } else {
      std::fprintf(stderr, "usage: normalisation_study [--threads N] [--quick]\n");
      return 2;
    }
  }
  const std::uint64_t target = quick ? 30 : 100, max_frames = quick ? 30000 : 150000;
  const std::vector<Code> codes = {
      {"PEG (2016, 1008) regular (3,6)",
       "construction = peg\nlength = 2016\nrate = 0.5\ndegrees = 3\n", 1.25},
      {"QC (2016, 1008), base 12 x 24, Z = 84 (info degrees 8 and 3)",
       "construction = qc\nbase_matrix = codes/qc_r1-2_24x12.txt\nlifting = 84\n", 1.0},
      {"PEG (2016, 1008) irregular, degrees 2:0.5, 3:0.3, 8:0.2",
       "construction = peg\nlength = 2016\nrate = 0.5\ndegrees = 2:0.5,3:0.3,8:0.2\n", 1.0},
  };
  std::vector<Decoder> decoders;
  for (const char* a : {"0.625", "0.6875", "0.75", "0.8125", "0.875", "0.9375", "1.0"}) {
    decoders.push_back({std::string("normalised min-sum ") + a,
                        std::string("decoder = min_sum_normalized\nnormalization = ") + a + "\n"});
  }
  // The factor's effect apart from the fixed-point arithmetic (auto: int8
  // for d_v,max <= 4, else int16).
  decoders.push_back({"normalised min-sum 0.75, float",
                      "decoder = min_sum_normalized\nnormalization = 0.75\narithmetic = float\n"});
  decoders.push_back({"offset min-sum 0.5", "decoder = min_sum_offset\noffset = 0.5\n"});
  decoders.push_back({"sum-product float32", "decoder = sum_product\narithmetic = float32\n"});

  std::printf("capgap %s (%s), %s; %s per point; QPSK, layered, <= 50 iterations, early stop\n",
              ProgramVersion(), GitRevision(), BuildType(),
              quick ? "30 frame errors or 30000 frames" : "100 frame errors or 150000 frames");
  std::vector<StudyResult> results(codes.size() * decoders.size());
  std::atomic<std::size_t> next{0};
  std::vector<std::thread> pool;
  for (int t = 0; t < threads; ++t) {
    pool.emplace_back([&] {
      for (std::size_t j; (j = next.fetch_add(1)) < results.size();) {
        results[j] = RunDecoder(codes[j / decoders.size()], decoders[j % decoders.size()], target,
                                max_frames);
      }
    });
  }
  for (auto& t : pool) t.join();

  for (std::size_t c = 0; c < codes.size(); ++c) {
    std::printf("\n%s: Eb/N0 (dB) at FER 1e-3\n", codes[c].label);
    std::printf("| decoder | Eb/N0 at FER 1e-3 | vs sum-product | bracketing points (frame errors / frames) |\n");
    std::printf("|---|---|---|---|\n");
    const StudyResult& spa = results[c * decoders.size() + decoders.size() - 1];
    for (std::size_t d = 0; d < decoders.size(); ++d) {
      const StudyResult& r = results[c * decoders.size() + d];
      std::string points;
      const std::size_t n = r.points.size();
      for (std::size_t i = n >= 2 ? n - 2 : 0; i < n; ++i) {
        char buf[96];
        std::snprintf(buf, sizeof buf, "%s%.2f dB: %llu / %llu", points.empty() ? "" : "; ",
                      r.points[i].ebno_db, static_cast<unsigned long long>(r.points[i].frame_errors),
                      static_cast<unsigned long long>(r.points[i].frames));
        points += buf;
      }
      std::printf("| %s | %.2f | %+.2f | %s |\n", decoders[d].label.c_str(), r.db_at_target,
                  r.db_at_target - spa.db_at_target, points.c_str());
    }
  }
  return 0;
}
