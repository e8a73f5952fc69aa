#!/usr/bin/env bash
# Installs the Debian 12 packages capgap needs to build, test and plot, and
# says which ones it installs. Safe to re-run: present packages are skipped.
# Usage: bash sim/scripts/setup_debian.sh [--mpi | --fuzz | --browser]
set -euo pipefail

packages=(
  build-essential cmake pkg-config git
  libeigen3-dev libfftw3-dev libhdf5-dev
  libboost-program-options-dev libboost-random-dev libboost-math-dev
  libgtest-dev libgmock-dev libbenchmark-dev libhwy-dev
  python3 python3-numpy python3-matplotlib python3-h5py python3-scipy
)
if [[ "${1:-}" == "--mpi" ]]; then
  packages+=(openmpi-bin libopenmpi-dev)
fi
# The fuzz targets (tests/fuzz): clang with libFuzzer and the sanitizer runtimes.
if [[ "${1:-}" == "--fuzz" ]]; then
  packages+=(clang-14 libclang-rt-14-dev)
fi

# The browser test of `capgap report` (tests/python/check_report_browser.py):
# Debian's chromium, run headless.
if [[ "${1:-}" == "--browser" ]]; then
  packages+=(chromium)
fi

missing=()
for p in "${packages[@]}"; do
  if ! dpkg-query -W -f='${Status}' "$p" 2>/dev/null | grep -q "install ok installed"; then
    missing+=("$p")
  fi
done

if [[ ${#missing[@]} -eq 0 ]]; then
  echo "setup: all ${#packages[@]} Debian packages already installed"
  exit 0
fi

echo "setup: installing ${#missing[@]} Debian package(s): ${missing[*]}"
SUDO=""
if [[ $(id -u) -ne 0 ]]; then
  if command -v sudo >/dev/null; then SUDO="sudo"; else
    echo "setup: not root and no sudo; install as root: apt-get install ${missing[*]}" >&2
    exit 1
  fi
fi
export DEBIAN_FRONTEND=noninteractive
$SUDO apt-get update -qq
$SUDO apt-get install -y -qq --no-install-recommends "${missing[@]}"
echo "setup: done"
