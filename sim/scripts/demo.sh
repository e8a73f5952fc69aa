#!/usr/bin/env bash
# The main job on the demo config: installs what is missing, builds capgap
# (Release), runs configs/demo.ini, writes results/demo.h5, the BER/FER
# figures per scheme group results/demo-{uncoded,coded,shaped,fading}.png
# (+ .svg) with the power-bandwidth chart demo-plane.png and the signal views
# demo-signal.png, the HTML report results/demo.html, and prints the summary
# table.
set -euo pipefail
cd "$(dirname "$0")/../.."
bash sim/scripts/setup_debian.sh
cmake -S . -B build -DCMAKE_BUILD_TYPE=Release -DCAPGAP_BUILD_TESTS=OFF > build-configure.log 2>&1 \
  || { cat build-configure.log; exit 1; }
rm -f build-configure.log
cmake --build build -j"$(nproc)"
mkdir -p results
# The demo always starts fresh: drop a checkpoint an interrupted earlier demo
# may have left (otherwise capgap asks for --resume).
rm -f results/demo.h5.ckpt
./build/capgap run configs/demo.ini -o results/demo.h5 "$@"
# Debian's interpreter has the plotting packages (another python3 on PATH may not).
# More than six schemes in several groups: one BER/FER figure per group
# (demo-uncoded.png, demo-coded.png, demo-shaped.png, demo-fading.png).
/usr/bin/python3 analysis/plot_curves.py results/demo.h5 -o results/demo.png
./build/capgap report results/demo.h5 -o results/demo.html
echo "plots: results/demo-uncoded.png, -coded, -shaped, -fading (BER/FER per group),"
echo "       results/demo-plane.png (power-bandwidth plane), results/demo-signal.png"
echo "       (spectrum, eye, constellation); SVG beside each"
echo "report: results/demo.html (one self-contained file: tables, figures, details)"
