#!/usr/bin/env bash
# Hostile-input probe (issue 17): re-runs the probe classes through the real
# binary as a careful user and a hostile file would, and checks each case's
# exact exit status, that the message names the key, option or object, that
# it is one short escaped line, and that nothing is written and previous
# outputs stay byte-identical (every regular file in the case directory is
# hashed before and after; a case that must save a checkpoint names it).
#
# Classes: bad configs and options; configs, matrices, base matrices,
# checkpoints and curves files that are directories, FIFOs, /dev/zero or
# links to it; -o edge cases; integer and number edge cases; repeated
# sections; corrupted checkpoints (damaged, truncated, impossible counts with
# a valid checksum); absurd LDPC sizes; theory with nan/inf/1e-300 and
# conflicting option groups; summary on malformed HDF5 layouts built with
# h5py; SIGTERM during a code's construction and during a long unit.
#
# Usage: tests/hostile/probe.sh CAPGAP_BINARY [PYTHON]
#   PYTHON (default /usr/bin/python3) needs h5py and numpy for the summary
#   cases; without them those cases are skipped with a message.
# PROBE_VERBOSE=1 also prints each case's status and message.
# Prints one line per case and "probe: N cases, P passed, S skipped"; exits 1
# when any case fails. Registered as the ctest HostileProbe.
set -u

