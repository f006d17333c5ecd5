#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Renders screenshots of the workstation on the demo captures under Xvfb. Builds nothing.
#   scripts/screenshots.sh [BUILD_DIR] [SAMPLES_DIR]
# BUILD_DIR defaults to build; SAMPLES_DIR to BUILD_DIR/samples (make them with
# `cmake --build BUILD_DIR --target samples`). Writes docs/screenshots/{weld,phantom,weld-export}.png.
set -euo pipefail
cd "$(dirname "$0")/.."
build=${1:-build}
samples=${2:-$build/samples}
umbra="$build/bin/umbra"
out=docs/screenshots
[ -x "$umbra" ] || { echo "screenshots: $umbra not found (build the 'umbra' target first)" >&2; exit 1; }
[ -f "$samples/weld_coupon.h5" ] || { echo "screenshots: $samples/weld_coupon.h5 missing (cmake --build $build --target samples)" >&2; exit 1; }
command -v xvfb-run >/dev/null || { echo "screenshots: xvfb-run not found (apt-get install xvfb)" >&2; exit 1; }
mkdir -p "$out"
run() { xvfb-run -a -s "-screen 0 1600x1000x24" "$umbra" "$@"; }

# Weld coupon: frame 11 (y = 0 mm) where the fusion-face reflector is, a finer grid, the demo
# annotation (extent box at -6 dB, depth marker, caliper, finding F1), and an exported PNG.
run --demo "$samples" --frame 10 --set grid.step_mm=0.08 --set grid.z_min_mm=0 --set grid.z_max_mm=24 --demo-annotate \
    --screenshot "$out/weld.png" --export "$out/weld-export.png" --timings
# Phantom P-2 (second capture of the demo case), annotated the same way.
if [ -f "$samples/phantom_p2.h5" ]; then
  run --demo "$samples" --capture 1 --demo-annotate --screenshot "$out/phantom.png" --timings
else
  echo "screenshots: $samples/phantom_p2.h5 missing; phantom screenshot skipped" >&2
fi
ls -l "$out"
