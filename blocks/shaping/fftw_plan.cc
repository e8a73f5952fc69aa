// FFTW planner mutex, aligned buffers and plan pairs (see fftw_plan.h).
#include "blocks/shaping/fftw_plan.h"

#include <cstring>

namespace capgap {

std::mutex& FftwPlannerMutex() {
  static std::mutex mutex;
  return mutex;
}

FftwBuffer MakeFftwBuffer(std::size_t n) {
  if (n == 0) return FftwBuffer(nullptr);
  auto* p = static_cast<fftwf_complex*>(fftwf_malloc(n * sizeof(fftwf_complex)));
  std::memset(p, 0, n * sizeof(fftwf_complex));
  return FftwBuffer(p);
}

FftwPlanPair::FftwPlanPair(int n) : n_(n) {
  // Planning with FFTW_ESTIMATE does not touch the arrays' contents.
  FftwBuffer a = MakeFftwBuffer(static_cast<std::size_t>(n));
  FftwBuffer b = MakeFftwBuffer(static_cast<std::size_t>(n));
  std::lock_guard<std::mutex> lock(FftwPlannerMutex());
  forward_ = fftwf_plan_dft_1d(n, a.get(), b.get(), FFTW_FORWARD, FFTW_ESTIMATE);
  backward_ = fftwf_plan_dft_1d(n, a.get(), b.get(), FFTW_BACKWARD, FFTW_ESTIMATE);
}

FftwPlanPair::~FftwPlanPair() {
  std::lock_guard<std::mutex> lock(FftwPlannerMutex());
  if (forward_ != nullptr) fftwf_destroy_plan(forward_);
  if (backward_ != nullptr) fftwf_destroy_plan(backward_);
}

}  // namespace capgap
