// Shared dispatch for the kernel families of blocks/kernels (noise, fused
// BPSK, Viterbi ACS, FIR, LDPC min-sum, demapper). Each family's .cc is
// compiled once per instruction set (Google Highway, hwy/foreach_target.h) and
// describes its dispatch table as a struct with a static Resolve() that reads
// HWY_DYNAMIC_DISPATCH for each entry point; ChosenKernels<Table>() resolves
// that table, and the name of its target, once per process (thread-safe static initialisation), after
// pointing Highway at the best target that is both compiled in and supported
// by the running CPU, so no instruction the CPU lacks is ever executed. Later
// changes to Highway's chosen-target state (tests that mock the CPU) do not
// move a resolved table.
//
// ForceScalarKernels(true) (the CLI's --scalar, tests) routes every family to
// its scalar oracle (*_reference.h) for the rest of the process; a
// CAPGAP_FORCE_SCALAR build compiles no SIMD code in any family and always
// runs the oracles. The name of the target a family runs comes from here
// too (Chosen::name, ScalarTargetName), so every output file can record it.
// This header has no Highway include and may be included anywhere.
#ifndef CAPGAP_BLOCKS_KERNELS_DISPATCH_H_
#define CAPGAP_BLOCKS_KERNELS_DISPATCH_H_

#include <cstdint>

namespace capgap {

// Forces the portable scalar path for the rest of the process (CLI --scalar,
// tests). Returns the previous setting. Applies to every kernel family in
// blocks/kernels.
bool ForceScalarKernels(bool force);

// The current setting of ForceScalarKernels (true also under
// CAPGAP_FORCE_SCALAR); the families read it on every call.
bool ScalarKernelsForced();

namespace kernel_dispatch {

// The name recorded when a family runs its scalar oracle ("SCALAR").
const char* ScalarTargetName();

#ifndef CAPGAP_FORCE_SCALAR
// Points Highway's dynamic dispatch at the best target compiled in and
// supported by the running CPU (hwy::GetChosenTarget().Update).
void SelectBestTarget();

// Highway's name ("AVX3", "AVX2", "SSE4", "EMU128", ...) of the target that
// HWY_DYNAMIC_DISPATCH picks now, i.e. right after SelectBestTarget().
const char* DispatchedTargetName();

// A family's dispatch table and the name of the target it runs.
template <typename Table>
struct Chosen : Table {
  const char* name;
};

// The family's table, resolved on first use and then fixed for the process.
// Table::Resolve() returns a Table filled from HWY_DYNAMIC_DISPATCH.
template <typename Table>
const Chosen<Table>& ChosenKernels() {
  static const Chosen<Table> chosen = [] {
    SelectBestTarget();
    return Chosen<Table>{Table::Resolve(), DispatchedTargetName()};
  }();
  return chosen;
}
#endif  // CAPGAP_FORCE_SCALAR

// The name a family records: its chosen target's when the family runs it
// (the scalar kernels are not forced and `runs_simd(table)` holds), else
// ScalarTargetName().
struct AlwaysSimd {
  template <typename Table>
  bool operator()(const Table&) const {
    return true;
  }
};
template <typename Table, typename RunsSimd = AlwaysSimd>
const char* KernelTargetName(RunsSimd runs_simd = {}) {
#ifndef CAPGAP_FORCE_SCALAR
  if (!ScalarKernelsForced() && runs_simd(static_cast<const Table&>(ChosenKernels<Table>()))) {
    return ChosenKernels<Table>().name;
  }
#endif
  (void)runs_simd;
  return ScalarTargetName();
}

}  // namespace kernel_dispatch
}  // namespace capgap

#endif  // CAPGAP_BLOCKS_KERNELS_DISPATCH_H_
