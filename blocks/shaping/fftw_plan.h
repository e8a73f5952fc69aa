// Thin FFTW3 (single precision) helpers shared by the shaping blocks: aligned
// complex buffers and one-dimensional complex plans created and destroyed
// under one process-wide mutex (FFTW's planner is not thread-safe; executing
// distinct or identical plans on new arrays with fftwf_execute_dft is).
//
// Plans use FFTW_ESTIMATE: the plan, hence the rounding of every transform,
// depends only on the size and the instruction set, never on timing, so a
// run is repeatable (FFTW_MEASURE could pick a different algorithm per run).
// Buffers come from fftwf_malloc, so every buffer has the alignment the plan
// was made for and may be passed to fftwf_execute_dft.
#ifndef CAPGAP_BLOCKS_SHAPING_FFTW_PLAN_H_
#define CAPGAP_BLOCKS_SHAPING_FFTW_PLAN_H_

#include <fftw3.h>

#include <cstddef>
#include <memory>
#include <mutex>

namespace capgap {

// The one mutex around fftwf_plan_* and fftwf_destroy_plan in capgap.
std::mutex& FftwPlannerMutex();

struct FftwFreeDeleter {
  void operator()(fftwf_complex* p) const { fftwf_free(p); }
};
using FftwBuffer = std::unique_ptr<fftwf_complex[], FftwFreeDeleter>;

// Zeroed aligned buffer of n complex floats (nullptr only if n == 0).
FftwBuffer MakeFftwBuffer(std::size_t n);

// Forward (sign -1) and backward (sign +1, unnormalised) c2c plans of size n,
// out of place. Immutable, shareable across threads.
class FftwPlanPair {
 public:
  explicit FftwPlanPair(int n);
  ~FftwPlanPair();
  FftwPlanPair(const FftwPlanPair&) = delete;
  FftwPlanPair& operator=(const FftwPlanPair&) = delete;

  int size() const { return n_; }
  // REQUIRES: in != out, both from MakeFftwBuffer(size() or more).
  void Forward(fftwf_complex* in, fftwf_complex* out) const {
    fftwf_execute_dft(forward_, in, out);
  }
  void Backward(fftwf_complex* in, fftwf_complex* out) const {
    fftwf_execute_dft(backward_, in, out);
  }

 private:
  int n_;
  fftwf_plan forward_ = nullptr;
  fftwf_plan backward_ = nullptr;
};

}  // namespace capgap

#endif  // CAPGAP_BLOCKS_SHAPING_FFTW_PLAN_H_
