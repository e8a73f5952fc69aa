#!/usr/bin/env bash
# Same-run speed comparison of two capgap builds (e.g. an old revision and
# today's main) on fixed-work configs.
#
# Usage:
#   tests/bench/compare_revisions.sh [-n ROUNDS] [-t THREADS] [-s KEY=VALUE]... [-k DIR]
#                                    OLD_CAPGAP NEW_CAPGAP CONFIG...
#
#   -n ROUNDS   rounds (default 7); each round runs every config once with each
#               binary, old first in odd rounds and new first in even rounds, so
#               slow drift of the machine's load hits both builds alike
#   -t THREADS  worker threads per run (default 1)
#   -s KEY=VAL  passed to both binaries as --set KEY=VAL (repeatable); only keys
#               both revisions know (sweep.stop_bits, sweep.ebno_db, ...)
#   -k DIR      keep the HDF5 files and the raw table in DIR (default: a temp
#               directory, removed at the end)
#
# The configs should do fixed work: one Eb/N0 point, stop_bit_errors out of reach,
# so both builds simulate the same stop_bits (tests/bench/configs/ holds such
# cases). The script checks that both builds counted the same bits and bit
# errors (same config, same seed).
#
# Time compared: the sweep's CPU time, i.e. the process's user + system time
# (/usr/bin/time) minus the median of 3 baseline runs of the same build and
# config that simulate one frame (--set sweep.stop_bits=1 and unit_frames=1):
# this excludes start-up, code construction, the theory/limit analysis and the
# file write, and unlike wall time it hardly moves when other jobs share the
# cores. Also shown: the ratio of the sweep wall times the runs record in their
# HDF5 files (/<scheme>/seconds), exact on a quiet machine but inflated by
# every other job on a busy one.
#
# Prints per config: the median sweep CPU time of each build, the ratio of
# medians new/old (> 1: new is slower), the median of the per-round ratios
# (paired), the throughput ratio new/old (information bits per CPU second;
# < 1: new is slower), the spread of each build ((max - min) / median) and the
# ratio of the median HDF5 wall times.
# Needs python3 with h5py (PYTHON=/usr/bin/python3 by default).
set -euo pipefail

rounds=7
threads=1
keep=""
sets=()
while getopts "n:t:s:k:h" opt; do
  case $opt in
    n) rounds=$OPTARG ;;
    t) threads=$OPTARG ;;
    s) sets+=(--set "$OPTARG") ;;
    k) keep=$OPTARG ;;
    h) sed -n '2,/^set -euo/p' "$0" | sed '$d; s/^# \{0,1\}//'; exit 0 ;;
    *) exit 2 ;;
  esac
