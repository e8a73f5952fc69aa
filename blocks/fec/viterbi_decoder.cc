// Viterbi decoder: depuncturing, quantisation, the chunked forward pass
// (dispatched int16 ACS or the float reference) and the traceback; see
// viterbi_decoder.h.
#include "blocks/fec/viterbi_decoder.h"

#include <algorithm>
#include <cmath>
#include <cstddef>
#include <cstdint>
#include <cstring>
#include <string>
#include <utility>

#include "blocks/kernels/viterbi_kernels.h"
#include "blocks/kernels/viterbi_reference.h"

namespace capgap {

Result<ViterbiDecoder> ViterbiDecoder::Create(const ConvCode& code,
                                              const ViterbiOptions& options) {
  const int k = code.constraint_length();
  if (options.traceback_length < -1 || options.traceback_length > (1 << 20)) {
    return Status::Error("viterbi: traceback_length = " +
                         std::to_string(options.traceback_length) +
                         ": must be -1 (default), 0 (whole frame) or in [1, 2^20]");
  }
  if (options.traceback_length > 0 && options.traceback_length < k) {
    return Status::Error("viterbi: traceback_length = " +
                         std::to_string(options.traceback_length) + ": must be >= K = " +
                         std::to_string(k));
  }
  if (options.tail_biting_extension < -1 || options.tail_biting_extension > (1 << 20)) {
    return Status::Error("viterbi: tail_biting_extension = " +
                         std::to_string(options.tail_biting_extension) +
                         ": must be -1 (default) or in [0, 2^20]");
  }
  ViterbiDecoder dec(code);
  dec.traceback_ = options.traceback_length >= 0 ? options.traceback_length
                                                 : (code.punctured() ? 10 * k : 5 * k);
  dec.extension_ = options.tail_biting_extension >= 0 ? options.tail_biting_extension : 6 * k;
  dec.metric_ = options.metric;
  const int n = code.num_outputs();
  const std::size_t h = static_cast<std::size_t>(code.num_states()) / 2;
  dec.signs_i_.resize(4 * static_cast<std::size_t>(n) * h);
  dec.signs_f_.resize(dec.signs_i_.size());
  for (int c = 0; c < 4; ++c) {
    const int u = c >> 1, b = c & 1;
    for (std::size_t j = 0; j < h; ++j) {
      const std::uint32_t label = code.BranchLabel(static_cast<int>(2 * j) | b, u);
      for (int i = 0; i < n; ++i) {
        const std::size_t idx = static_cast<std::size_t>(c * n + i) * h + j;
        const int sign = ((label >> i) & 1u) ? -1 : 1;
        dec.signs_i_[idx] = static_cast<std::int16_t>(sign);
        dec.signs_f_[idx] = static_cast<float>(sign);
      }
    }
  }
  return dec;
}

ViterbiDecoder::Workspace ViterbiDecoder::MakeWorkspace(std::size_t max_info_bits) const {
  Workspace ws;
  ws.max_info_bits_ = max_info_bits;
  std::size_t steps = code_.TrellisSteps(max_info_bits);
  if (code_.termination() == Termination::kTailBiting) {
    steps += 2 * static_cast<std::size_t>(extension_);
  }
  const std::size_t n = static_cast<std::size_t>(code_.num_outputs());
  const std::size_t s = static_cast<std::size_t>(code_.num_states());
  ws.mother_.resize(steps * n + n * static_cast<std::size_t>(code_.TrellisSteps(max_info_bits)));
  ws.q_.resize(steps * n);
  ws.decisions_.resize(steps * std::max<std::size_t>(1, s / 8));
  ws.metrics_i_.resize(s);
  ws.metrics_f_.resize(s);
  return ws;
}

const char* ViterbiDecoder::AcsTarget() const {
  return metric_ == ViterbiMetric::kFloat ? "SCALAR"
                                          : ViterbiKernelTarget(code_.constraint_length());
}

void ViterbiDecoder::Decode(std::span<const float> llrs, std::span<Bit> info,
                            Workspace& ws) const {
  CAPGAP_DCHECK(info.size() <= ws.max_info_bits());
  CAPGAP_DCHECK(llrs.size() == code_.CodedLength(info.size()));
  const std::size_t mother_len = code_.MotherLength(info.size());
  code_.Depuncture(llrs, std::span<float>(ws.mother_.data(), mother_len));
  DecodeMother(info, ws);
}

void ViterbiDecoder::DecodeHard(std::span<const Bit> coded, std::span<Bit> info,
                                Workspace& ws) const {
  CAPGAP_DCHECK(info.size() <= ws.max_info_bits());
  CAPGAP_DCHECK(coded.size() == code_.CodedLength(info.size()));
  // Hard bits as +-1 LLRs, placed after the mother area, then depunctured.
  const std::size_t mother_len = code_.MotherLength(info.size());
  float* tmp = ws.mother_.data() + ws.mother_.size() - coded.size();
  for (std::size_t i = 0; i < coded.size(); ++i) tmp[i] = coded[i] ? -1.0f : 1.0f;
  CAPGAP_DCHECK(mother_len <= ws.mother_.size() - coded.size());
  code_.Depuncture(std::span<const float>(tmp, coded.size()),
                   std::span<float>(ws.mother_.data(), mother_len));
  DecodeMother(info, ws);
}

void ViterbiDecoder::DecodeMother(std::span<Bit> info, Workspace& ws) const {
  const std::size_t n = static_cast<std::size_t>(code_.num_outputs());
  const std::size_t len = info.size();
  const std::size_t t_frame = code_.TrellisSteps(len);
  const bool tail_biting = code_.termination() == Termination::kTailBiting;
  std::size_t w = 0;
  std::size_t steps = t_frame;
  if (tail_biting) {
    // Circular extension: [last W steps | frame | first W steps]. The frame
    // is moved up by W steps (memmove backwards), then head and tail filled.
    w = static_cast<std::size_t>(extension_);
    steps = t_frame + 2 * w;
    float* m = ws.mother_.data();
    std::copy_backward(m, m + t_frame * n, m + (w + t_frame) * n);
    for (std::size_t t = 0; t < w; ++t) {
      // head step t is frame step (t - w) mod T; tail step w+T+t is frame step t mod T.
      const std::size_t head_src = (t_frame - (w - t) % t_frame) % t_frame;
      const std::size_t tail_src = t % t_frame;
      std::copy_n(m + (w + head_src) * n, n, m + t * n);
      std::copy_n(m + (w + tail_src) * n, n, m + (w + t_frame + t) * n);
    }
  }
  const std::size_t s = static_cast<std::size_t>(code_.num_states());
  if (metric_ == ViterbiMetric::kInt16) {
    // Scale to mean |L| = kQuantMean over the non-erased positions. Eight
    // partial sums so the loops vectorise (the order is fixed, so the scale
    // is the same on every machine); round half away from zero.
    const float* m = ws.mother_.data();
    const std::size_t total = steps * n;
    float acc[8] = {};
    std::int32_t cnt[8] = {};
    std::size_t i = 0;
    for (; i + 8 <= total; i += 8) {
      for (std::size_t j = 0; j < 8; ++j) {
        const float a = std::fabs(m[i + j]);
        acc[j] += a;
        cnt[j] += a > 0.0f ? 1 : 0;
      }
    }
    for (; i < total; ++i) {
      const float a = std::fabs(m[i]);
      acc[0] += a;
      cnt[0] += a > 0.0f ? 1 : 0;
    }
    float sum = 0.0f;
    std::int64_t count = 0;
    for (std::size_t j = 0; j < 8; ++j) {
      sum += acc[j];
      count += cnt[j];
    }
    const float scale = sum > 0.0f ? kQuantMean * static_cast<float>(count) / sum : 1.0f;
    ViterbiQuantise(m, total, scale, ws.q_.data());
    for (std::size_t i = 0; i < s; ++i) {
      ws.metrics_i_[i] = (tail_biting || i == 0) ? std::int16_t{0} : kViterbiStartPenalty;
    }
  } else {
    for (std::size_t i = 0; i < s; ++i) {
      ws.metrics_f_[i] = (tail_biting || i == 0) ? 0.0f : -1e30f;
    }
  }

  // Output: steps [w, w + len) of the (extended) trellis are info bits.
  const std::size_t out_begin = w;
  const std::size_t out_end = w + len;
  if (traceback_ == 0) {
    Forward(ws, 0, steps);
    const int final_state = tail_biting ? BestState(ws) : 0;
    Traceback(ws, final_state, steps, out_begin, out_end, out_begin, info);
    return;
  }
  const std::size_t depth = static_cast<std::size_t>(traceback_);
  const std::size_t chunk = kTracebackChunk * depth;
  std::size_t begin = out_begin;  // first undecided info step
  std::size_t fwd = 0;
  while (begin < out_end) {
    const std::size_t e = std::min(begin + chunk + depth, steps);
    Forward(ws, fwd, e);
    fwd = e;
    if (e == steps) {
      const int final_state = tail_biting ? BestState(ws) : 0;
      Traceback(ws, final_state, e, begin, out_end, out_begin, info);
      break;
    }
    const std::size_t keep_end = std::min(begin + chunk, out_end);
    Traceback(ws, BestState(ws), e, begin, keep_end, out_begin, info);
    begin = keep_end;
  }
}

void ViterbiDecoder::Forward(Workspace& ws, std::size_t from, std::size_t to) const {
  if (to <= from) return;
  const std::size_t n = static_cast<std::size_t>(code_.num_outputs());
  const std::size_t row = std::max<std::size_t>(1, static_cast<std::size_t>(code_.num_states()) / 8);
  if (metric_ == ViterbiMetric::kInt16) {
    ViterbiAcsArgs args;
    args.constraint_length = code_.constraint_length();
    args.num_outputs = code_.num_outputs();
    args.signs = signs_i_.data();
    ViterbiAcsInt16(args, ws.metrics_i_.data(), ws.q_.data() + from * n, to - from,
                    ws.decisions_.data() + from * row);
  } else {
    reference::ViterbiAcsFloat(code_.constraint_length(), code_.num_outputs(), signs_f_.data(),
                               ws.metrics_f_.data(), ws.mother_.data() + from * n, to - from,
                               ws.decisions_.data() + from * row);
  }
}

int ViterbiDecoder::BestState(const Workspace& ws) const {
  // Largest metric, lowest index on ties.
  const int s = code_.num_states();
  int best = 0;
  if (metric_ == ViterbiMetric::kInt16) {
    for (int i = 1; i < s; ++i) {
      if (ws.metrics_i_[static_cast<std::size_t>(i)] > ws.metrics_i_[static_cast<std::size_t>(best)]) {
        best = i;
      }
    }
  } else {
    for (int i = 1; i < s; ++i) {
      if (ws.metrics_f_[static_cast<std::size_t>(i)] > ws.metrics_f_[static_cast<std::size_t>(best)]) {
        best = i;
      }
    }
  }
  return best;
}

// Traces back from `state` at step `end` down to step `begin`, writing the
// input of step t to info[t - out_offset] for t in [begin, keep_end).
void ViterbiDecoder::Traceback(const Workspace& ws, int state, std::size_t end, std::size_t begin,
                               std::size_t keep_end, std::size_t out_offset,
                               std::span<Bit> info) const {
  const int k = code_.constraint_length();
  const unsigned mask = static_cast<unsigned>(code_.num_states() - 1);
  const std::size_t row = std::max<std::size_t>(1, static_cast<std::size_t>(code_.num_states()) / 8);
  unsigned s = static_cast<unsigned>(state);
  const std::uint8_t* dec = ws.decisions_.data();
  const unsigned shift = static_cast<unsigned>(k - 2);
  const auto walk = [&](auto&& step_back) {
    std::size_t t = end;
    // Steps decided later: walk only.
    for (; t > keep_end; --t) step_back(t - 1);
    for (; t > begin; --t) {
      info[t - 1 - out_offset] = static_cast<Bit>(s >> shift);
      step_back(t - 1);
    }
  };
  if (row == 8) {
    // K = 7: the row is one 64-bit word whose address does not depend on the
    // state, so the loop-carried chain is shift, and, or (no load latency).
    walk([&](std::size_t t) {
      std::uint64_t word;
      std::memcpy(&word, dec + t * 8, 8);
      s = ((s << 1) & mask) | static_cast<unsigned>((word >> s) & 1u);
    });
  } else {
    walk([&](std::size_t t) {
      const unsigned bit = static_cast<unsigned>(dec[t * row + (s >> 3)] >> (s & 7u)) & 1u;
      s = ((s << 1) & mask) | bit;
    });
  }
}

}  // namespace capgap
