#!/usr/bin/env bash
# The test suite: installs what is missing, builds capgap with tests
# (Release), and runs every test through ctest. Extra arguments go to ctest.
set -euo pipefail
cd "$(dirname "$0")/../.."
bash sim/scripts/setup_debian.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release -DCAPGAP_BUILD_TESTS=ON -DCAPGAP_WERROR=ON
cmake --build build -j"$(nproc)"
ctest --test-dir build --output-on-failure -j"$(nproc)" "$@"