done
shift $((OPTIND - 1))
if [ $# -lt 3 ]; then
  echo "usage: $0 [-n ROUNDS] [-t THREADS] [-s KEY=VALUE]... [-k DIR] OLD_CAPGAP NEW_CAPGAP CONFIG..." >&2
  exit 2
fi
old_bin=$(readlink -f "$1")
new_bin=$(readlink -f "$2")
shift 2
configs=("$@")
python=${PYTHON:-/usr/bin/python3}
"$python" -c 'import h5py' 2>/dev/null || { echo "$python has no h5py" >&2; exit 1; }
for b in "$old_bin" "$new_bin"; do [ -x "$b" ] || { echo "not executable: $b" >&2; exit 1; }; done
for c in "${configs[@]}"; do [ -f "$c" ] || { echo "no such config: $c" >&2; exit 1; }; done

if [ -n "$keep" ]; then
  mkdir -p "$keep"
  out=$(readlink -f "$keep")
else
  out=$(mktemp -d "${TMPDIR:-/tmp}/capgap_compare.XXXXXX")
  trap 'rm -rf "$out"' EXIT
fi
raw=$out/raw.tsv
printf 'config\tbuild\tround\tsweep_seconds\tbits\tbit_errors\twall_seconds\tcpu_seconds\n' > "$raw"
base=$out/baseline.tsv
head -n1 "$raw" > "$base"

# One run: records the HDF5 sweep time, the counts, and the wall and CPU time.
run_one() {  # label binary config round table [extra --set ...]
  local label=$1 bin=$2 cfg=$3 r=$4 table=$5 name h5 times
  shift 5
  name=$(basename "$cfg" .ini)
  h5=$out/$name.$label.$r.h5
  times=$out/time.txt
  if ! /usr/bin/time -o "$times" -f '%e %U %S' "$bin" run "$cfg" --threads "$threads" --quiet \
      "${sets[@]}" "$@" -o "$h5" > "$out/stdout.txt" 2> "$out/stderr.txt"; then
    echo "run failed: $bin run $cfg ${sets[*]}" >&2
    cat "$out/stderr.txt" >&2
    exit 1
  fi
  "$python" - "$h5" "$name" "$label" "$r" "$times" >> "$table" <<'EOF'
import sys, h5py
path, name, label, rnd, times = sys.argv[1:6]
wall, user, system = open(times).read().split()[-3:]
cpu = f"{float(user) + float(system):.2f}"
with h5py.File(path, "r") as f:
    secs = bits = errs = 0
    for g in f.values():
        if isinstance(g, h5py.Group) and "seconds" in g:
            secs += float(g["seconds"][()].sum())
            bits += int(g["bits"][()].sum())
            errs += int(g["bit_errors"][()].sum())
print(f"{name}\t{label}\t{rnd}\t{secs:.6f}\t{bits}\t{errs}\t{wall}\t{cpu}")
EOF
  [ -n "$keep" ] || rm -f "$h5" "$h5.ckpt"
}

echo "old: $old_bin" >&2
echo "new: $new_bin" >&2
echo "rounds: $rounds, threads: $threads, load before: $(cut -d' ' -f1-3 /proc/loadavg)" >&2
# Baselines: one frame per scheme, so only the fixed costs remain.
for ((r = 1; r <= 3; ++r)); do
  for c in "${configs[@]}"; do
    one=(--set sweep.stop_bits=1)
    for s in $(sed -n 's/^[[:space:]]*\[scheme\.\([^]]*\)\].*/\1/p' "$c"); do
      one+=(--set "scheme.$s.unit_frames=1")
    done
    run_one old "$old_bin" "$c" "b$r" "$base" "${one[@]}"
    run_one new "$new_bin" "$c" "b$r" "$base" "${one[@]}"
  done
done
echo "baselines done, load $(cut -d' ' -f1-3 /proc/loadavg)" >&2
for ((r = 1; r <= rounds; ++r)); do
  for c in "${configs[@]}"; do
    if ((r % 2)); then
      run_one old "$old_bin" "$c" "$r" "$raw"; run_one new "$new_bin" "$c" "$r" "$raw"
    else
      run_one new "$new_bin" "$c" "$r" "$raw"; run_one old "$old_bin" "$c" "$r" "$raw"
    fi
  done
  echo "round $r/$rounds done, load $(cut -d' ' -f1-3 /proc/loadavg)" >&2
done
echo "load after: $(cut -d' ' -f1-3 /proc/loadavg)" >&2
if [ -n "$keep" ]; then echo "raw tables: $raw $base" >&2; fi

"$python" - "$raw" "$base" <<'EOF'
import sys, csv, statistics as st
rows = list(csv.DictReader(open(sys.argv[1]), delimiter="\t"))
base = list(csv.DictReader(open(sys.argv[2]), delimiter="\t"))
names = list(dict.fromkeys(r["config"] for r in rows))
fixed = {(n, b): st.median(float(r["cpu_seconds"]) for r in base
                           if r["config"] == n and r["build"] == b)
         for n in names for b in ("old", "new")}
for r in rows:  # sweep CPU time: the process's CPU time less the fixed costs
    r["sweep_cpu"] = max(float(r["cpu_seconds"]) - fixed[(r["config"], r["build"])], 1e-3)
print(f"{'config':<20} {'old s':>7} {'new s':>7} {'new/old':>7} {'paired':>6} "
      f"{'thr n/o':>7} {'spr old':>7} {'spr new':>7} {'wall n/o':>8}  flag")
worst = 0.0
for n in names:
    sel = {b: {int(r["round"]): r for r in rows if r["config"] == n and r["build"] == b}
           for b in ("old", "new")}
    t = {b: [r["sweep_cpu"] for r in sel[b].values()] for b in sel}
    wall = {b: st.median(float(r["sweep_seconds"]) for r in sel[b].values()) for b in sel}
    bits = {b: {int(r["bits"]) for r in sel[b].values()} for b in sel}
    errs = {b: {int(r["bit_errors"]) for r in sel[b].values()} for b in sel}
    note = ""
    if bits["old"] != bits["new"] or errs["old"] != errs["new"]:
        note = f" COUNTS DIFFER old bits {sorted(bits['old'])} errors {sorted(errs['old'])}," \
               f" new bits {sorted(bits['new'])} errors {sorted(errs['new'])}"
    mo, mn = st.median(t["old"]), st.median(t["new"])
    thr = {b: st.median([int(r["bits"]) / r["sweep_cpu"] for r in sel[b].values()]) for b in sel}
    paired = st.median([sel["new"][k]["sweep_cpu"] / sel["old"][k]["sweep_cpu"]
                        for k in sel["old"] if k in sel["new"]])
    spread = {b: (max(t[b]) - min(t[b])) / st.median(t[b]) for b in t}
    ratio = mn / mo
    worst = max(worst, ratio)
    flag = "SLOWER>3%" if ratio > 1.03 else "ok"
    print(f"{n:<20} {mo:7.3f} {mn:7.3f} {ratio:7.3f} {paired:6.3f} {thr['new'] / thr['old']:7.3f} "
          f"{100 * spread['old']:6.1f}% {100 * spread['new']:6.1f}% {wall['new'] / wall['old']:8.3f}"
          f"  {flag}{note}")
print(f"fixed costs (CPU s, old/new): " + ", ".join(
    f"{n} {fixed[(n, 'old')]:.2f}/{fixed[(n, 'new')]:.2f}" for n in names))
print(f"worst ratio of medians new/old: {worst:.3f}")
EOF
