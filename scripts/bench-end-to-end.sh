#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# End-to-end speed: wall time of the whole `umbra-cli reconstruct` process (start-up, reading,
# hashing, beamforming, writing the image file) on a 64-element, 2000-sample full matrix and a
# 256 x 256 grid, against a vectorised numpy TFM on the same capture and grid, in the same run.
# Also the start-up time of `umbra-cli --version`. Usage: scripts/bench-end-to-end.sh [BUILD_DIR] [RUNS]
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
runs=${2:-5}
cli="$build/bin/umbra-cli"
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
"$cli" simulate bench/scenes/fmc64_2000.json -o "$work/fmc64.h5" > /dev/null
grid="-19.2:19.05:5:43.25"
# Median wall time (s) of a command over $runs runs.
median() {
  local t=()
  for _ in $(seq "$runs"); do
    local s e
    s=$(date +%s%N)
    "$@" > /dev/null
    e=$(date +%s%N)
    t+=($(( e - s )))
  done
  printf '%s\n' "${t[@]}" | sort -n | awk '{a[NR]=$1} END {printf "%.4f", a[int((NR+1)/2)] / 1e9}'
}
step=0.15
start=$(median "$cli" --version)
umbra=$(median "$cli" reconstruct "$work/fmc64.h5" -o "$work/out.image.h5" --grid-mm "$grid:$step")
numpy=$(median /usr/bin/python3 scripts/bench/numpy_tfm.py "$work/fmc64.h5" -19.2 19.05 5 43.25 256)
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg)"
echo "umbra-cli --version:              ${start} s"
echo "umbra-cli reconstruct (256 x 256): ${umbra} s (whole process)"
echo "numpy TFM peer (256 x 256):        ${numpy} s"
awk -v a="$numpy" -v b="$umbra" 'BEGIN {printf "ratio numpy / umbra-cli:           %.0fx\n", a / b}'
"$cli" reconstruct "$work/fmc64.h5" -o "$work/out.image.h5" --grid-mm "$grid:$step" --timings
