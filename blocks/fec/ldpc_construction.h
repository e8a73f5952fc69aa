// Constructions and structural analysis of binary LDPC codes (LdpcCode):
// girth and degree profile of a Tanner graph, the node-perspective variable
// degree spec of the `degrees` config key, progressive edge growth (PEG),
// quasi-cyclic (QC) codes lifted from a base (exponent) matrix, and the
// seeded shift search that designed configs/codes/qc_r1-2_24x12.txt.
//
// Tanner graph: variable v and check r are joined iff H[r][v] = 1. A cycle
// alternates between variables and checks, so its length is even and >= 4.
//
// Degree profile (edge perspective, common practice; T. Richardson and
// R. Urbanke, *Modern Coding Theory*, 2008): lambda(x) = sum_d lambda_d
// x^(d-1), lambda_d = fraction of edges attached to variables of degree d;
// rho(x) likewise for checks. Stored indexed by degree d (lambda[d]).
//
// PEG: X.-Y. Hu, E. Eleftheriou, D. M. Arnold, "Regular and irregular
// progressive edge-growth Tanner graphs", IEEE Trans. Inf. Theory 51(1),
// 2005. Variables are placed in order of increasing degree (variable index
// order = placement order). The first edge of a variable goes to a check of
// lowest current degree. Each further edge: expand the subgraph from the
// variable breadth-first, level by level, until either the set of reached
// checks stops growing while some checks are still unreached (candidates: the
// unreached checks) or the next level reaches every check (candidates: the
// checks first reached on that last level, i.e. those at maximum distance).
// Among the candidates the one of lowest current degree is taken; ties are
// broken uniformly by a SplitMix64 generator (blocks/core/hash.h) seeded with
// PegSpec::seed (a
// local generator: same spec, same code on every machine).
// Degree balancing (capgap's addition, PegSpec::balance_check_degrees, on
// by default): the paper's rule alone leaves check degrees spread by a few
// (e.g. four checks of degree 5 and four of 7 next to 1000 of degree 6 for
// n = 2016, degree 3, m = 1008, seed 1; 24, 22 and one of degree 8 for
// n = 1008). After the growth, a pass moves single
// edges (u, c_max) -> (u, c_min) from a check of maximum degree to one of
// minimum degree while those differ by >= 2, taking only moves that close no
// cycle shorter than the grown graph's girth (a BFS from u). So the girth
// of PEG is kept, and the check degrees end within 1 of each other unless
// no such move is left (then as close as those moves allow).
//
// Counts from fractions (VariableDegreeCounts): node counts are
// floor(fraction * n), and the n - sum(floor) remaining nodes go one each to
// the degrees with the largest remainders fraction * n - floor (ties to the
// lower degree; "largest remainder" rounding, common practice). So each count
// is within 1 of fraction * n and the counts sum to n exactly.
//
// ---------------------------------------------------------------------------
// Base matrix file format (capgap's own; every file in configs/codes/ that
// holds a base matrix repeats this description in its header comment):
//   * '#' starts a comment that runs to the end of the line; blank lines and
//     comment-only lines are ignored; words are separated by spaces or tabs.
//   * The first non-comment line is the header, exactly
//         rows <R> cols <C> lifting <Z>
//     with R >= 1, C > R (so the rate is positive), Z >= 1 the design
//     lifting size the shifts were chosen for.
//   * Then exactly R lines (base rows, top to bottom) of exactly C integers
//     (base columns, left to right). Entry -1 is a Z x Z zero block; an entry
//     s in [0, Z) is the Z x Z identity cyclically shifted by s: row i of the
//     block (0 <= i < Z) has its single one in column (i + s) mod Z of the
//     block. So block (r, c) joins check r*Z + i to variable
//     c*Z + ((i + s) mod Z), i = 0 .. Z-1.
//   * Nothing else may follow the R rows.
// Lifting with another size Z' (LiftBaseMatrix(base, Z')): each shift s is
// used as s mod Z' (the shifts' girth design holds only for the design Z).
// The lifted code has n = C*Z', m = R*Z' and lifting() = Z'.
// ---------------------------------------------------------------------------
//
// Dual-diagonal parity part (DualDiagonalStructure, the structure the linear
// time encoder of blocks/fec/ldpc_encoder.h exploits; T. Richardson and
// R. Urbanke, "Efficient encoding of low-density parity-check codes", IEEE
// Trans. Inf. Theory 47(2), 2001, give the general approach): with R base rows
// and K = C - R information block columns, base column K has exactly three
// nonzero entries, at rows 0 and R-1 with one shift a and at one row x
// (0 < x < R-1) with shift b; base column K + j (j = 1..R-1) has exactly
// two entries, both shift 0, at rows j-1 and j (a staircase of identities).
#ifndef CAPGAP_BLOCKS_FEC_LDPC_CONSTRUCTION_H_
#define CAPGAP_BLOCKS_FEC_LDPC_CONSTRUCTION_H_

