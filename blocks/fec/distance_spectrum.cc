// Exact distance-spectrum enumeration (Dijkstra for d_free, then a
// weight-limited dynamic programme per puncturing phase) and the union bound;
// see distance_spectrum.h.
#include "blocks/fec/distance_spectrum.h"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <queue>
#include <string>
#include <utility>
#include <vector>

#include "blocks/core/energy.h"
#include "blocks/core/types.h"

namespace capgap {
namespace {

// Output weight of the branch (state, input) at phase `phase`.
int BranchWeight(const ConvCode& code, int state, int input, int phase) {
  const std::uint32_t label = code.BranchLabel(state, input);
  int w = 0;
  for (int i = 0; i < code.num_outputs(); ++i) {
    if (((label >> i) & 1u) && code.Kept(i, static_cast<std::size_t>(phase))) ++w;
  }
  return w;
}

// Minimum weight of an event starting at phase p0 (Dijkstra over (state,
// phase); the first branch is forced to input 1 from state 0).
int MinEventWeight(const ConvCode& code, int p0) {
  const int states = code.num_states();
  const int period = code.period();
  const int nodes = states * period;
  constexpr int kInf = std::numeric_limits<int>::max();
  std::vector<int> dist(static_cast<std::size_t>(nodes), kInf);
  using Item = std::pair<int, int>;  // (distance, node)
  std::priority_queue<Item, std::vector<Item>, std::greater<Item>> heap;
  const int first = code.NextState(0, 1);
  const int p1 = (p0 + 1) % period;
  const int d0 = BranchWeight(code, 0, 1, p0);
  if (first == 0) return d0;  // cannot happen for K >= 2
  dist[static_cast<std::size_t>(p1 * states + first)] = d0;
  heap.push({d0, p1 * states + first});
  int best = kInf;
  while (!heap.empty()) {
    const auto [d, v] = heap.top();
    heap.pop();
    if (d != dist[static_cast<std::size_t>(v)] || d >= best) continue;
    const int s = v % states;
    const int ph = v / states;
    for (int u = 0; u < 2; ++u) {
      const int ns = code.NextState(s, u);
      const int nd = d + BranchWeight(code, s, u, ph);
      if (ns == 0) {
        best = std::min(best, nd);
        continue;
      }
      const int nv = ((ph + 1) % period) * states + ns;
      if (nd < dist[static_cast<std::size_t>(nv)]) {
        dist[static_cast<std::size_t>(nv)] = nd;
        heap.push({nd, nv});
      }
    }
  }
  return best;
}

}  // namespace

Result<DistanceSpectrum> ComputeDistanceSpectrum(const ConvCode& code, int num_terms) {
  if (num_terms < 1 || num_terms > 30) {
    return Status::Error("distance spectrum: num_terms = " + std::to_string(num_terms) +
                         ": must be in [1, 30]");
  }
  const int states = code.num_states();
  const int period = code.period();
  int dfree = std::numeric_limits<int>::max();
  for (int p = 0; p < period; ++p) dfree = std::min(dfree, MinEventWeight(code, p));

  DistanceSpectrum out;
  out.free_distance = dfree;
  out.info_bits_per_period = period;
  const int wmax = dfree + num_terms - 1;
  const std::size_t wn = static_cast<std::size_t>(wmax) + 1;
  std::vector<std::uint64_t> events(wn, 0), infow(wn, 0);

  // Partial paths by (state, weight): count and summed input weight.
  const std::size_t cells = static_cast<std::size_t>(states) * wn;
  std::vector<std::uint64_t> cnt(cells), inf(cells), ncnt(cells), ninf(cells);
  const std::size_t max_steps =
      static_cast<std::size_t>(states) * static_cast<std::size_t>(period) * wn + 2;
  for (int p0 = 0; p0 < period; ++p0) {
    std::fill(cnt.begin(), cnt.end(), 0);
    std::fill(inf.begin(), inf.end(), 0);
    {
      const int w0 = BranchWeight(code, 0, 1, p0);
      if (w0 <= wmax) {
        const std::size_t c = static_cast<std::size_t>(code.NextState(0, 1)) * wn +
                              static_cast<std::size_t>(w0);
        cnt[c] = 1;
        inf[c] = 1;
      }
    }
    int phase = (p0 + 1) % period;
    bool active = true;
    std::size_t step = 0;
    for (; active && step < max_steps; ++step) {
      std::fill(ncnt.begin(), ncnt.end(), 0);
      std::fill(ninf.begin(), ninf.end(), 0);
      active = false;
      for (int s = 1; s < states; ++s) {
        for (int u = 0; u < 2; ++u) {
          const int ns = code.NextState(s, u);
          const int bw = BranchWeight(code, s, u, phase);
          for (int w = 0; w + bw <= wmax; ++w) {
            const std::size_t c = static_cast<std::size_t>(s) * wn + static_cast<std::size_t>(w);
            if (cnt[c] == 0) continue;
            const std::size_t nw = static_cast<std::size_t>(w + bw);
            const std::uint64_t add_inf = inf[c] + (u ? cnt[c] : 0);
            if (ns == 0) {
              events[nw] += cnt[c];
              infow[nw] += add_inf;
            } else {
              const std::size_t nc = static_cast<std::size_t>(ns) * wn + nw;
              ncnt[nc] += cnt[c];
              ninf[nc] += add_inf;
              active = true;
            }
          }
        }
      }
      std::swap(cnt, ncnt);
      std::swap(inf, ninf);
      phase = (phase + 1) % period;
    }
    if (active) {
      // Unreachable for codes ConvCode::Create accepts (no zero-weight cycle).
      return Status::Error("distance spectrum: enumeration did not terminate (catastrophic code)");
    }
  }
  for (int j = 0; j < num_terms; ++j) {
    const std::size_t d = static_cast<std::size_t>(dfree + j);
    out.distances.push_back(dfree + j);
    out.num_events.push_back(events[d]);
    out.info_weight.push_back(infow[d]);
  }
  return out;
}

double UnionBoundBer(const DistanceSpectrum& spectrum, double ebno_db, double code_rate) {
  CAPGAP_DCHECK(code_rate > 0.0 && code_rate <= 1.0);
  const double ebno = DbToLinear(ebno_db);
  double sum = 0.0;
  for (std::size_t j = 0; j < spectrum.distances.size(); ++j) {
    const double d = spectrum.distances[j];
    // Q(x) = 0.5 erfc(x / sqrt 2).
    const double q = 0.5 * std::erfc(std::sqrt(d * code_rate * ebno));
    sum += static_cast<double>(spectrum.info_weight[j]) * q;
  }
  return sum / spectrum.info_bits_per_period;
}

}  // namespace capgap
