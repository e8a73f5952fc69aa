// LDPC decoder: option validation, the fixed-point call into the dispatched
// kernel and the float frame loop over the references; see ldpc_decoder.h.
#include "blocks/fec/ldpc_decoder.h"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstdio>
#include <string>
#include <utility>

#include "blocks/kernels/ldpc_kernels.h"
#include "blocks/kernels/ldpc_reference.h"

namespace capgap {
namespace {

std::string FloatText(float x) {
  char buf[32];
  std::snprintf(buf, sizeof(buf), "%g", static_cast<double>(x));
  return buf;
}


reference::LdpcFloatArgs FloatArgs(const LdpcFixedArgs& base, const LdpcDecoderOptions& o) {
  reference::LdpcFloatArgs a;
  a.graph = base.graph;
  a.rule = o.algorithm == LdpcAlgorithm::kSumProduct     ? LdpcCheckRule::kSumProduct
           : o.algorithm == LdpcAlgorithm::kMinSumOffset ? LdpcCheckRule::kMinSumOffset
                                                         : LdpcCheckRule::kMinSumNormalized;
  a.layered = o.schedule == LdpcSchedule::kLayered;
  a.max_iterations = o.max_iterations;
  a.early_stop = o.early_stop;
  a.normalization = o.normalization;
  a.offset = o.offset;
  return a;
}

}  // namespace

Result<LdpcAlgorithm> ParseLdpcAlgorithm(std::string_view word) {
  if (word == "sum_product") return LdpcAlgorithm::kSumProduct;
  if (word == "min_sum_normalized") return LdpcAlgorithm::kMinSumNormalized;
  if (word == "min_sum_offset") return LdpcAlgorithm::kMinSumOffset;
  return Status::Error("LDPC algorithm '" + std::string(word) +
                       "': must be one of sum_product, min_sum_normalized, min_sum_offset");
}

std::string ToString(LdpcAlgorithm algorithm) {
  switch (algorithm) {
    case LdpcAlgorithm::kSumProduct:
      return "sum_product";
    case LdpcAlgorithm::kMinSumNormalized:
      return "min_sum_normalized";
    case LdpcAlgorithm::kMinSumOffset:
      return "min_sum_offset";
  }
  return "?";
}

Result<LdpcSchedule> ParseLdpcSchedule(std::string_view word) {
  if (word == "flooding") return LdpcSchedule::kFlooding;
  if (word == "layered") return LdpcSchedule::kLayered;
  return Status::Error("LDPC schedule '" + std::string(word) +
                       "': must be one of flooding, layered");
}

std::string ToString(LdpcSchedule schedule) {
  switch (schedule) {
    case LdpcSchedule::kFlooding:
      return "flooding";
    case LdpcSchedule::kLayered:
      return "layered";
  }
  return "?";
}

Result<LdpcArithmetic> ParseLdpcArithmetic(std::string_view word) {
  if (word == "auto") return LdpcArithmetic::kAuto;
  if (word == "int8") return LdpcArithmetic::kInt8;
  if (word == "int16") return LdpcArithmetic::kInt16;
  if (word == "float") return LdpcArithmetic::kFloat;
  if (word == "float32") return LdpcArithmetic::kFloat32;
  return Status::Error("LDPC arithmetic '" + std::string(word) +
                       "': must be one of auto, int8, int16, float, float32");
}

std::string ToString(LdpcArithmetic arithmetic) {
  switch (arithmetic) {
    case LdpcArithmetic::kAuto:
      return "auto";
    case LdpcArithmetic::kInt8:
      return "int8";
    case LdpcArithmetic::kInt16:
      return "int16";
    case LdpcArithmetic::kFloat:
      return "float";
    case LdpcArithmetic::kFloat32:
      return "float32";
  }
  return "?";
}

Result<LdpcDecoder> LdpcDecoder::Create(std::shared_ptr<const LdpcCode> code,
                                        const LdpcDecoderOptions& options) {
  if (code == nullptr) return Status::Error("LDPC decoder: no code given");
  const LdpcDecoderOptions& o = options;
  if (o.max_iterations < 1 || o.max_iterations > 10000) {
    return Status::Error("LDPC decoder: max_iterations = " + std::to_string(o.max_iterations) +
                         ": must be in [1, 10000]");
  }
  if (!(o.normalization > 0.0f && o.normalization <= 1.0f)) {
    return Status::Error("LDPC decoder: normalization = " + FloatText(o.normalization) +
                         ": must be in (0, 1]");
  }
  if (!(o.offset >= 0.0f && o.offset <= 100.0f)) {
    return Status::Error("LDPC decoder: offset = " + FloatText(o.offset) +
                         ": must be in [0, 100] (LLR units)");
  }
  const bool min_sum = o.algorithm != LdpcAlgorithm::kSumProduct;
  if (!min_sum &&
      (o.arithmetic == LdpcArithmetic::kInt8 || o.arithmetic == LdpcArithmetic::kInt16)) {
    return Status::Error("LDPC decoder: arithmetic = " + ToString(o.arithmetic) +
                         ": sum_product runs in float only (use auto or float)");
  }
  LdpcDecoder dec;
  dec.code_ = std::move(code);
  dec.options_ = o;
  const bool float_arith =
      o.arithmetic == LdpcArithmetic::kFloat || o.arithmetic == LdpcArithmetic::kFloat32;
  dec.fixed_ = min_sum && !float_arith;
  dec.float_lanes_ = (min_sum && float_arith) || o.arithmetic == LdpcArithmetic::kFloat32;
  LdpcFixedArgs& a = dec.fixed_args_;
  a.graph = LdpcGraphOf(*dec.code_);
  a.layered = o.schedule == LdpcSchedule::kLayered;
  a.max_iterations = o.max_iterations;
  a.early_stop = o.early_stop;
  a.offset = o.algorithm == LdpcAlgorithm::kMinSumOffset;
  a.norm_mul =
      static_cast<int>(std::lround(static_cast<double>(o.normalization) * (1 << kLdpcNormShift)));
  const int dv = a.graph.max_col_degree;
  const bool int8 = o.arithmetic == LdpcArithmetic::kInt8 ||
                    (o.arithmetic == LdpcArithmetic::kAuto && dv <= kAutoInt8MaxVariableDegree);
  a.lane = int8 ? LdpcLane::kInt8 : LdpcLane::kInt16;
  a.llr_scale = int8 ? kInt8LlrScale : kInt16LlrScale;
  a.channel_clip = int8 ? kInt8ChannelClip : kInt16ChannelClip;
  a.message_clip = LdpcMessageClipFor(a.lane, dv, a.channel_clip);
  if (!int8) a.message_clip = std::min(a.message_clip, kInt16MessageClipMax);
  a.offset_q = static_cast<int>(
      std::min<long>(a.message_clip, std::lround(static_cast<double>(o.offset) * a.llr_scale)));
  LdpcFloatKernelArgs& fa = dec.float_args_;
  fa.graph = a.graph;
  fa.rule = !min_sum ? LdpcFloatRule::kSumProduct32
            : a.offset ? LdpcFloatRule::kMinSumOffset
                       : LdpcFloatRule::kMinSumNormalized;
  fa.layered = a.layered;
  fa.max_iterations = o.max_iterations;
  fa.early_stop = o.early_stop;
  fa.normalization = o.normalization;
  fa.offset = o.offset;
  if (dec.float_lanes_ && !min_sum && a.graph.max_row_degree > kLdpcSpaMaxRowDegree) {
    return Status::Error("LDPC decoder: arithmetic = float32: the code has a check of degree " +
                         std::to_string(a.graph.max_row_degree) + " (sum_product in float32 allows " +
                         std::to_string(kLdpcSpaMaxRowDegree) + "; use float)");
  }
  if (dec.fixed_) {
    if (int8 && a.message_clip < kInt8MinMessageClip) {
      return Status::Error("LDPC decoder: arithmetic = int8: the code's largest variable degree " +
                           std::to_string(dv) + " leaves int8 messages below " +
                           std::to_string(kInt8MinMessageClip) +
                           " steps (allowed up to degree 12; use auto or int16)");
    }
    if (!int8 && a.message_clip < 1) {
      return Status::Error("LDPC decoder: the code's largest variable degree " +
                           std::to_string(dv) + " is too large for int16 (use float)");
    }
    if (!a.offset && a.norm_mul < 1) {
      return Status::Error(
          "LDPC decoder: normalization = " + FloatText(o.normalization) +
          ": the fixed-point decoder needs >= 1/512 (it applies round(256 x) / 256)");
    }
  }
  return dec;
}

LdpcDecoder::Workspace LdpcDecoder::MakeWorkspace() const {
  Workspace ws;
  const LdpcGraph& g = fixed_args_.graph;
  if (fixed_) {
    const std::size_t lanes = LdpcFixedMaxLanes(fixed_args_.lane);
    ws.fixed_.resize(LdpcFixedWorkspaceBytes(fixed_args_, lanes));
  } else if (float_lanes_) {
    ws.lanes_.resize(LdpcFloatWorkspaceBytes(float_args_, LdpcFloatMaxLanes(float_args_.rule)));
  } else {
    ws.float_.resize(reference::LdpcFloatFrameWorkspaceFloats(g));
    ws.double_.resize(reference::LdpcFloatFrameWorkspaceDoubles(g));
  }
  return ws;
}

int LdpcDecoder::batch_frames() const {
  if (float_lanes_) return static_cast<int>(LdpcFloatLanes(float_args_.rule));
  return fixed_ ? static_cast<int>(LdpcFixedLanes(fixed_args_.lane)) : 1;
}

std::string LdpcDecoder::kernel_target() const {
  if (float_lanes_) {
    const std::string type =
        float_args_.rule == LdpcFloatRule::kSumProduct32 ? "float32" : "float";
    const std::size_t lanes = LdpcFloatLanes(float_args_.rule);
    const std::string target = LdpcFloatKernelTarget(float_args_.rule);
    if (lanes <= 1 || target == "SCALAR") return "scalar " + type;
    return target + " " + type + " x" + std::to_string(lanes) + " lanes";
  }
  if (!fixed_) return "scalar float";
  const std::string type = fixed_args_.lane == LdpcLane::kInt8 ? "int8" : "int16";
  const std::size_t lanes = LdpcFixedLanes(fixed_args_.lane);
  const std::string target = LdpcKernelTarget();
  if (lanes <= 1 || target == "SCALAR") return "scalar " + type;
  return target + " " + type + " x" + std::to_string(lanes) + " lanes";
}

void LdpcDecoder::Decode(std::span<const float> llrs, std::span<Bit> decided,
                         std::span<FrameResult> results, Workspace& ws) const {
  const auto n = static_cast<std::size_t>(code_->length());
  const std::size_t frames = results.size();
  CAPGAP_DCHECK(frames >= 1);
  CAPGAP_DCHECK(llrs.size() == frames * n);
  CAPGAP_DCHECK(decided.size() == frames * n);
  if (fixed_) {
    CAPGAP_DCHECK(ws.fixed_.size() ==
                  LdpcFixedWorkspaceBytes(fixed_args_, LdpcFixedMaxLanes(fixed_args_.lane)));
    LdpcDecodeFixed(fixed_args_, llrs.data(), frames, decided.data(), results.data(),
                    ws.fixed_.data());
    return;
  }
  if (float_lanes_) {
    CAPGAP_DCHECK(ws.lanes_.size() ==
                  LdpcFloatWorkspaceBytes(float_args_, LdpcFloatMaxLanes(float_args_.rule)));
    LdpcDecodeFloatLanes(float_args_, llrs.data(), frames, decided.data(), results.data(),
                         ws.lanes_.data());
    return;
  }
  CAPGAP_DCHECK(ws.float_.size() == reference::LdpcFloatFrameWorkspaceFloats(fixed_args_.graph));
  const reference::LdpcFloatArgs fa = FloatArgs(fixed_args_, options_);
  for (std::size_t f = 0; f < frames; ++f) {
    reference::LdpcDecodeFloatFrame(fa, llrs.data() + f * n, decided.data() + f * n, nullptr,
                                    &results[f].iterations, &results[f].converged, ws.float_.data(),
                                    ws.double_.data());
  }
}

LdpcGraph LdpcGraphOf(const LdpcCode& code) {
  LdpcGraph g;
  g.n = code.length();
  g.m = code.checks();
  g.edges = code.edges();
  g.row_start = code.row_start().data();
  g.edge_variable = code.edge_variable().data();
  g.col_start = code.col_start().data();
  g.col_edge = code.col_edge().data();
  for (int r = 0; r < g.m; ++r) g.max_row_degree = std::max(g.max_row_degree, code.row_degree(r));
  for (int v = 0; v < g.n; ++v) g.max_col_degree = std::max(g.max_col_degree, code.col_degree(v));
  return g;
}

}  // namespace capgap
