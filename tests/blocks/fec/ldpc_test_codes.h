// Test-only LDPC codes shared by the decoder and kernel tests.
#ifndef CAPGAP_TESTS_BLOCKS_FEC_LDPC_TEST_CODES_H_
#define CAPGAP_TESTS_BLOCKS_FEC_LDPC_TEST_CODES_H_

#include <algorithm>
#include <cstddef>
#include <cstdint>
#include <random>
#include <vector>

namespace capgap::testing_codes {

// Random (dv, dc)-regular parity-check rows, n dv / dc checks: each edge of
// each variable in turn goes to a check with the most free sockets among
// those that close no 4-cycle with the variable's earlier edges (constraints
// relaxed only if none is left), ties broken by the seeded generator.
inline std::vector<std::vector<int>> RegularRows(int n, int dv, int dc, std::uint32_t seed) {
  const int m = n * dv / dc;
  std::mt19937 rng(seed);
  std::vector<std::vector<int>> rows(static_cast<std::size_t>(m));
  std::vector<std::vector<int>> checks_of(static_cast<std::size_t>(n));
  std::vector<int> stamp(static_cast<std::size_t>(m), -1);
  for (int v = 0; v < n; ++v) {
    auto& mine = checks_of[static_cast<std::size_t>(v)];
    for (int j = 0; j < dv; ++j) {
      // stamp[c] == v: c is v's check or shares a variable with one.
      for (int c : mine) {
        stamp[static_cast<std::size_t>(c)] = v;
        for (int u : rows[static_cast<std::size_t>(c)]) {
          for (int c2 : checks_of[static_cast<std::size_t>(u)])
            stamp[static_cast<std::size_t>(c2)] = v;
        }
      }
      std::vector<int> best;
      for (int pass = 0; pass < 2 && best.empty(); ++pass) {
        std::size_t most = 0;
        for (int c = 0; c < m; ++c) {
          const auto& row = rows[static_cast<std::size_t>(c)];
          if (std::find(mine.begin(), mine.end(), c) != mine.end()) continue;
          if (pass == 0 && stamp[static_cast<std::size_t>(c)] == v) continue;
          const std::size_t free_sockets = row.size() < static_cast<std::size_t>(dc)
                                               ? static_cast<std::size_t>(dc) - row.size()
                                               : 0;
          if (free_sockets == 0) continue;
          if (free_sockets > most) {
            most = free_sockets;
            best.clear();
          }
          if (free_sockets == most) best.push_back(c);
        }
      }
      const int c = best[rng() % best.size()];
      rows[static_cast<std::size_t>(c)].push_back(v);
      mine.push_back(c);
    }
  }
  return rows;
}

}  // namespace capgap::testing_codes

#endif  // CAPGAP_TESTS_BLOCKS_FEC_LDPC_TEST_CODES_H_