#include <atomic>
#include <cstdint>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "blocks/core/status.h"
#include "blocks/fec/ldpc_code.h"

namespace capgap {

// How a scheme's parity-check matrix is made: progressive edge growth, a
// quasi-cyclic lifting of a base matrix, or read from a matrix file. Words
// peg, qc, file; an error message lists them.
enum class LdpcConstructionKind { kPeg, kQc, kFile };
Result<LdpcConstructionKind> ParseLdpcConstructionKind(std::string_view word);
std::string ToString(LdpcConstructionKind kind);

// ----- Analysis --------------------------------------------------------------

// Girth returned for a Tanner graph without any cycle (a forest).
inline constexpr int kNoCycle = 0;

// Length of the shortest cycle of the Tanner graph (even, >= 4), or kNoCycle.
// Breadth-first search from every variable node, each cut off at half the
// best length so far: O(n * nodes within that depth).
int Girth(const LdpcCode& code);

struct DegreeProfile {
  // [d] = number of variable (check) nodes of degree d; size max degree + 1.
  std::vector<int> variable_nodes_by_degree;
  std::vector<int> check_nodes_by_degree;
  // Edge perspective: lambda[d] = fraction of edges at degree-d variables
  // (the coefficient of x^(d-1) in lambda(x)); rho[d] likewise for checks.
  // Same sizes as the node counts; each sums to 1.
  std::vector<double> lambda;
  std::vector<double> rho;
  // "variables 3:2016; checks 6:1008" (degree:count, increasing degree,
  // zero counts left out; several degrees separated by ',').
  std::string ToString() const;
};
DegreeProfile ComputeDegreeProfile(const LdpcCode& code);

// ----- Variable degree spec (config key `degrees`) ---------------------------

// Node-perspective variable degree distribution. Text form: either a lone
// degree, "3" (every variable has degree 3), or comma-separated
// degree:fraction words, "2:0.5,3:0.3,8:0.2": fraction of the variable
// NODES with that degree. Rules: degrees are integers >= 2, each listed once;
// fractions are numbers in (0, 1] summing to 1 within 1e-6. Spaces around
// words are ignored. Errors name the offending word and the rule, e.g.
//   "degrees '1:0.5,3:0.5': word '1:0.5': degree 1 must be >= 2".
struct VariableDegrees {
  std::vector<int> degrees;       // increasing
  std::vector<double> fractions;  // same size, sum 1
  // Canonical text: "3" for a single degree, else "2:0.5,3:0.3,8:0.2".
  std::string ToString() const;
};
Result<VariableDegrees> ParseVariableDegrees(std::string_view text);

// Number of variable nodes of each degree (aligned with degrees.degrees) for
// length n, by largest-remainder rounding (see the file comment).
// REQUIRES: n >= 0; degrees valid (as ParseVariableDegrees returns).
std::vector<int> VariableDegreeCounts(const VariableDegrees& degrees, int n);

// ----- Progressive edge growth -----------------------------------------------

struct PegSpec {
  int length = 0;  // n
  int checks = 0;  // m; e.g. ChecksForRate(n, 0.5)
  VariableDegrees degrees;
  std::uint64_t seed = 1;
  // Degree-balancing pass (capgap's addition to the paper, see the file
  // comment); false: the paper's construction exactly.
  bool balance_check_degrees = true;
  // Checked between variables (and between balancing moves): once it reads
  // true, BuildPegCode gives up and returns Status::Stopped. nullptr: never.
  // Construction takes O(n m) time (about 14 s at n = 16384, m = 8192 on one
  // core), so a caller that must react to signals passes one.
  const std::atomic<bool>* stop = nullptr;
};

// m = round(n (1 - rate)) (halves away from zero). REQUIRES 0 < rate < 1.
int ChecksForRate(int length, double rate);

// Builds the PEG code (see the file comment). Errors: n or m not positive,
// empty or invalid degrees, a degree above m, or a check left with degree
// < 2 (too few edges for m checks); Status::Stopped when spec.stop is set. description() is e.g.
// "peg n=2016 m=1008 degrees=3 seed=1" (" nobalance" appended without the
// balancing pass). Reproducible for a given spec.
Result<LdpcCode> BuildPegCode(const PegSpec& spec);

// ----- Quasi-cyclic codes ----------------------------------------------------

struct BaseMatrix {
  int rows = 0;             // R
  int cols = 0;             // C
  int design_lifting = 0;   // Z the shifts were designed for
  std::vector<int> shifts;  // row-major R x C; -1 = zero block
  std::string source_name;  // file name or other origin, for messages
  int shift(int r, int c) const {
    return shifts[static_cast<std::size_t>(r) * static_cast<std::size_t>(cols) +
                  static_cast<std::size_t>(c)];
  }
};

// Parses the base matrix format above. source_name prefixes every error,
// which names the line and the value, e.g.
//   "configs/codes/x.txt:7: entry '90': shift must be -1 or in [0, 84)".
Result<BaseMatrix> ParseBaseMatrix(std::string_view text, std::string_view source_name);
// Largest base-matrix file read: 1 MiB (a base matrix has tens of columns).
inline constexpr std::uint64_t kMaxBaseMatrixFileBytes = std::uint64_t{1} << 20;
// Reads a regular file of at most kMaxBaseMatrixFileBytes (refused without
// reading otherwise, blocks/core/file_read.h) and parses it with
// source_name = path.
Result<BaseMatrix> ReadBaseMatrixFile(const std::string& path);
// The format above, preceded by `comment` (each of its lines prefixed "# ";
// empty comment: none). ParseBaseMatrix(WriteBaseMatrix(b, c)) reproduces b.
std::string WriteBaseMatrix(const BaseMatrix& base, std::string_view comment);

// Expands each entry to a Z x Z block (shift s used as s mod Z). Errors:
// lifting < 1, a base column with no nonzero entry, or n = C Z, m = R Z or
// the edge count (nonzero entries x Z) above 2^31 - 1 (checked before
// anything is allocated; callers bound memory first, e.g. the LDPC family's
// memory_limit_mb). description() is
// "qc <source_name> lifting Z". lifting() of the result is Z.
Result<LdpcCode> LiftBaseMatrix(const BaseMatrix& base, int lifting);

// The dual-diagonal parity structure (see the file comment) of a base matrix.
struct DualDiagonalStructure {
  int info_block_cols = 0;  // K = C - R
  int shift_a = 0;          // shift at rows 0 and R-1 of column K
  int shift_b = 0;          // shift at row middle_row of column K
  int middle_row = 0;       // x
};
// The structure if `base` has it, else nullopt. Needs R >= 3.
std::optional<DualDiagonalStructure> FindDualDiagonal(const BaseMatrix& base);

// Recovers the base matrix of a lifted code (lifting() = Z > 0) whose every
// Z x Z block is zero or one cyclically shifted identity; shifts come out in
// [0, Z) with design_lifting = Z. nullopt if the code is not of that form.
std::optional<BaseMatrix> RecoverBaseMatrix(const LdpcCode& code);

// ----- Design of a dual-diagonal QC base matrix (the seeded shift search) ----

struct DualDiagonalDesign {
  int rows = 12;                         // R
  std::vector<int> info_column_weights;  // one per information column, each in [2, R]
  int lifting = 84;                      // Z
  int shift_a = 1;                       // parity column K, rows 0 and R-1
  int shift_b = 0;                       // parity column K, row middle_row
  int middle_row = 5;
  int target_girth = 8;  // 6 or 8
  std::uint64_t seed = 1;
  int max_restarts = 200;
};

// Places the information part's nonzero entries (columns in decreasing
// weight order, each on the rows with the fewest entries so far, parity
// entries included, ties broken by the seeded generator), then picks the
// shifts column by column, entry by entry, in seeded random order, taking
// the first shift that closes no cycle of length < target_girth in the
// lifted graph. A lifted cycle of length 2L
// corresponds to a closed non-backtracking walk of length 2L in the base
// graph whose alternating shift sum is 0 mod Z (M. P. C. Fossorier,
// "Quasi-cyclic low-density parity-check codes from circulant permutation
// matrices", IEEE Trans. Inf. Theory 50(8), 2004); for 2L = 4 and 6 these
// walks are simple cycles, which are what is checked. When a column has no
// valid shift for some entry the whole search restarts (next generator
// state), at most max_restarts times. The result has the dual-diagonal
// parity part and design_lifting = Z; source_name describes the design.
Result<BaseMatrix> DesignDualDiagonalBaseMatrix(const DualDiagonalDesign& design);

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_FEC_LDPC_CONSTRUCTION_H_
