// Shared vocabulary of every block: complex sample type, span aliases and the
// debug-only precondition check. Header-only.
#ifndef CAPGAP_BLOCKS_CORE_TYPES_H_
#define CAPGAP_BLOCKS_CORE_TYPES_H_

#include <complex>
#include <cstdint>
#include <span>

namespace capgap {

// Complex baseband sample. Constellations are scaled to unit average symbol
// energy, Es = E|x|^2 = 1.
using cf32 = std::complex<float>;

// Hard bits are stored one per byte, value 0 or 1.
using Bit = std::uint8_t;

}  // namespace capgap

// Preconditions inside blocks and kernels: checked in debug builds only.
#ifdef NDEBUG
#define CAPGAP_DCHECK(cond) ((void)0)
#else
#include <cstdio>
#include <cstdlib>
#define CAPGAP_DCHECK(cond)                                                  \
  do {                                                                       \
    if (!(cond)) {                                                           \
      std::fprintf(stderr, "%s:%d: DCHECK failed: %s\n", __FILE__, __LINE__, \
                   #cond);                                                   \
      std::abort();                                                          \
    }                                                                        \
  } while (0)
#endif

#endif  // CAPGAP_BLOCKS_CORE_TYPES_H_
