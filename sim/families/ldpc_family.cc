// Code family `ldpc`: LDPC codes from a PEG construction, a lifted QC base
// matrix or a parity-check matrix file, with their systematic encoder and
// decoder, built into an LdpcChannelCode. frame_bits becomes the code's k.
#include <memory>

#include "blocks/fec/ldpc_channel_code.h"
#include "blocks/fec/ldpc_construction.h"
#include "blocks/fec/ldpc_matrix_file.h"
#include "analysis/capacity.h"
#include "analysis/density_evolution.h"
#include "sim/families/families.h"

namespace capgap {

Result<std::shared_ptr<const ChannelCode>> BuildLdpc(const SchemeConfig& scheme,
                                                     const std::string& p) {
  const LdpcSchemeConfig& c = scheme.ldpc;
  Result<LdpcCode> code = Status::Error("unset");
  if (c.construction == "peg") {
    auto degrees = ParseVariableDegrees(c.degrees);
    if (!degrees.ok()) {
      return Status::Error(p + "degrees = '" + c.degrees + "': " + degrees.status().message());
    }
    PegSpec spec;
    spec.length = c.length;
    spec.checks = ChecksForRate(c.length, c.rate);
    spec.degrees = degrees.value();
    spec.seed = c.construction_seed;
    code = BuildPegCode(spec);
    if (!code.ok()) return Status::Error(p + "length/rate/degrees: " + code.status().message());
  } else if (c.construction == "qc") {
    auto base = ReadBaseMatrixFile(c.ResolvePath(c.base_matrix));
    if (!base.ok()) return Status::Error(p + "base_matrix: " + base.status().message());
    const int z = c.lifting > 0 ? c.lifting : base.value().design_lifting;
    code = LiftBaseMatrix(base.value(), z);
    if (!code.ok()) {
      return Status::Error(p + "lifting = " + std::to_string(z) + ": " + code.status().message());
    }
  } else if (c.construction == "file") {
    code = ReadLdpcMatrixFile(c.ResolvePath(c.matrix_file));
    if (!code.ok()) return Status::Error(p + "matrix_file: " + code.status().message());
  } else {
    return Status::Error(p + "construction = '" + c.construction + "': valid: peg, qc, file");
  }
  auto shared = std::make_shared<const LdpcCode>(std::move(code).value());
  const int n = shared->length();
  const int m = scheme.modulation.bits_per_symbol();
  if (n % m != 0) {
    return Status::Error(p + "code length n = " + std::to_string(n) + " is not a multiple of " +
                         std::to_string(m) + " bits per symbol of " + ToString(scheme.modulation));
  }
  LdpcDecoderOptions opt;
  auto algorithm = ParseLdpcAlgorithm(c.decoder);
  if (!algorithm.ok()) {
    return Status::Error(p + "decoder = '" + c.decoder + "': " + algorithm.status().message());
  }
  opt.algorithm = algorithm.value();
  auto schedule = ParseLdpcSchedule(c.schedule);
  if (!schedule.ok()) {
    return Status::Error(p + "schedule = '" + c.schedule + "': " + schedule.status().message());
  }
  opt.schedule = schedule.value();
  opt.max_iterations = c.max_iterations;
  auto arithmetic = ParseLdpcArithmetic(c.arithmetic);
  if (!arithmetic.ok()) {
    return Status::Error(p + "arithmetic = '" + c.arithmetic + "': " + arithmetic.status().message());
  }
  opt.arithmetic = arithmetic.value();
  opt.normalization = static_cast<float>(c.normalization);
  opt.offset = static_cast<float>(c.offset);
  auto built = LdpcChannelCode::Create(std::move(shared), opt);
  if (!built.ok()) return Status::Error(p + built.status().message());
  return std::shared_ptr<const ChannelCode>(std::move(built).value());
}

// Code facts, decoder settings and the density-evolution thresholds of an
// LDPC scheme.
void AnalyseLdpc(const ChannelCode& channel_code, const SchemeConfig& scheme, SchemeResult& r) {
  const auto& ldpc = static_cast<const LdpcChannelCode&>(channel_code);
  const LdpcCode& code = ldpc.code();
  const LdpcSchemeConfig& c = scheme.ldpc;
  LdpcResult& l = r.ldpc;
  l.present = true;
  l.construction = c.construction;
  l.description = code.description();
  l.length = code.length();
  l.info_bits = ldpc.encoder().info_bits();
  l.checks = code.checks();
  l.rank = ldpc.encoder().rank();
  l.lifting = code.lifting();
  l.girth = Girth(code);
  const DegreeProfile profile = ComputeDegreeProfile(code);
  l.degree_profile = profile.ToString();
  l.variable_nodes_by_degree = profile.variable_nodes_by_degree;
  l.check_nodes_by_degree = profile.check_nodes_by_degree;
  l.encoder = ldpc.encoder().uses_dual_diagonal() ? "dual-diagonal (linear time)"
                                                        : "gaussian elimination (dense GF(2))";
  const LdpcDecoderOptions& o = ldpc.decoder().options();
  l.decoder = ToString(o.algorithm);
  l.schedule = ToString(o.schedule);
  l.kernel_target = ldpc.decoder().kernel_target();
  l.max_iterations = o.max_iterations;
  l.normalization = o.normalization;
  l.offset = o.offset;

  Limits& lim = r.limits;
  lim.binary_input_ebno_db = analysis::BinaryInputMinEbn0Db(r.code_rate);
  auto dist = analysis::EdgeDistributionFromNodeCounts(profile.variable_nodes_by_degree,
                                                       profile.check_nodes_by_degree);
  if (!dist.ok()) {
    lim.threshold_description = "no threshold: " + dist.status().message();
    return;
  }
  // The ensemble's threshold at the code's actual rate k/n (a rank-deficient
  // H carries a little more than the design rate).
  auto quantized = analysis::QuantizedThreshold(dist.value(), r.code_rate);
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


}  // namespace capgap