if [[ $# -lt 1 ]]; then
  echo "usage: $0 CAPGAP_BINARY [PYTHON]" >&2
  exit 2
fi
CAPGAP=$(realpath "$1")
PY=${2:-/usr/bin/python3}
SRC=$(cd "$(dirname "$0")/../.." && pwd)
WORK=$(mktemp -d "${TMPDIR:-/tmp}/capgap_probe.XXXXXX")
trap 'rm -rf "$WORK"' EXIT

tried=0
passed=0
skipped=0
failed_names=()

# ------------------------------------------------------------------ base
# Everything a case may need, copied into a fresh directory per case.
BASE="$WORK/base"
mkdir -p "$BASE/adir"
cat > "$BASE/tiny.ini" <<'EOF'
[sweep]
ebno_db = 0 to 4 by 2
stop_bit_errors = 50
stop_bits = 200000
seed = 5

[scheme.q]
modulation = qpsk
frame_bits = 960
EOF
mkfifo "$BASE/fifo"
ln -s /dev/zero "$BASE/zero_link"
(cd "$BASE" && "$CAPGAP" run tiny.ini -o prev.h5 --quiet > /dev/null 2>&1) || {
  echo "probe: cannot make the reference run with $CAPGAP" >&2
  exit 1
}
cp "$SRC/configs/codes/qc_r1-2_24x12.txt" "$BASE/base.txt"

# Files of a case directory with their hashes (FIFOs and links by name).
snapshot() {
  (cd "$1" && find . -mindepth 1 | LC_ALL=C sort | while read -r f; do
    if [[ -f "$f" && ! -L "$f" ]]; then
      echo "$f $(md5sum < "$f" | cut -c1-32)"
    else
      echo "$f"
    fi
  done)
}

# Fresh case directory (a copy of BASE) in $CASE.
new_case() {
  CASE="$WORK/case$tried"
  rm -rf "$CASE"
  cp -a "$BASE" "$CASE"
}

report() {  # NAME OK(0/1) WHY
  if [[ $2 -eq 0 ]]; then
    passed=$((passed + 1))
    echo "PASS  $1"
  else
    failed_names+=("$1")
    echo "FAIL  $1: $3"
  fi
}

# expect NAME STATUS 'TEXT' [ALLOWED_NEW_FILE] -- COMMAND...
#   Runs COMMAND (capgap's arguments) in a fresh case directory under a 20 s
#   timeout; passes when the status is STATUS, stderr contains TEXT (fixed
#   string), stderr is one line of at most 2000 bytes (an unknown key's
#   message lists the valid keys) with no control bytes,
#   stdout is empty, and the directory is unchanged but for
#   ALLOWED_NEW_FILE. `setup` (a shell function, if set) runs first in the
#   case directory.
setup=""
expect() {
  local name=$1 want=$2 text=$3 allowed=""
  shift 3
  if [[ $1 != "--" ]]; then
    allowed=$1
    shift
  fi
  shift  # --
  tried=$((tried + 1))
  new_case
  if [[ -n $setup ]]; then (cd "$CASE" && $setup) || { report "$name" 1 "setup failed"; setup=""; return; }; fi
  setup=""
  local before after status
  before=$(snapshot "$CASE")
  (cd "$CASE" && timeout -s KILL 20 "$CAPGAP" "$@" > "$WORK/out.txt" 2> "$WORK/err.txt" < /dev/null)
  status=$?
  after=$(snapshot "$CASE")
  if [[ -n $allowed ]]; then after=$(grep -v "^\./$allowed\( \|$\)" <<< "$after"); fi
  local err lines bytes
  err=$(cat "$WORK/err.txt")
  lines=$(wc -l < "$WORK/err.txt")
  bytes=$(wc -c < "$WORK/err.txt")
  if [[ $status -ne $want ]]; then
    report "$name" 1 "status $status, want $want; stderr: ${err:0:300}"
  elif ! grep -qF -- "$text" "$WORK/err.txt"; then
    report "$name" 1 "stderr lacks '$text': ${err:0:300}"
  elif [[ $lines -ne 1 || $bytes -gt 2000 ]]; then
    report "$name" 1 "stderr is $lines line(s), $bytes bytes: ${err:0:300}"
  elif LC_ALL=C grep -q '[[:cntrl:]]' <(tr -d '\n' < "$WORK/err.txt"); then
    report "$name" 1 "stderr holds control bytes"
  elif [[ -s "$WORK/out.txt" ]]; then
    report "$name" 1 "stdout not empty: $(head -c 200 "$WORK/out.txt")"
  elif [[ "$before" != "$after" ]]; then
    report "$name" 1 "files changed: $(diff <(echo "$before") <(echo "$after") | grep '^[<>]' | head -5 | tr '\n' ' ')"
  else
    report "$name" 0 ""
  fi
  if [[ -n ${PROBE_VERBOSE:-} ]]; then echo "      [$status] $(head -c 300 "$WORK/err.txt")"; fi
}

# ckpt_edit FILE 'PYTHON on body (bytes before the checksum line)': edits a
# checkpoint and writes it back with a valid checksum (FNV-1a 64 of the
# body, blocks/core/hash.h).
ckpt_edit() { "$PY" - "$1" "$2" <<'EOF'
import re, sys
p = sys.argv[1]
text = open(p, 'rb').read()
body = text[:text.rindex(b'checksum ')]
exec(sys.argv[2])
h = 0xcbf29ce484222325
for c in body:
    h = ((h ^ c) * 0x100000001b3) & 0xFFFFFFFFFFFFFFFF
open(p, 'wb').write(body + b'checksum %016x\n' % h)
EOF
}

# ------------------------------------------------------- configs, options
expect "config is a directory" 1 "adir: is a directory, not a config file" -- run adir
expect "config is /dev/zero" 1 "/dev/zero: is not a regular file (a character device)" -- run /dev/zero
expect "config is a link to /dev/zero" 1 "zero_link: is not a regular file (a character device)" -- run zero_link
expect "config is a FIFO (no block)" 1 "fifo: is not a regular file (a FIFO)" -- run fifo
big_config() { truncate -s 200M big.ini; }
setup=big_config
expect "config over the size limit (sparse 200 MB)" 1 "big.ini" -- run big.ini -o x.h5
expect "config missing" 1 "nosuch.ini: cannot open config file" -- run nosuch.ini
expect "bad value names key, value and rule" 1 \
  "tiny.ini: scheme.q.frame_bits = '0': must be an integer in [1, 16777216]" -- \
  run tiny.ini -o x.h5 --set scheme.q.frame_bits=0
expect "unknown key is named" 1 "scheme.q.frame_bitz" -- run tiny.ini -o x.h5 --set scheme.q.frame_bitz=3
repeated_sweep() { printf '[sweep]\nseed = 3\n' >> tiny.ini; }
setup=repeated_sweep
expect "repeated [sweep] section" 1 "[sweep]" -- run tiny.ini -o x.h5
repeated_scheme() { printf '[scheme.q]\nframe_bits = 480\n' >> tiny.ini; }
setup=repeated_scheme
expect "repeated [scheme.q] section" 1 "[scheme.q]" -- run tiny.ini -o x.h5
repeated_key() { printf 'frame_bits = 480\n' >> tiny.ini; }
setup=repeated_key
expect "repeated key" 1 "frame_bits" -- run tiny.ini -o x.h5
huge_value() { { printf '[sweep]\nebno_db = '; head -c 4000000 /dev/zero | tr '\0' 'x'; printf '\n[scheme.q]\nmodulation = qpsk\n'; } > huge.ini; }
setup=huge_value
expect "4 MB value is shortened (one short line)" 1 "sweep.ebno_db = 'xxxx" -- run huge.ini -o x.h5
huge_file() { { printf '[sweep]\nebno_db = '; head -c 10000000 /dev/zero | tr '\0' 'x'; printf '\n'; } > huge.ini; }
setup=huge_file
expect "10 MB config refused by its size" 1 "a config file may have at most 4194304 bytes" -- run huge.ini -o x.h5
expect "100 kB --set value is shortened" 1 "sweep.seed = '1111" -- \
  run tiny.ini -o x.h5 --set "sweep.seed=$(head -c 100000 /dev/zero | tr '\0' '1')"
binary_value() { printf '[sweep]\nebno_db = \001\002\033[31m\377\n[scheme.q]\nmodulation = qpsk\n' > bin.ini; }
setup=binary_value
expect "binary value is escaped" 1 "sweep.ebno_db = '\\x01\\x02\\x1B[31m\\xFF'" -- run bin.ini -o x.h5

# Integers and numbers.
expect "seed 2^64 overflows, named" 1 \
  "sweep.seed = '18446744073709551616': exceeds 18446744073709551615" -- \
  run tiny.ini -o x.h5 --set sweep.seed=18446744073709551616
expect "hex Eb/N0 refused" 1 "sweep.ebno_db = '0x10': not a decimal number (no hexadecimal)" -- \
  run tiny.ini -o x.h5 --set sweep.ebno_db=0x10
expect "exponent in an integer refused" 1 "sweep.stop_bit_errors = '1e3': not an integer" -- \
  run tiny.ini -o x.h5 --set sweep.stop_bit_errors=1e3
expect "negative integer refused" 1 "sweep.stop_bits = '-5'" -- run tiny.ini -o x.h5 --set sweep.stop_bits=-5
expect "nan Eb/N0 refused" 1 "sweep.ebno_db = 'nan'" -- run tiny.ini -o x.h5 --set sweep.ebno_db=nan
expect "--seed 2^64 is a usage error naming --seed" 2 \
  "run: --seed = '18446744073709551616': must be an integer in [0, 18446744073709551615]" -- \
  run tiny.ini -o x.h5 --seed 18446744073709551616
expect "--seed with letters names --seed" 2 "run: --seed = '12abc'" -- run tiny.ini -o x.h5 --seed 12abc
expect "--threads -1 names --threads (2)" 2 "run: --threads = -1: must be an integer in [0, 4096]" -- \
  run tiny.ini -o x.h5 --threads -1
expect "--threads 100000 names --threads (2)" 2 "run: --threads = 100000: must be an integer in [0, 4096]" -- \
  run tiny.ini -o x.h5 --threads 100000
expect "--set without = is a usage error (2)" 2 "run: --set 'sweep.seed': expected KEY=VALUE" -- \
  run tiny.ini -o x.h5 --set sweep.seed
expect "unknown option is a usage error" 2 "--frobnicate" -- run tiny.ini --frobnicate

# -o edge cases: checked before the first unit, nothing written.
expect "-o '' refused" 2 "run: -o '': must name the output file" -- run tiny.ini -o ''
expect "-o DIR/ refused" 2 "run: -o 'adir/': ends in '/'" -- run tiny.ini -o adir/
expect "-o existing directory refused, no DIR.ckpt" 1 "run: -o 'adir': is a directory" -- run tiny.ini -o adir
expect "-o in a missing directory refused" 1 "directory 'nodir' does not exist" -- run tiny.ini -o nodir/x.h5
unfinished() { ckpt_edit prev.h5.ckpt "body = body.replace(b'state complete', b'state running')"; }
setup=unfinished
expect "plain run over an unfinished run's checkpoint refuses" 1 "holds an unfinished run" -- run tiny.ini -o prev.h5

# ------------------------------------------------- matrices, LDPC sizes
ldpc_ini() {  # FILE construction-lines...
  local f=$1
  shift
  { printf '[sweep]\nebno_db = 1\n\n[scheme.l]\nmodulation = bpsk\ncode = ldpc\n'; printf '%s\n' "$@"; } > "$f"
}
m_zero() { ldpc_ini l.ini "construction = file" "matrix_file = /dev/zero"; }
setup=m_zero
expect "matrix_file = /dev/zero" 1 "/dev/zero: is not a regular file (a character device)" -- run l.ini -o x.h5
m_fifo() { ldpc_ini l.ini "construction = file" "matrix_file = fifo"; }
setup=m_fifo
expect "matrix_file = FIFO (no block)" 1 "fifo: is not a regular file (a FIFO)" -- run l.ini -o x.h5
m_dir() { ldpc_ini l.ini "construction = file" "matrix_file = adir"; }
setup=m_dir
expect "matrix_file = directory" 1 "adir: is a directory, not a matrix file" -- run l.ini -o x.h5
m_huge() {
  printf 'parity-check columns 1048576 rows 524288\n-\n' > h.txt
  ldpc_ini l.ini "construction = file" "matrix_file = h.txt"
}
setup=m_huge
expect "matrix header n = 2^20 refused before allocating" 1 "h.txt" -- run l.ini -o x.h5
m_valid_huge() {
  # A well-formed matrix of n = 2^20 (8.4 MB of text, under the 64 MiB
  # limit): read, then refused by the memory estimate before the encoder's
  # dense elimination matrix (64 GiB) is made.
  "$PY" -c "
m = 524288
with open('big.txt', 'w') as f:
    f.write('parity-check columns %d rows %d\\n' % (2 * m, m))
    f.writelines('%d %d\\n' % (2 * r, 2 * r + 1) for r in range(m))"
  ldpc_ini l.ini "construction = file" "matrix_file = big.txt"
}
setup=m_valid_huge
expect "well-formed matrix file with n = 2^20 refused by memory_limit_mb" 1 \
  "over scheme.l.memory_limit_mb = 4096" -- run l.ini -o x.h5 --threads 1
b_dir() { ldpc_ini l.ini "construction = qc" "base_matrix = adir"; }
setup=b_dir
expect "base_matrix = directory" 1 "adir: is a directory, not a base matrix file" -- run l.ini -o x.h5
b_zero() { ldpc_ini l.ini "construction = qc" "base_matrix = zero_link"; }
setup=b_zero
expect "base_matrix = link to /dev/zero" 1 "zero_link: is not a regular file (a character device)" -- run l.ini -o x.h5
b_huge() {
  printf 'rows 100000 cols 2000000 lifting 65536\n' > hb.txt
  ldpc_ini l.ini "construction = qc" "base_matrix = hb.txt"
}
setup=b_huge
expect "QC header 100000 x 2000000 x 65536 refused" 1 "hb.txt" -- run l.ini -o x.h5
p_huge() { ldpc_ini l.ini "length = 1048576"; }
setup=p_huge
expect "PEG length 2^20 refused by its rule" 1 "scheme.l.length = '1048576': must be an integer in" -- run l.ini -o x.h5
p_mem() { ldpc_ini l.ini "length = 32768" "memory_limit_mb = 16"; }
setup=p_mem
expect "PEG over memory_limit_mb refused before construction" 1 "over scheme.l.memory_limit_mb = 16" -- \
  run l.ini -o x.h5 --threads 1

# ------------------------------------------------------------ checkpoints
# A checkpoint of a finished run, then damaged in several ways; --resume
# must refuse it and leave every file as it was.
flip_byte() { "$PY" - prev.h5.ckpt <<'EOF'
import sys
p = sys.argv[1]
b = bytearray(open(p, 'rb').read())
i = b.index(b'bit_errors=') + 11
b[i] = ord('9') if b[i] != ord('9') else ord('8')
open(p, 'wb').write(b)
EOF
}
setup=flip_byte
expect "damaged checkpoint (checksum)" 1 "prev.h5.ckpt: checksum mismatch (file damaged)" -- run tiny.ini -o prev.h5 --resume
truncate_ckpt() { truncate -s 300 prev.h5.ckpt; }
setup=truncate_ckpt
expect "truncated checkpoint" 1 "prev.h5.ckpt: truncated checkpoint" -- run tiny.ini -o prev.h5 --resume
impossible_counts() {
  # bit_errors > bits on the first point; frames and units untouched.
  ckpt_edit prev.h5.ckpt "body = re.sub(rb'bits=(\d+) bit_errors=\d+', lambda m: b'bits=' + m.group(1) + b' bit_errors=' + str(int(m.group(1)) + 1).encode(), body, count=1)"
}
setup=impossible_counts
expect "valid checksum, bit_errors > bits" 1 "bit_errors" -- run tiny.ini -o prev.h5 --resume
ckpt_zero() { rm prev.h5.ckpt; ln -s /dev/zero prev.h5.ckpt; }
setup=ckpt_zero
expect "checkpoint is a link to /dev/zero" 1 "prev.h5.ckpt: is not a regular file (a character device)" -- \
  run tiny.ini -o prev.h5 --resume
ckpt_fifo() { rm prev.h5.ckpt; mkfifo prev.h5.ckpt; }
setup=ckpt_fifo
expect "checkpoint is a FIFO (no block)" 1 "prev.h5.ckpt: is not a regular file (a FIFO)" -- \
  run tiny.ini -o prev.h5 --resume
ckpt_dir() { rm prev.h5.ckpt; mkdir prev.h5.ckpt; }
setup=ckpt_dir
expect "checkpoint is a directory" 1 "prev.h5.ckpt: is a directory" -- run tiny.ini -o prev.h5 --resume
changed_seed() { :; }
setup=changed_seed
expect "resume with a changed seed names sweep.seed" 1 "sweep.seed changed from 5 to 6" -- \
  run tiny.ini -o prev.h5 --resume --seed 6

# ----------------------------------------------------------------- theory
expect "theory --snr-db nan" 2 "theory: --snr-db = nan: must be a number in [-100, 100] dB" -- \
  theory --bandwidth 1e6 --snr-db nan
expect "theory --snr-db inf" 2 "theory: --snr-db = inf" -- theory --bandwidth 1e6 --snr-db inf
expect "theory --snr-db 1e308" 2 "theory: --snr-db = 1e+308" -- theory --bandwidth 1e6 --snr-db 1e308
expect "theory --bandwidth nan" 2 "theory: --bandwidth = nan" -- theory --bandwidth nan --snr-db 3
expect "theory --bandwidth 0" 2 "theory: --bandwidth = 0" -- theory --bandwidth 0 --snr-db 3
expect "theory --rate 1e-300" 2 "theory: --rate = 1e-300: must be a number in [1e-06, 1]" -- \
  theory --modulation qpsk --ebno-db 0 to 3 by 1 --rate 1e-300
expect "theory --ebno-db nan" 2 "theory: --ebno-db = 'nan'" -- theory --modulation qpsk --ebno-db nan
expect "theory conflicting groups (--modulation with --bandwidth)" 2 "cannot be combined" -- \
  theory --bandwidth 1e6 --snr-db 10 --modulation qpsk
expect "theory conflicting groups (--ebno-db with --snr-db)" 2 "cannot be combined" -- \
  theory --ebno-db 0 to 3 by 1 --snr-db 3
expect "theory half a group" 2 "--bandwidth and --snr-db go together" -- theory --snr-db 3

# ---------------------------------------------------------------- summary
expect "summary of a directory" 1 "adir: is a directory, not a curves file" -- summary adir
expect "summary of /dev/zero" 1 "/dev/zero: is not a regular file (a character device)" -- summary /dev/zero
expect "summary of a FIFO (no block)" 1 "fifo: is not a regular file (a FIFO)" -- summary fifo
expect "summary of a config file" 1 "tiny.ini" -- summary tiny.ini
if "$PY" -c 'import h5py, numpy' 2> /dev/null; then
  # h5_edit 'PYTHON STATEMENTS on f (prev.h5 opened r+), np'
  h5_edit() { "$PY" -c "import h5py, numpy as np
f = h5py.File('prev.h5', 'r+')
$1
f.close()"; }
  s_ebno2d() { h5_edit "n = f['q/ebno_db'].shape[0]; del f['q/ebno_db']; f['q/ebno_db'] = np.zeros((n, 2))"; }
  setup=s_ebno2d
  expect "summary: 2-D ebno_db is named" 1 "/q/ebno_db" -- summary prev.h5
  s_bits2d() { h5_edit "n = f['q/bits'].shape[0]; del f['q/bits']; f['q/bits'] = np.ones((n, 3), dtype=np.uint64)"; }
  setup=s_bits2d
  expect "summary: 2-D bits is named" 1 "/q/bits" -- summary prev.h5
  s_attr() { h5_edit "f['q'].attrs['code_rate'] = np.ones(1000)"; }
  setup=s_attr
  expect "summary: array attribute code_rate is named" 1 "code_rate" -- summary prev.h5
  s_short() { h5_edit "del f['q/bits']; f['q/bits'] = np.ones(1, dtype=np.uint64)"; }
  setup=s_short
  expect "summary: bits of 1 entry against 3 points" 1 "/q/bits" -- summary prev.h5
  s_million() { h5_edit "del f['q/ebno_db']; f['q/ebno_db'] = np.arange(1000000.0)"; }
  setup=s_million
  expect "summary: ebno_db with 10^6 entries" 1 "/q/ebno_db" -- summary prev.h5
  s_errors() { h5_edit "b = f['q/bits'][...]; f['q/bit_errors'][...] = b + 1"; }
  setup=s_errors
  expect "summary: bit_errors > bits" 1 "bit_errors" -- summary prev.h5
  s_type() { h5_edit "n = f['q/bits'].shape[0]; del f['q/bits']; f['q/bits'] = np.array([b'x'] * n)"; }
  setup=s_type
  expect "summary: bits stored as strings" 1 "/q/bits" -- summary prev.h5
  s_missing() { h5_edit "del f['q/frames']"; }
  setup=s_missing
  expect "summary: missing dataset is named" 1 "/q/frames" -- summary prev.h5
  s_group() { h5_edit "del f['q']"; }
  setup=s_group
  expect "summary: scheme listed but missing" 1 "q" -- summary prev.h5
else
  echo "SKIP  summary HDF5 layout cases: $PY has no h5py/numpy"
  skipped=$((skipped + 9))
fi

# ---------------------------------------------------------------- signals
# sigterm_case NAME CONFIG_SETUP WAIT_FOR
#   Starts `capgap run l.ini -o x.h5 --threads 1 --quiet`, waits for
#   WAIT_FOR (ckpt: the session's first checkpoint; else seconds), sends
#   SIGTERM and wants status 75 within 2 s, no curves file, a checkpoint.
sigterm_case() {
  local name=$1 setup_fn=$2 wait_for=$3
  tried=$((tried + 1))
  new_case
  (cd "$CASE" && $setup_fn)
  (cd "$CASE" && exec "$CAPGAP" run l.ini -o x.h5 --threads 1 --quiet > "$WORK/err.txt" 2>&1) &
  local pid=$! t0
  if [[ $wait_for == ckpt ]]; then
    for _ in $(seq 1 3000); do
      [[ -s "$CASE/x.h5.ckpt" ]] && break
      sleep 0.01
    done
    sleep 0.5
  else
    sleep "$wait_for"
  fi
  if ! kill -0 "$pid" 2> /dev/null; then
    wait "$pid"
    report "$name" 1 "exited before the signal: $(head -c 300 "$WORK/err.txt")"
    return
  fi
  t0=$(date +%s.%N)
  kill -TERM "$pid"
  local status waited=0
  while kill -0 "$pid" 2> /dev/null && [[ $waited -lt 3000 ]]; do
    sleep 0.01
    waited=$((waited + 1))
  done
  local dt
  dt=$(printf '%.3f' "$(echo "$(date +%s.%N) - $t0" | bc)")
  if kill -0 "$pid" 2> /dev/null; then kill -KILL "$pid"; fi
  wait "$pid"
  status=$?
  if [[ $status -ne 75 ]]; then
    report "$name" 1 "status $status, want 75: $(head -c 300 "$WORK/err.txt")"
  elif (($(echo "$dt >= 2.0" | bc))); then
    report "$name" 1 "took $dt s (want < 2 s)"
  elif [[ -e "$CASE/x.h5" || ! -s "$CASE/x.h5.ckpt" ]]; then
    report "$name" 1 "want a checkpoint and no curves file"
  elif ! grep -qF "checkpoint x.h5.ckpt saved" "$WORK/err.txt"; then
    report "$name" 1 "message lacks 'checkpoint x.h5.ckpt saved': $(head -c 300 "$WORK/err.txt")"
  else
    report "$name ($dt s)" 0 ""
  fi
}
peg_16k() { ldpc_ini l.ini "length = 16384"; }
sigterm_case "SIGTERM during PEG construction (n = 16384)" peg_16k 1
long_unit() {
  printf '[sweep]\nebno_db = 2\nstop_bit_errors = 1000000\nstop_bits = 1000000000\nseed = 1\n\n[scheme.k9]\nmodulation = bpsk\ncode = conv\ngenerators = 561,753\nconstraint_length = 9\ndecoder = bcjr\nframe_bits = 1000\nunit_frames = 100000\n' > l.ini
}
sigterm_case "SIGTERM inside a unit of 10^5 BCJR frames" long_unit ckpt

echo "probe: $tried cases, $passed passed, ${#failed_names[@]} failed, $skipped skipped"
if [[ ${#failed_names[@]} -gt 0 ]]; then
  printf 'failed: %s\n' "${failed_names[@]}"
  exit 1
fi
exit 0
