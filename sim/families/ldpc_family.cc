// Code family `ldpc`: LDPC codes from a PEG construction, a lifted QC base
// matrix or a parity-check matrix file, with their systematic encoder and
// decoder, built into an LdpcChannelCode. frame_bits becomes the code's k.
#include "sim/families/ldpc_family.h"

#include <algorithm>
#include <climits>
#include <cstdint>
#include <filesystem>
#include <memory>
#include <vector>

#include "blocks/fec/ldpc_channel_code.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "analysis/capacity.h"
#include "analysis/density_evolution.h"
#include "sim/chain/scheme_result.h"
#include "sim/config/key_table.h"

namespace capgap {
namespace {

// The keys of code = ldpc.
constexpr std::string_view kConstructionWords[] = {"peg", "qc", "file"};
constexpr std::string_view kPegWord[] = {"peg"};
constexpr std::string_view kQcWord[] = {"qc"};
constexpr std::string_view kFileWord[] = {"file"};
constexpr std::string_view kLdpcDecoderWords[] = {"sum_product", "min_sum_normalized",
                                                  "min_sum_offset"};
constexpr std::string_view kNormalizedWord[] = {"min_sum_normalized"};
constexpr std::string_view kOffsetWord[] = {"min_sum_offset"};
constexpr std::string_view kScheduleWords[] = {"flooding", "layered"};
constexpr std::string_view kArithmeticWords[] = {"auto", "int8", "int16", "float", "float32"};

constexpr KeySpec kLdpcKeys[] = {
    {"construction", "peg", OneOf(kConstructionWords),
     "progressive edge growth, a lifted quasi-cyclic base matrix, or a parity-check matrix file"},
    // PEG and the dense encoder need O(n m) and O(m^2 n / 64) time: n = 32768
    // builds in about 75 s on one core (README, "LDPC code sizes").
    {"length", "2016", IntegerIn(8, 1u << 15), "code length n, a multiple of bits per symbol",
     OnlyWith("construction", kPegWord)},
    {"rate", "0.5", NumberIn(Open(0), Open(1)), "design rate, m = round(n (1 - rate)) checks",
     OnlyWith("construction", kPegWord)},
    {"degrees", "3", Text("D (all nodes) or D:FRACTION,... of nodes, e.g. 2:0.5,3:0.3,8:0.2"),
     "variable-node degree distribution", OnlyWith("construction", kPegWord)},
    {"construction_seed", "1", IntegerAtLeast(0), "seed of the PEG construction",
     OnlyWith("construction", kPegWord)},
    {"base_matrix", nullptr,
     Text("path of a base-matrix file (relative to the config file), e.g. codes/qc_r1-2_24x12.txt",
          "must name a base-matrix file"),
     "base (exponent) matrix", OnlyWith("construction", kQcWord)},
    {"lifting", "0", IntegerIn(0, 65536, "0: the file's own"), "lifting size Z",
     OnlyWith("construction", kQcWord)},
    {"matrix_file", nullptr,
     Text("path of a parity-check matrix file (relative to the config file)",
          "must name a matrix file"),
     "parity-check matrix in capgap's sparse text format", OnlyWith("construction", kFileWord)},
    {"decoder", "min_sum_normalized", OneOf(kLdpcDecoderWords, "valid with code = ldpc"),
     "belief propagation, or min-sum with a factor or an offset"},
    {"schedule", "layered", OneOf(kScheduleWords),
     "all checks then all variables, or check by check"},
    {"max_iterations", "50", IntegerIn(1, 1000),
     "iteration budget (stops early on a zero syndrome)"},
    {"arithmetic", "auto", OneOf(kArithmeticWords),
     "decoder arithmetic (auto: fixed point for min-sum, float for sum-product; float32: "
     "sum-product in float32 across SIMD lanes)"},
    {"memory_limit_mb", "4096", IntegerIn(1, 1u << 24),
     "refuse a code whose estimated memory (H, encoder, decoder x threads) is larger, in MiB",
     Always(), OnResume::kFree},
    {"normalization", "0.75", NumberIn(Open(0), Closed(1)), "normalised min-sum factor",
     OnlyWith("decoder", kNormalizedWord)},
    {"offset", "0.5", NumberIn(Closed(0), Closed(10)), "offset min-sum offset in LLR units",
     OnlyWith("decoder", kOffsetWord)},
};

constexpr std::string_view kLdpcWord[] = {"ldpc"};
constexpr KeyTable kLdpcKeyTable = {"LDPC code", kLdpcKeys, OnlyWith("code", kLdpcWord)};

Status ParseLdpc(const ResolvedKeys& k, const std::string& source, SchemeConfig& s) {
  LdpcSchemeConfig& c = s.ldpc;
  const Modulation& modulation = s.modulation;
  c.config_dir = std::filesystem::path(source).parent_path().string();
  // The key table admitted only its words; each enum has one ParseX.
  auto construction = ParseLdpcConstructionKind(k.text("construction"));
  if (!construction.ok()) return k.Fail("construction", construction.status().message());
  c.construction = construction.value();
  if (c.construction == LdpcConstructionKind::kPeg) {
    if (Status s = CheckMultipleOfBitsPerSymbol(k, "length", modulation); !s.ok()) return s;
    c.length = static_cast<int>(k.integer("length"));
    c.rate = k.number("rate");
    c.degrees = k.text("degrees");
    c.construction_seed = k.integer("construction_seed");
  } else if (c.construction == LdpcConstructionKind::kQc) {
    c.base_matrix = k.text("base_matrix");
    c.lifting = static_cast<int>(k.integer("lifting"));
  } else {
    c.matrix_file = k.text("matrix_file");
  }
  auto decoder = ParseLdpcAlgorithm(k.text("decoder"));
  if (!decoder.ok()) return k.Fail("decoder", decoder.status().message());
  c.decoder = decoder.value();
  auto schedule = ParseLdpcSchedule(k.text("schedule"));
  if (!schedule.ok()) return k.Fail("schedule", schedule.status().message());
  c.schedule = schedule.value();
  c.max_iterations = static_cast<int>(k.integer("max_iterations"));
  auto arithmetic = ParseLdpcArithmetic(k.text("arithmetic"));
  if (!arithmetic.ok()) return k.Fail("arithmetic", arithmetic.status().message());
  c.arithmetic = arithmetic.value();
  if (c.decoder == LdpcAlgorithm::kSumProduct &&
      (c.arithmetic == LdpcArithmetic::kInt8 || c.arithmetic == LdpcArithmetic::kInt16)) {
    return k.Fail("arithmetic", "sum_product runs in float only (valid with it: auto, float)");
  }
  c.memory_limit_mb = k.integer("memory_limit_mb");
  if (k.has("normalization")) c.normalization = k.number("normalization");
  if (k.has("offset")) c.offset = k.number("offset");
  return Status::Ok();
}


std::string Mb(std::uint64_t bytes) { return std::to_string(CeilMegabytes(bytes)) + " MB"; }

// OK when the estimate for (n, m, edges) fits scheme.NAME.memory_limit_mb;
// else the refusal, naming `what` (the keys that fixed the sizes, with their
// values), the estimate and its parts.
Status CheckLdpcMemory(const SchemeConfig& scheme, const std::string& p, const std::string& what,
                       std::int64_t n, std::int64_t m, std::int64_t edges, bool dual_diagonal,
                       const BuildContext& context) {
  SchemeConfig sized = scheme;
  sized.frame_bits = static_cast<std::uint32_t>(std::clamp<std::int64_t>(n - m, 1, INT32_MAX));
  const LdpcMemoryEstimate e = EstimateLdpcMemory(n, m, edges, dual_diagonal,
                                                  sized.ResolvedUnitFrames(), context.threads);
  const std::uint64_t limit = scheme.ldpc.memory_limit_mb;
  if (CeilMegabytes(e.total_bytes()) <= limit) return Status::Ok();
  std::string parts = "code " + Mb(e.code_bytes);
  if (!dual_diagonal) parts += ", encoder elimination matrix " + Mb(e.encoder_bytes);
  parts += ", decoder " + std::to_string(e.threads) + " thread(s) x " + Mb(e.per_thread_bytes);
  const std::string advice =
      dual_diagonal ? "a smaller code"
                    : "a smaller code, a qc construction with a dual-diagonal base matrix "
                      "(linear-time encoder, no dense matrix)";
  return Status::Error(p + what + " (n = " + std::to_string(n) + ", m = " + std::to_string(m) +
                       "): needs an estimated " + Mb(e.total_bytes()) + " (" + parts +
                       "), over " + p + "memory_limit_mb = " + std::to_string(limit) + "; use " +
                       advice + ", fewer threads, or raise memory_limit_mb");
}

Result<std::shared_ptr<const ChannelCode>> BuildLdpc(const SchemeConfig& scheme,
                                                     const std::string& p,
                                                     const BuildContext& context) {
  const LdpcSchemeConfig& c = scheme.ldpc;
  Result<LdpcCode> code = Status::Error("unset");
  bool checked = false;  // the memory estimate was made before construction
  if (c.construction == LdpcConstructionKind::kPeg) {
    auto degrees = ParseVariableDegrees(c.degrees);
    if (!degrees.ok()) {
      return Status::Error(p + "degrees = '" + c.degrees + "': " + degrees.status().message());
    }
    PegSpec spec;
    spec.length = c.length;
    spec.checks = ChecksForRate(c.length, c.rate);
    spec.degrees = degrees.value();
    spec.seed = c.construction_seed;
    spec.stop = context.stop;
    std::int64_t edges = 0;
    const std::vector<int> counts = VariableDegreeCounts(spec.degrees, spec.length);
    for (std::size_t i = 0; i < counts.size(); ++i) {
      edges += std::int64_t{counts[i]} * spec.degrees.degrees[i];
    }
    const std::string what = "length = " + std::to_string(c.length) + " with construction = peg";
    if (Status s = CheckLdpcMemory(scheme, p, what, spec.length, spec.checks, edges, false, context);
        !s.ok()) {
      return s;
    }
    checked = true;
    code = BuildPegCode(spec);
    if (!code.ok()) return code.status().WithPrefix(p + "length/rate/degrees: ");
  } else if (c.construction == LdpcConstructionKind::kQc) {
    auto base = ReadBaseMatrixFile(c.ResolvePath(c.base_matrix));
    if (!base.ok()) return Status::Error(p + "base_matrix: " + base.status().message());
    const BaseMatrix& b = base.value();
    const int z = c.lifting > 0 ? c.lifting : b.design_lifting;
    std::int64_t nonzero = 0;
    for (const int s : b.shifts) nonzero += s >= 0 ? 1 : 0;
    const std::string what = "base_matrix = '" + c.base_matrix + "' with lifting = " +
                             std::to_string(z);
    if (Status s = CheckLdpcMemory(scheme, p, what, std::int64_t{b.cols} * z,
                                   std::int64_t{b.rows} * z, nonzero * z,
                                   FindDualDiagonal(b).has_value(), context);
        !s.ok()) {
      return s;
    }
    checked = true;
    code = LiftBaseMatrix(b, z);
    if (!code.ok()) {
      return Status::Error(p + "lifting = " + std::to_string(z) + ": " + code.status().message());
    }
  } else {  // LdpcConstructionKind::kFile
    code = ReadLdpcMatrixFile(c.ResolvePath(c.matrix_file));
    if (!code.ok()) return Status::Error(p + "matrix_file: " + code.status().message());
  }
  if (!checked) {
    // A matrix file: H is read (its size bounded by the file's), the
    // encoder's elimination matrix is not made yet.
    const LdpcCode& h = code.value();
    const std::string what = "matrix_file = '" + c.matrix_file + "'";
    if (Status s = CheckLdpcMemory(scheme, p, what, h.length(), h.checks(), h.edges(),
                                   LdpcEncoder::HasDualDiagonalPath(h), context);
        !s.ok()) {
      return s;
    }
  }
  auto shared = std::make_shared<const LdpcCode>(std::move(code).value());
  const int n = shared->length();
  const int m = scheme.modulation.bits_per_symbol();
  if (n % m != 0) {
    return Status::Error(p + "code length n = " + std::to_string(n) + " is not a multiple of " +
                         std::to_string(m) + " bits per symbol of " + ToString(scheme.modulation));
  }
  LdpcDecoderOptions opt;
  opt.algorithm = c.decoder;
  opt.schedule = c.schedule;
  opt.max_iterations = c.max_iterations;
  opt.arithmetic = c.arithmetic;
  opt.normalization = static_cast<float>(c.normalization);
  opt.offset = static_cast<float>(c.offset);
  auto built = LdpcChannelCode::Create(std::move(shared), opt, context.stop);
  if (!built.ok()) return built.status().WithPrefix(p);
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

// Code facts, decoder settings and the density-evolution thresholds of an
// LDPC scheme.
void AnalyseLdpc(const ChannelCode& channel_code, const SchemeConfig& scheme, SchemeResult& r,
                 const std::atomic<bool>* stop) {
  const auto& ldpc = static_cast<const LdpcChannelCode&>(channel_code);
  const LdpcCode& code = ldpc.code();
  const LdpcSchemeConfig& c = scheme.ldpc;
  const DegreeProfile profile = ComputeDegreeProfile(code);
  const LdpcDecoderOptions& o = ldpc.decoder().options();
  CodeReport& out = r.code;
  out.Add("construction", ToString(c.construction));
  out.Add("description", code.description());
  out.Add("length", code.length());
  out.Add("info_bits", ldpc.encoder().info_bits());
  out.Add("checks", code.checks());
  out.Add("rank", ldpc.encoder().rank());
  out.Add("lifting", code.lifting());
  out.Add("girth", Girth(code));
  out.Add("degree_profile", profile.ToString());
  out.Add("encoder", std::string(ldpc.encoder().uses_dual_diagonal()
                                     ? "dual-diagonal (linear time)"
                                     : "gaussian elimination (dense GF(2))"));
  out.Add("decoder", ToString(o.algorithm));
  out.Add("schedule", ToString(o.schedule));
  out.Add("kernel_target", ldpc.decoder().kernel_target());
  out.Add("max_iterations", o.max_iterations);
  out.Add("normalization", static_cast<double>(o.normalization));
  out.Add("offset", static_cast<double>(o.offset));
  out.Add("code_rate_basis", std::string("information bits k / code length n (k = n - rank H)"));
  out.AddSeries("variable_nodes_by_degree",
                std::vector<std::int32_t>(profile.variable_nodes_by_degree.begin(),
                                          profile.variable_nodes_by_degree.end()));
  out.AddSeries("check_nodes_by_degree",
                std::vector<std::int32_t>(profile.check_nodes_by_degree.begin(),
                                          profile.check_nodes_by_degree.end()));

  Limits& lim = r.limits;
  lim.threshold_present = true;
  lim.binary_input_ebno_db = analysis::BinaryInputMinEbnoDb(r.code_rate);
  auto dist = analysis::EdgeDistributionFromNodeCounts(profile.variable_nodes_by_degree,
                                                       profile.check_nodes_by_degree);
  if (!dist.ok()) {
    lim.threshold_description = "no threshold: " + dist.status().message();
    return;
  }
  // The ensemble's threshold at the code's actual rate k/n (a rank-deficient
  // H carries a little more than the design rate).
  analysis::QuantizedDeOptions de_options;
  de_options.stop = stop;
  auto quantized = analysis::QuantizedThreshold(dist.value(), r.code_rate, de_options);
  auto ga = analysis::GaussianApproxThreshold(dist.value(), r.code_rate);
  if (ga.ok()) lim.threshold_ga_ebno_db = ga.value().ebno_db;
  const auto& best = quantized.ok() ? quantized : ga;
  if (best.ok()) {
    lim.threshold_ebno_db = best.value().ebno_db;
    lim.threshold_sigma = best.value().sigma;
    lim.threshold_method = analysis::ToString(best.value().method);
    lim.threshold_description = best.value().description;
  } else {
    lim.threshold_description = "no threshold: " + best.status().message();
  }
  const Modulation& mod = scheme.modulation;
  const bool binary = mod.family == ModulationFamily::kPsk && mod.order <= 4;
  lim.threshold_channel =
      binary ? "binary-input AWGN: exact for BPSK and Gray QPSK (two independent binary channels)"
             : "binary-input AWGN: a reference only for this mapper (BICM bit channels are not "
               "binary-input AWGN); no gap is quoted";
}


}  // namespace

std::uint64_t CeilMegabytes(std::uint64_t bytes) { return (bytes + (1u << 20) - 1) >> 20; }

LdpcMemoryEstimate EstimateLdpcMemory(std::int64_t n, std::int64_t m, std::int64_t edges,
                                      bool dual_diagonal, std::uint32_t unit_frames, int threads) {
  const auto un = static_cast<std::uint64_t>(std::max<std::int64_t>(n, 0));
  const auto um = static_cast<std::uint64_t>(std::max<std::int64_t>(m, 0));
  const auto ue = static_cast<std::uint64_t>(std::max<std::int64_t>(edges, 0));
  LdpcMemoryEstimate e;
  e.threads = std::max(threads, 1);
  e.code_bytes = 32 * (un + um) + 24 * ue;
  e.encoder_bytes = dual_diagonal ? 0 : LdpcEncoder::GeneralPathBytes(n, m);
  const std::uint64_t batch =
      LdpcChannelCode::BatchFrames(unit_frames, static_cast<std::size_t>(un), 64);
  e.per_thread_bytes = 64 * (4 * un + ue) + batch * 7 * un + 24 * un;
  return e;
}

const CodeFamily kLdpcFamily = {"ldpc",      &kLdpcKeyTable, /*fixed_frame=*/true,
                                /*unit_frames_multiple=*/64, &ParseLdpc, &BuildLdpc,
                                &AnalyseLdpc};

}  // namespace capgap
