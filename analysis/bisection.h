// Bisection of a bracket [lo, hi] for a predicate that holds at lo and fails
// at hi and changes once in between (a monotone test such as "decodes at
// sigma" or "BER above the target at Eb/N0"). Halves the bracket at its
// midpoint until it is no wider than `width`, keeping the predicate's value
// at each end; returns the final bracket, so a caller can report the end it
// trusts (the last point that held) or the midpoint.
#ifndef CAPGAP_ANALYSIS_BISECTION_H_
#define CAPGAP_ANALYSIS_BISECTION_H_

namespace capgap::analysis {

struct Bracket {
  double lo = 0.0;  // the predicate holds here
  double hi = 0.0;  // the predicate fails here
};

// REQUIRES: holds(lo), !holds(hi), width > 0.
template <typename Holds>
Bracket Bisect(double lo, double hi, double width, Holds&& holds) {
  while (hi - lo > width) {
    const double mid = 0.5 * (lo + hi);
    if (holds(mid)) {
      lo = mid;
    } else {
      hi = mid;
    }
  }
  return Bracket{lo, hi};
}

}  // namespace capgap::analysis

#endif  // CAPGAP_ANALYSIS_BISECTION_H_
