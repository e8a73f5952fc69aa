// LDPC constructions and structural analysis: girth, degree profile, the
// degree spec parser, progressive edge growth, base-matrix parsing and
// lifting, dual-diagonal structure detection and the seeded shift search.
#include "blocks/fec/ldpc_construction.h"

#include <algorithm>
#include <charconv>
#include <climits>
#include <cmath>
#include <numeric>
#include <system_error>

#include "blocks/core/hash.h"
#include "blocks/core/text.h"
#include "blocks/fec/ldpc_matrix_file.h"

namespace capgap {

Result<LdpcConstructionKind> ParseLdpcConstructionKind(std::string_view word) {
  if (word == "peg") return LdpcConstructionKind::kPeg;
  if (word == "qc") return LdpcConstructionKind::kQc;
  if (word == "file") return LdpcConstructionKind::kFile;
  return Status::Error("valid: peg, qc, file");
}

std::string ToString(LdpcConstructionKind kind) {
  switch (kind) {
    case LdpcConstructionKind::kPeg:
      return "peg";
    case LdpcConstructionKind::kQc:
      return "qc";
    case LdpcConstructionKind::kFile:
      return "file";
  }
  return "unknown";
}
namespace {

using Index = std::size_t;
Index U(int i) { return static_cast<Index>(i); }

std::string JoinCounts(const std::vector<int>& by_degree) {
  std::string s;
  for (std::size_t d = 0; d < by_degree.size(); ++d) {
    if (by_degree[d] == 0) continue;
    if (!s.empty()) s += ',';
    s += std::to_string(d) + ":" + std::to_string(by_degree[d]);
  }
  return s.empty() ? "none" : s;
}

std::string ShortestDouble(double x) {
  char buf[64];
  const auto [ptr, ec] = std::to_chars(buf, buf + sizeof(buf), x);
  return ec == std::errc() ? std::string(buf, ptr) : std::to_string(x);
}

// The degree-balancing pass after progressive edge growth (see
// ldpc_construction.h): moves single edges (u, hi) -> (u, lo) from a check of
// maximum degree to one of minimum degree while they differ by >= 2, taking
// only moves after which every cycle through the new edge has length >=
// girth (girth = kNoCycle: the new edge may close no cycle at all). Checks,
// variables and target checks are tried in increasing index order, so the
// pass is deterministic. Stops when no such move exists.
// Returns false when `stop` was set before the pass ended.
bool BalanceCheckDegrees(int girth, std::vector<std::vector<int>>& var_checks,
                         std::vector<std::vector<int>>& check_vars,
                         const std::atomic<bool>* stop) {
  const int n = static_cast<int>(var_checks.size());
  const int m = static_cast<int>(check_vars.size());
  // A cycle closed by edge (u, lo) has length dist(u, lo) + 1 in the graph
  // without (u, hi); dist is odd, so lengths < girth mean dist <= girth - 3.
  const int max_dist = girth == kNoCycle ? INT_MAX : girth - 3;
  std::vector<int> check_dist(U(m), -1), var_seen(U(n), 0), touched_checks, touched_vars, frontier,
      next;
  for (;;) {
    int max_deg = 0, min_deg = INT_MAX;
    for (const auto& vs : check_vars) {
      max_deg = std::max(max_deg, static_cast<int>(vs.size()));
      min_deg = std::min(min_deg, static_cast<int>(vs.size()));
    }
    if (max_deg - min_deg < 2) return true;
    if (stop && stop->load(std::memory_order_relaxed)) return false;
    bool moved = false;
    for (int hi = 0; hi < m && !moved; ++hi) {
      if (static_cast<int>(check_vars[U(hi)].size()) != max_deg) continue;
      for (std::size_t ui = 0; ui < check_vars[U(hi)].size() && !moved; ++ui) {
        const int u = check_vars[U(hi)][ui];
        // BFS from u over the graph without edge (u, hi), checks to max_dist.
        touched_checks.clear();
        touched_vars.clear();
        frontier.assign(1, u);
        var_seen[U(u)] = 1;
        touched_vars.push_back(u);
        for (int d = 1; d <= max_dist && !frontier.empty(); d += 2) {
          next.clear();
          for (const int x : frontier) {
            for (const int c : var_checks[U(x)]) {
              if ((x == u && c == hi) || check_dist[U(c)] >= 0) continue;
              check_dist[U(c)] = d;
              touched_checks.push_back(c);
              if (d + 2 > max_dist) continue;
              for (const int y : check_vars[U(c)]) {
                if (var_seen[U(y)] || (y == u)) continue;
                var_seen[U(y)] = 1;
                touched_vars.push_back(y);
                next.push_back(y);
              }
            }
          }
          frontier.swap(next);
        }
        for (int lo = 0; lo < m; ++lo) {
          if (static_cast<int>(check_vars[U(lo)].size()) != min_deg || check_dist[U(lo)] >= 0)
            continue;
          // Move the edge: u leaves hi, joins lo (u is not in lo: lo unreached).
          auto& vc = var_checks[U(u)];
          *std::find(vc.begin(), vc.end(), hi) = lo;
          auto& hv = check_vars[U(hi)];
          hv.erase(hv.begin() + static_cast<std::ptrdiff_t>(ui));
          check_vars[U(lo)].push_back(u);
          moved = true;
          break;
        }
        for (const int c : touched_checks) check_dist[U(c)] = -1;
        for (const int x : touched_vars) var_seen[U(x)] = 0;
      }
    }
    if (!moved) return true;
  }
}

}  // namespace

// ----- Analysis --------------------------------------------------------------

int Girth(const LdpcCode& code) {
  const int n = code.length();
  const int m = code.checks();
  const int nodes = n + m;
  const auto row_start = code.row_start();
  const auto edge_var = code.edge_variable();
  const auto col_start = code.col_start();
  const auto col_edge = code.col_edge();
  // Node ids: variables 0..n-1, checks n..n+m-1; one adjacency array.
  std::vector<int> edge_check(edge_var.size());
  for (int r = 0; r < m; ++r) {
    for (int e = row_start[U(r)]; e < row_start[U(r) + 1]; ++e) edge_check[U(e)] = r;
  }
  std::vector<int> adj_start(U(nodes) + 1, 0);
  std::vector<int> adj;
  adj.reserve(2 * edge_var.size());
  for (int v = 0; v < n; ++v) {
    for (int k = col_start[U(v)]; k < col_start[U(v) + 1]; ++k) {
      adj.push_back(n + edge_check[U(col_edge[U(k)])]);
    }
    adj_start[U(v) + 1] = static_cast<int>(adj.size());
  }
  for (int r = 0; r < m; ++r) {
    for (int e = row_start[U(r)]; e < row_start[U(r) + 1]; ++e) adj.push_back(edge_var[U(e)]);
    adj_start[U(n + r) + 1] = static_cast<int>(adj.size());
  }
  std::vector<int> dist(U(nodes), -1), parent(U(nodes), -1), queue(U(nodes));
  int best = INT_MAX;
  // Every cycle contains a variable, so roots at the variables suffice. From
  // root x, a non-tree edge (u, w) closes a walk of length
  // dist[u] + dist[w] + 1 that contains a cycle; when x lies on a shortest
  // cycle the edge opposite x gives exactly its length. While expanding u at
  // depth d, every such value is >= 2d, so the search stops once 2d >= best.
  for (int root = 0; root < n && best > 4; ++root) {
    int head = 0, tail = 0;
    queue[U(tail++)] = root;
    dist[U(root)] = 0;
    parent[U(root)] = -1;
    while (head < tail) {
      const int u = queue[U(head++)];
      const int du = dist[U(u)];
      if (2 * du >= best) break;
      for (int k = adj_start[U(u)]; k < adj_start[U(u) + 1]; ++k) {
        const int w = adj[U(k)];
        if (w == parent[U(u)]) continue;
        if (dist[U(w)] < 0) {
          dist[U(w)] = du + 1;
          parent[U(w)] = u;
          queue[U(tail++)] = w;
        } else {
          best = std::min(best, du + dist[U(w)] + 1);
        }
      }
    }
    for (int i = 0; i < tail; ++i) dist[U(queue[U(i)])] = -1;
  }
  return best == INT_MAX ? kNoCycle : best;
}

DegreeProfile ComputeDegreeProfile(const LdpcCode& code) {
  DegreeProfile p;
  int max_v = 0, max_c = 0;
  for (int v = 0; v < code.length(); ++v) max_v = std::max(max_v, code.col_degree(v));
  for (int r = 0; r < code.checks(); ++r) max_c = std::max(max_c, code.row_degree(r));
  p.variable_nodes_by_degree.assign(U(max_v) + 1, 0);
  p.check_nodes_by_degree.assign(U(max_c) + 1, 0);
  for (int v = 0; v < code.length(); ++v) ++p.variable_nodes_by_degree[U(code.col_degree(v))];
  for (int r = 0; r < code.checks(); ++r) ++p.check_nodes_by_degree[U(code.row_degree(r))];
  const double edges = code.edges();
  p.lambda.assign(p.variable_nodes_by_degree.size(), 0.0);
  p.rho.assign(p.check_nodes_by_degree.size(), 0.0);
  if (edges > 0) {
    for (std::size_t d = 0; d < p.lambda.size(); ++d) {
      p.lambda[d] = static_cast<double>(d) * p.variable_nodes_by_degree[d] / edges;
    }
    for (std::size_t d = 0; d < p.rho.size(); ++d) {
      p.rho[d] = static_cast<double>(d) * p.check_nodes_by_degree[d] / edges;
    }
  }
  return p;
}

std::string DegreeProfile::ToString() const {
  return "variables " + JoinCounts(variable_nodes_by_degree) + "; checks " +
         JoinCounts(check_nodes_by_degree);
}

// ----- Variable degree spec --------------------------------------------------

std::string VariableDegrees::ToString() const {
  if (degrees.size() == 1 && fractions.size() == 1 && fractions[0] == 1.0) {
    return std::to_string(degrees[0]);
  }
  std::string s;
  for (std::size_t i = 0; i < degrees.size(); ++i) {
    if (i > 0) s += ',';
    s += std::to_string(degrees[i]) + ":" + ShortestDouble(fractions[i]);
  }
  return s;
}

Result<VariableDegrees> ParseVariableDegrees(std::string_view text) {
  const std::string ctx = "degrees " + Quoted(text) + ": ";
  const std::string_view all = TrimBlanks(text);
  if (all.empty()) {
    return Status::Error(ctx +
                         "empty; expected a degree such as '3' or degree:fraction words "
                         "such as '2:0.5,3:0.3,8:0.2'");
  }
  std::vector<std::string_view> words;
  for (std::size_t pos = 0;;) {
    const std::size_t comma = all.find(',', pos);
    words.push_back(TrimBlanks(
        all.substr(pos, comma == std::string_view::npos ? std::string_view::npos : comma - pos)));
    if (comma == std::string_view::npos) break;
    pos = comma + 1;
  }
  auto parse_degree = [&](std::string_view word, std::string_view dtext, int* d) -> Status {
    if (!ParseLdpcInt(dtext, d)) {
      return Status::Error(ctx + "word " + Quoted(word) + ": degree " + Quoted(dtext) +
                           " is not an integer");
    }
    if (*d < 2) {
      return Status::Error(ctx + "word " + Quoted(word) + ": degree " + std::to_string(*d) +
                           " must be >= 2");
    }
    return Status::Ok();
  };
  VariableDegrees out;
  if (words.size() == 1 && words[0].find(':') == std::string_view::npos) {
    int d = 0;
    Status s = parse_degree(words[0], words[0], &d);
    if (!s.ok()) return s;
    out.degrees = {d};
    out.fractions = {1.0};
    return out;
  }
  std::vector<std::pair<int, double>> pairs;
  double sum = 0.0;
  for (const std::string_view w : words) {
    const std::size_t colon = w.find(':');
    if (colon == std::string_view::npos) {
      return Status::Error(ctx + "word " + Quoted(w) +
                           ": expected degree:fraction (only a lone degree may omit the fraction)");
    }
    const std::string_view dtext = TrimBlanks(w.substr(0, colon));
    const std::string_view ftext = TrimBlanks(w.substr(colon + 1));
    int d = 0;
    Status s = parse_degree(w, dtext, &d);
    if (!s.ok()) return s;
    double f = 0.0;
    const auto [ptr, ec] = std::from_chars(ftext.data(), ftext.data() + ftext.size(), f);
    if (ftext.empty() || ec != std::errc() || ptr != ftext.data() + ftext.size() ||
        !std::isfinite(f)) {
      return Status::Error(ctx + "word " + Quoted(w) + ": fraction " + Quoted(ftext) +
                           " is not a number");
    }
    if (!(f > 0.0 && f <= 1.0)) {
      return Status::Error(ctx + "word " + Quoted(w) + ": fraction " + std::string(ftext) +
                           " must be in (0, 1]");
    }
    for (const auto& p : pairs) {
      if (p.first == d) {
        return Status::Error(ctx + "word " + Quoted(w) + ": degree " + std::to_string(d) +
                             " listed twice");
      }
    }
    pairs.emplace_back(d, f);
    sum += f;
  }
  if (std::fabs(sum - 1.0) > 1e-6) {
    return Status::Error(ctx + "fractions sum to " + ShortestDouble(sum) +
                         ": must sum to 1 (within 1e-6)");
  }
  std::sort(pairs.begin(), pairs.end());
  for (const auto& p : pairs) {
    out.degrees.push_back(p.first);
    out.fractions.push_back(p.second);
  }
  return out;
}

std::vector<int> VariableDegreeCounts(const VariableDegrees& degrees, int n) {
  const std::size_t k = degrees.degrees.size();
  std::vector<int> counts(k, 0);
  std::vector<double> remainder(k, 0.0);
  long long total = 0;
  for (std::size_t i = 0; i < k; ++i) {
    const double x = degrees.fractions[i] * n;
    const double fl = std::floor(x);
    counts[i] = static_cast<int>(fl);
    remainder[i] = x - fl;
    total += counts[i];
  }
  std::vector<std::size_t> order(k);
  std::iota(order.begin(), order.end(), std::size_t{0});
  // Largest remainder first; stable, so ties go to the lower degree.
  std::stable_sort(order.begin(), order.end(),
                   [&](std::size_t a, std::size_t b) { return remainder[a] > remainder[b]; });
  long long left = n - total;
  for (std::size_t j = 0; left > 0 && k > 0; j = (j + 1) % k, --left) ++counts[order[j]];
  // Only if the fractions sum slightly above 1 (within the 1e-6 tolerance):
  // take back from the smallest remainders.
  for (std::size_t j = k; left < 0 && k > 0;) {
    j = (j == 0 ? k : j) - 1;
    if (counts[order[j]] > 0) {
      --counts[order[j]];
      ++left;
    }
  }
  return counts;
}

// ----- Progressive edge growth -----------------------------------------------

int ChecksForRate(int length, double rate) {
  return static_cast<int>(std::lround(static_cast<double>(length) * (1.0 - rate)));
}

Result<LdpcCode> BuildPegCode(const PegSpec& spec) {
  const int n = spec.length;
  const int m = spec.checks;
  if (n < 1) return Status::Error("peg: length n = " + std::to_string(n) + ": must be >= 1");
  if (m < 1) return Status::Error("peg: checks m = " + std::to_string(m) + ": must be >= 1");
  if (spec.degrees.degrees.empty() ||
      spec.degrees.degrees.size() != spec.degrees.fractions.size()) {
    return Status::Error("peg: degrees: empty or malformed distribution");
  }
  // Re-validate through the parser's rules (a hand-made spec may skip them).
  {
    Result<VariableDegrees> check = ParseVariableDegrees(spec.degrees.ToString());
    if (!check.ok()) return Status::Error("peg: " + check.status().message());
  }
  for (const int d : spec.degrees.degrees) {
    if (d > m) {
      return Status::Error("peg: degree " + std::to_string(d) +
                           " exceeds the number of checks m = " + std::to_string(m));
    }
  }
  const std::vector<int> counts = VariableDegreeCounts(spec.degrees, n);
  // Placement order = variable index order = increasing degree.
  std::vector<int> var_degree;
  var_degree.reserve(U(n));
  for (std::size_t i = 0; i < counts.size(); ++i) {
    var_degree.insert(var_degree.end(), U(counts[i]), spec.degrees.degrees[i]);
  }
  std::vector<std::vector<int>> var_checks(U(n)), check_vars(U(m));
  for (int v = 0; v < n; ++v) var_checks[U(v)].reserve(U(var_degree[U(v)]));
  std::vector<int> check_mark(U(m), -1), var_mark(U(n), -1);
  // BFS order of the reached checks, level by level: level l is
  // order[level_start[l] .. level_start[l+1]-1]; level 0 = v's own checks.
  std::vector<int> order, level_start, ties;
  order.reserve(U(m));
  ties.reserve(U(m));
  SplitMix64Generator rng(spec.seed);
  int stamp = 0;
  int best = INT_MAX;
  auto consider = [&](int c) {
    const int deg = static_cast<int>(check_vars[U(c)].size());
    if (deg < best) {
      best = deg;
      ties.clear();
    }
    if (deg == best) ties.push_back(c);
  };

  for (int v = 0; v < n; ++v) {
    // One variable costs O(m) (its breadth-first searches): milliseconds at
    // most, so the flag is seen well within a second.
    if (spec.stop && spec.stop->load(std::memory_order_relaxed)) {
      return Status::Stopped("peg: stopped after placing " + std::to_string(v) + " of " +
                             std::to_string(n) + " variables");
    }
    for (int k = 0; k < var_degree[U(v)]; ++k) {
      best = INT_MAX;
      ties.clear();
      if (k == 0) {
        for (int c = 0; c < m; ++c) consider(c);
      } else {
        ++stamp;
        var_mark[U(v)] = stamp;
        order.clear();
        level_start.assign(1, 0);
        for (const int c : var_checks[U(v)]) {
          check_mark[U(c)] = stamp;
          order.push_back(c);
        }
        level_start.push_back(static_cast<int>(order.size()));
        // Expand until the reached set stops growing or covers all checks.
        for (;;) {
          const int lb = level_start[level_start.size() - 2];
          const int le = level_start.back();
          for (int i = lb; i < le; ++i) {
            for (const int u : check_vars[U(order[U(i)])]) {
              if (var_mark[U(u)] == stamp) continue;
              var_mark[U(u)] = stamp;
              for (const int c2 : var_checks[U(u)]) {
                if (check_mark[U(c2)] == stamp) continue;
                check_mark[U(c2)] = stamp;
                order.push_back(c2);
              }
            }
          }
          if (static_cast<int>(order.size()) == le) break;  // stopped growing
          level_start.push_back(static_cast<int>(order.size()));
          if (static_cast<int>(order.size()) == m) break;  // all reached
        }
        if (static_cast<int>(order.size()) < m) {
          // Candidates: the unreached checks.
          for (int c = 0; c < m; ++c) {
            if (check_mark[U(c)] != stamp) consider(c);
          }
        } else {
          // Candidates: the checks first reached on the last level.
          const std::size_t last = level_start.size() - 2;
          for (int i = level_start[last]; i < level_start[last + 1]; ++i) consider(order[U(i)]);
        }
      }
      const int chosen = ties[U(rng.Below(static_cast<int>(ties.size())))];
      var_checks[U(v)].push_back(chosen);
      check_vars[U(chosen)].push_back(v);
    }
  }
  if (spec.balance_check_degrees) {
    Result<LdpcCode> grown = LdpcCode::FromRows(n, check_vars);
    if (!grown.ok()) return Status::Error("peg: " + grown.status().message());
    if (!BalanceCheckDegrees(Girth(grown.value()), var_checks, check_vars, spec.stop)) {
      return Status::Stopped("peg: stopped while balancing the check degrees");
    }
  }
  for (int c = 0; c < m; ++c) {
    if (check_vars[U(c)].size() < 2) {
      return Status::Error("peg: check " + std::to_string(c) + " ends with degree " +
                           std::to_string(check_vars[U(c)].size()) +
                           " < 2: too few edges for m = " + std::to_string(m) + " checks");
    }
  }
  Result<LdpcCode> code = LdpcCode::FromRows(n, check_vars);
  if (!code.ok()) return Status::Error("peg: " + code.status().message());
  code.value().set_description("peg n=" + std::to_string(n) + " m=" + std::to_string(m) +
                               " degrees=" + spec.degrees.ToString() +
                               " seed=" + std::to_string(spec.seed) +
                               (spec.balance_check_degrees ? "" : " nobalance"));
  return code;
}

// ----- Quasi-cyclic codes ----------------------------------------------------

Result<BaseMatrix> ParseBaseMatrix(std::string_view text, std::string_view source_name) {
  const std::string src(source_name);
  auto where = [&](int line) { return src + ":" + std::to_string(line) + ": "; };
  const std::vector<LdpcTextLine> lines = SplitLdpcTextLines(text);
  if (lines.empty()) return Status::Error(src + ": no 'rows <R> cols <C> lifting <Z>' header line");
  const LdpcTextLine& head = lines[0];
  const auto& hw = head.words;
  if (hw.size() != 6 || hw[0] != "rows" || hw[2] != "cols" || hw[4] != "lifting") {
    return Status::Error(where(head.number) + "header " + Quoted(head.content) +
                         ": expected 'rows <R> cols <C> lifting <Z>'");
  }
  BaseMatrix base;
  base.source_name = src;
  if (!ParseLdpcInt(hw[1], &base.rows) || base.rows < 1) {
    return Status::Error(where(head.number) + "rows " + Quoted(hw[1]) +
                         ": must be an integer >= 1");
  }
  if (!ParseLdpcInt(hw[3], &base.cols) || base.cols <= base.rows) {
    return Status::Error(where(head.number) + "cols " + Quoted(hw[3]) +
                         ": must be an integer > rows = " + std::to_string(base.rows));
  }
  if (!ParseLdpcInt(hw[5], &base.design_lifting) || base.design_lifting < 1) {
    return Status::Error(where(head.number) + "lifting " + Quoted(hw[5]) +
                         ": must be an integer >= 1");
  }
  const int z = base.design_lifting;
  // Reserved only when the text holds that many entries: the header alone
  // sizes nothing (a short file stops at its first bad or missing row).
  std::size_t entries = 0;
  for (std::size_t i = 1; i < lines.size(); ++i) entries += lines[i].words.size();
  if (U(base.rows) * U(base.cols) <= entries) base.shifts.reserve(U(base.rows) * U(base.cols));
  std::size_t next = 1;
  for (int r = 0; r < base.rows; ++r, ++next) {
    if (next >= lines.size()) {
      return Status::Error(src + ": ends after " + std::to_string(r) + " of " +
                           std::to_string(base.rows) + " base rows");
    }
    const LdpcTextLine& line = lines[next];
    if (line.words.size() != U(base.cols)) {
      return Status::Error(where(line.number) + "base row " + std::to_string(r) + " has " +
                           std::to_string(line.words.size()) +
                           " entries: expected cols = " + std::to_string(base.cols));
    }
    for (const std::string_view w : line.words) {
      int s = 0;
      if (!ParseLdpcInt(w, &s)) {
        return Status::Error(where(line.number) + "entry " + Quoted(w) + ": not an integer");
      }
      if (s < -1 || s >= z) {
        return Status::Error(where(line.number) + "entry " + Quoted(w) +
                             ": shift must be -1 or in [0, " + std::to_string(z) + ")");
      }
      base.shifts.push_back(s);
    }
  }
  if (next < lines.size()) {
    return Status::Error(where(lines[next].number) + "text " + Quoted(lines[next].content) +
                         " after the " + std::to_string(base.rows) + " base rows");
  }
  return base;
}

Result<BaseMatrix> ReadBaseMatrixFile(const std::string& path) {
  Result<std::string> text = ReadLdpcTextFile(path, kMaxBaseMatrixFileBytes, "base matrix file");
  if (!text.ok()) return text.status();
  return ParseBaseMatrix(text.value(), path);
}

std::string WriteBaseMatrix(const BaseMatrix& base, std::string_view comment) {
  std::string out;
  std::size_t pos = 0;
  while (!comment.empty() && pos <= comment.size()) {
    std::size_t end = comment.find('\n', pos);
    if (end == std::string_view::npos) end = comment.size();
    const std::string_view line = comment.substr(pos, end - pos);
    out += line.empty() ? "#" : "# " + std::string(line);
    out += '\n';
    if (end == comment.size()) break;
    pos = end + 1;
  }
  out += "rows " + std::to_string(base.rows) + " cols " + std::to_string(base.cols) + " lifting " +
         std::to_string(base.design_lifting) + "\n";
  for (int r = 0; r < base.rows; ++r) {
    for (int c = 0; c < base.cols; ++c) {
      const std::string s = std::to_string(base.shift(r, c));
      // Right-aligned in width 3 (shifts up to 999 line up), one space apart.
      if (c > 0) out += ' ';
      if (s.size() < 3) out.append(3 - s.size(), ' ');
      out += s;
    }
    out += '\n';
  }
  return out;
}

Result<LdpcCode> LiftBaseMatrix(const BaseMatrix& base, int lifting) {
  const std::string src = base.source_name.empty() ? "base matrix" : base.source_name;
  if (lifting < 1) {
    return Status::Error(src + ": lifting " + std::to_string(lifting) + ": must be >= 1");
  }
  if (base.rows < 1 || base.cols < 1 || base.shifts.size() != U(base.rows) * U(base.cols)) {
    return Status::Error(src + ": malformed base matrix");
  }
  for (int c = 0; c < base.cols; ++c) {
    bool any = false;
    for (int r = 0; r < base.rows; ++r) any = any || base.shift(r, c) >= 0;
    if (!any) {
      return Status::Error(src + ": base column " + std::to_string(c) + " has no nonzero block");
    }
  }
  const int z = lifting;
  {
    // The lifted sizes must fit LdpcCode's int indices (checked in 64 bits
    // before anything is allocated).
    std::int64_t nonzero = 0;
    for (const int s : base.shifts) nonzero += s >= 0 ? 1 : 0;
    const std::int64_t limit = INT_MAX;
    const std::int64_t zz = z;
    const struct {
      const char* what;
      std::int64_t value;
    } sizes[] = {{"n = cols x lifting", std::int64_t{base.cols} * zz},
                 {"m = rows x lifting", std::int64_t{base.rows} * zz},
                 {"edges = nonzero entries x lifting", nonzero * zz}};
    for (const auto& size : sizes) {
      if (size.value > limit) {
        return Status::Error(src + ": lifting " + std::to_string(z) + ": " + size.what + " = " +
                             std::to_string(size.value) + ": must be at most " +
                             std::to_string(limit));
      }
    }
  }
  std::vector<std::vector<int>> rows(U(base.rows) * U(z));
  for (int r = 0; r < base.rows; ++r) {
    for (int c = 0; c < base.cols; ++c) {
      const int s = base.shift(r, c);
      if (s < 0) continue;
      const int sm = s % z;
      for (int i = 0; i < z; ++i) {
        rows[U(r) * U(z) + U(i)].push_back(c * z + (i + sm) % z);
      }
    }
  }
  Result<LdpcCode> code = LdpcCode::FromRows(base.cols * z, rows, z);
  if (!code.ok()) return Status::Error(src + ": " + code.status().message());
  code.value().set_description("qc " + src + " lifting " + std::to_string(z));
  return code;
}

std::optional<DualDiagonalStructure> FindDualDiagonal(const BaseMatrix& base) {
  const int rr = base.rows;
  const int kb = base.cols - base.rows;
  if (rr < 3 || kb < 1) return std::nullopt;
  DualDiagonalStructure s;
  s.info_block_cols = kb;
  // Column kb: rows 0 and R-1 with one shift a, exactly one middle row x.
  const int a = base.shift(0, kb);
  if (a < 0 || base.shift(rr - 1, kb) != a) return std::nullopt;
  int middle = -1;
  for (int r = 1; r < rr - 1; ++r) {
    if (base.shift(r, kb) >= 0) {
      if (middle >= 0) return std::nullopt;
      middle = r;
    }
  }
  if (middle < 0) return std::nullopt;
  s.shift_a = a;
  s.shift_b = base.shift(middle, kb);
  s.middle_row = middle;
  for (int j = 1; j < rr; ++j) {
    for (int r = 0; r < rr; ++r) {
      const int want = (r == j - 1 || r == j) ? 0 : -1;
      if (base.shift(r, kb + j) != want) return std::nullopt;
    }
  }
  return s;
}

std::optional<BaseMatrix> RecoverBaseMatrix(const LdpcCode& code) {
  const int z = code.lifting();
  if (z < 1 || code.length() % z != 0 || code.checks() % z != 0) return std::nullopt;
  BaseMatrix base;
  base.rows = code.checks() / z;
  base.cols = code.length() / z;
  base.design_lifting = z;
  base.shifts.assign(U(base.rows) * U(base.cols), -1);
  base.source_name = code.description();
  const auto row_start = code.row_start();
  const auto var = code.edge_variable();
  for (int br = 0; br < base.rows; ++br) {
    int row0_count = 0;
    for (int i = 0; i < z; ++i) {
      const int r = br * z + i;
      const int b = row_start[U(r)];
      const int e = row_start[U(r) + 1];
      if (i > 0 && e - b != row0_count) return std::nullopt;
      for (int k = b; k < e; ++k) {
        const int v = var[U(k)];
        const int bc = v / z;
        const int shift = ((v % z) - i + z) % z;
        int& slot = base.shifts[U(br) * U(base.cols) + U(bc)];
        if (i == 0) {
          if (slot >= 0) return std::nullopt;  // two ones of one block in a row
          slot = shift;
        } else if (slot != shift) {
          return std::nullopt;
        }
      }
      if (i == 0) row0_count = e - b;
    }
  }
  return base;
}

// ----- Design search ---------------------------------------------------------

Result<BaseMatrix> DesignDualDiagonalBaseMatrix(const DualDiagonalDesign& design) {
  const int rr = design.rows;
  const int kb = static_cast<int>(design.info_column_weights.size());
  const int cc = kb + rr;
  const int z = design.lifting;
  const std::string ctx = "qc design: ";
  if (rr < 3) return Status::Error(ctx + "rows " + std::to_string(rr) + ": must be >= 3");
  if (kb < 1) return Status::Error(ctx + "no information columns");
  if (z < 1) return Status::Error(ctx + "lifting " + std::to_string(z) + ": must be >= 1");
  if (design.middle_row < 1 || design.middle_row > rr - 2) {
    return Status::Error(ctx + "middle_row " + std::to_string(design.middle_row) +
                         ": must be in [1, rows - 2]");
  }
  if (design.target_girth != 6 && design.target_girth != 8) {
    return Status::Error(ctx + "target_girth " + std::to_string(design.target_girth) +
                         ": must be 6 or 8");
  }
  for (const int w : design.info_column_weights) {
    if (w < 2 || w > rr) {
      return Status::Error(ctx + "information column weight " + std::to_string(w) +
                           ": must be in [2, rows]");
    }
  }
  if (design.shift_a < 0 || design.shift_b < 0) {
    return Status::Error(ctx + "parity shifts must be >= 0");
  }
  SplitMix64Generator rng(design.seed);
  std::vector<int> a(U(rr) * U(cc), -1);  // assigned shifts, -1 = none (yet)
  auto at = [&](int r, int c) -> int& { return a[U(r) * U(cc) + U(c)]; };
  std::vector<std::uint8_t> forbidden(U(z));
  auto mod = [z](long long x) { return static_cast<int>(((x % z) + z) % z); };

  // Marks in `forbidden` every shift of entry (r0, c0) that would close a
  // lifted cycle of length 4 (and 6 when the target is 8) with the assigned
  // entries. A cycle through (r0, c0) leaves column c0 through another
  // assigned entry (r1, c0); along the path r0 -> c1 -> (r2 -> c2 ->) r1 the
  // alternating sum of the other shifts must not cancel s0 - A(r1, c0).
  auto mark_forbidden = [&](int r0, int c0) {
    std::fill(forbidden.begin(), forbidden.end(), std::uint8_t{0});
    for (int r1 = 0; r1 < rr; ++r1) {
      if (r1 == r0 || at(r1, c0) < 0) continue;
      const long long s_r1c0 = at(r1, c0);
      for (int c1 = 0; c1 < cc; ++c1) {
        if (c1 == c0 || at(r0, c1) < 0) continue;
        const long long s_r0c1 = at(r0, c1);
        // 4-cycle: s0 - A(r0,c1) + A(r1,c1) - A(r1,c0) = 0.
        if (at(r1, c1) >= 0) forbidden[U(mod(s_r0c1 - at(r1, c1) + s_r1c0))] = 1;
        if (design.target_girth < 8) continue;
        // 6-cycle: s0 - A(r0,c1) + A(r2,c1) - A(r2,c2) + A(r1,c2) - A(r1,c0) = 0.
        for (int r2 = 0; r2 < rr; ++r2) {
          if (r2 == r0 || r2 == r1 || at(r2, c1) < 0) continue;
          for (int c2 = 0; c2 < cc; ++c2) {
            if (c2 == c0 || c2 == c1 || at(r2, c2) < 0 || at(r1, c2) < 0) continue;
            forbidden[U(mod(s_r0c1 - at(r2, c1) + at(r2, c2) - at(r1, c2) + s_r1c0))] = 1;
          }
        }
      }
    }
  };

  // Parity part: fixed, but entered one entry at a time through the same
  // check so that a short cycle inside it is reported.
  struct Entry {
    int r, c, s;
  };
  std::vector<Entry> parity = {{0, kb, design.shift_a},
                               {design.middle_row, kb, design.shift_b},
                               {rr - 1, kb, design.shift_a}};
  for (int j = 1; j < rr; ++j) {
    parity.push_back({j - 1, kb + j, 0});
    parity.push_back({j, kb + j, 0});
  }
  for (const Entry& e : parity) {
    mark_forbidden(e.r, e.c);
    if (forbidden[U(mod(e.s))]) {
      return Status::Error(ctx + "the dual-diagonal parity part alone has a cycle shorter than " +
                           std::to_string(design.target_girth) + " at lifting " +
                           std::to_string(z));
    }
    at(e.r, e.c) = mod(e.s);
  }
  const std::vector<int> parity_part = a;

  std::vector<int> col_order(U(kb));
  std::iota(col_order.begin(), col_order.end(), 0);
  std::stable_sort(col_order.begin(), col_order.end(), [&](int x, int y) {
    return design.info_column_weights[U(x)] > design.info_column_weights[U(y)];
  });
  std::vector<int> row_order(U(rr)), row_count(U(rr)), shift_order(U(z));
  for (int attempt = 0; attempt <= design.max_restarts; ++attempt) {
    a = parity_part;
    // Row weights so far, parity entries included, so that the full rows
    // come out as even as possible.
    for (int r = 0; r < rr; ++r) {
      row_count[U(r)] = 0;
      for (int c = kb; c < cc; ++c) row_count[U(r)] += at(r, c) >= 0 ? 1 : 0;
    }
    bool ok = true;
    for (const int c : col_order) {
      // Rows: the fewest entries so far, ties in seeded order.
      std::iota(row_order.begin(), row_order.end(), 0);
      for (int i = rr - 1; i > 0; --i) std::swap(row_order[U(i)], row_order[U(rng.Below(i + 1))]);
      std::stable_sort(row_order.begin(), row_order.end(),
                       [&](int x, int y) { return row_count[U(x)] < row_count[U(y)]; });
      const int w = design.info_column_weights[U(c)];
      std::vector<int> rows_of_c(row_order.begin(), row_order.begin() + w);
      std::sort(rows_of_c.begin(), rows_of_c.end());
      for (const int r : rows_of_c) {
        ++row_count[U(r)];
        mark_forbidden(r, c);
        std::iota(shift_order.begin(), shift_order.end(), 0);
        for (int i = z - 1; i > 0; --i) {
          std::swap(shift_order[U(i)], shift_order[U(rng.Below(i + 1))]);
        }
        int chosen = -1;
        for (const int s : shift_order) {
          if (!forbidden[U(s)]) {
            chosen = s;
            break;
          }
        }
        if (chosen < 0) {
          ok = false;
          break;
        }
        at(r, c) = chosen;
      }
      if (!ok) break;
    }
    if (!ok) continue;
    BaseMatrix base;
    base.rows = rr;
    base.cols = cc;
    base.design_lifting = z;
    base.shifts = a;
    std::string weights;
    for (const int w : design.info_column_weights) {
      weights += (weights.empty() ? "" : ",") + std::to_string(w);
    }
    base.source_name =
        "dual-diagonal design rows=" + std::to_string(rr) + " info_weights=" + weights +
        " lifting=" + std::to_string(z) + " a=" + std::to_string(design.shift_a) +
        " b=" + std::to_string(design.shift_b) + " x=" + std::to_string(design.middle_row) +
        " girth>=" + std::to_string(design.target_girth) + " seed=" + std::to_string(design.seed) +
        " restarts=" + std::to_string(attempt);
    return base;
  }
  return Status::Error(ctx + "no shifts found for girth " + std::to_string(design.target_girth) +
                       " at lifting " + std::to_string(z) + " after " +
                       std::to_string(design.max_restarts) + " restarts");
}

}  // namespace capgap
