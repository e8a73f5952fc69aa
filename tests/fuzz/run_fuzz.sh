#!/usr/bin/env bash
# Builds the libFuzzer targets of tests/fuzz with clang in build-fuzz/ and
# runs each for SECONDS (default 45) from its seed corpus
# (tests/fuzz/corpus/<target>/, copied to build-fuzz/corpus/ so that new
# inputs stay out of the source tree), two targets at a time. Bounded: every
# input at most 10 s (-timeout), the process at most 2 GiB (-rss_limit_mb).
# Fails, naming the target and its crash file (build-fuzz/artifacts/<target>/),
# if any target crashes, times out or runs out of memory.
# Usage: bash tests/fuzz/run_fuzz.sh [SECONDS]   (FUZZ_TARGETS="fuzz_a fuzz_b" to choose)
set -euo pipefail
cd "$(dirname "$0")/../.."
seconds=${1:-45}
jobs=$(nproc)
(( jobs > 2 )) && jobs=2
# Debian's clang-14 package installs clang-14/clang++-14; `clang++` comes
# with the `clang` package.
cxx=$(command -v clang++ || command -v clang++-14 || true)
cc=$(command -v clang || command -v clang-14 || true)
if [[ -z $cxx || -z $cc ]]; then
  echo "run_fuzz: clang not found (bash sim/scripts/setup_debian.sh --fuzz)" >&2
  exit 1
fi
launcher=()
command -v ccache > /dev/null && launcher=(-DCMAKE_CXX_COMPILER_LAUNCHER=ccache)

build_start=$(date +%s)
# -O1 with line tables: the usual fuzzing build (fast to compile, readable
# stack traces); no NDEBUG, so the CAPGAP_DCHECKs are on.
cmake -S . -B build-fuzz -DCMAKE_BUILD_TYPE=RelWithDebInfo \
  -DCMAKE_CXX_FLAGS_RELWITHDEBINFO="-O1 -gline-tables-only" \
  -DCMAKE_C_FLAGS_RELWITHDEBINFO="-O1 -gline-tables-only" -DCAPGAP_FUZZ=ON \
  -DCAPGAP_BUILD_TESTS=OFF -DCMAKE_C_COMPILER="$cc" -DCMAKE_CXX_COMPILER="$cxx" \
  "${launcher[@]}" > /dev/null
cmake --build build-fuzz -j"$(nproc)" --target fuzz_targets
echo "fuzz build: $(( $(date +%s) - build_start )) s"

# Every target but fuzz_curves_bytes (raw bytes into the HDF5 library, whose
# own crashes on damaged files are not capgap's; see its header), unless
# FUZZ_TARGETS names the targets to run.
targets=()
if [[ -n ${FUZZ_TARGETS:-} ]]; then
  read -r -a targets <<< "$FUZZ_TARGETS"
else
  for src in tests/fuzz/fuzz_*.cc; do
    name=$(basename "$src" .cc)
    [[ $name == fuzz_curves_bytes ]] || targets+=("$name")
  done
fi

run_one() {
  local target=$1 name=${1#fuzz_}
  local corpus=build-fuzz/corpus/$name artifacts=build-fuzz/artifacts/$target
  rm -rf "$corpus" "$artifacts"
  mkdir -p "$corpus" "$artifacts"
  cp tests/fuzz/corpus/"$name"/* "$corpus"/
  # HDF5 keeps library-lifetime allocations (not leaks of ours): leak
  # checking stays on for the text parsers only.
  local leaks=1
  [[ $name == curves* ]] && leaks=0
  ASAN_OPTIONS=detect_leaks=$leaks UBSAN_OPTIONS=print_stacktrace=1 \
    ./build-fuzz/fuzz/"$target" "$corpus" -max_total_time="$seconds" -rss_limit_mb=2048 \
    -timeout=10 -print_final_stats=1 -artifact_prefix="$artifacts"/ \
    > build-fuzz/"$target".log 2>&1
}

failed=()
running=()
declare -A pid_of
for target in "${targets[@]}"; do
  run_one "$target" &
  pid_of[$target]=$!
  running+=("$target")
  if (( ${#running[@]} >= jobs )); then
    wait "${pid_of[${running[0]}]}" || failed+=("${running[0]}")
    running=("${running[@]:1}")
  fi
done
for target in "${running[@]}"; do
  wait "${pid_of[$target]}" || failed+=("$target")
done

for target in "${targets[@]}"; do
  runs=$(grep -o 'stat::number_of_executed_units: *[0-9]*' build-fuzz/"$target".log | grep -o '[0-9]*$' || echo "?")
  echo "$target: $runs executions in ${seconds} s"
done
if (( ${#failed[@]} > 0 )); then
  for target in "${failed[@]}"; do
    echo "FAILED: $target (log build-fuzz/$target.log, inputs in build-fuzz/artifacts/$target/)"
    grep -m5 -E 'ERROR|SUMMARY|Test unit written' build-fuzz/"$target".log || true
  done
  exit 1
fi
echo "fuzz: no crash in ${#targets[@]} targets x ${seconds} s"
