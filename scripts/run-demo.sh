#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Installs what is needed, builds, generates the synthetic demo captures, then:
#  - with a display: opens the workstation on the demo case;
#  - without one: reconstructs every demo capture and writes images to out/demo/.
set -euo pipefail
cd "$(dirname "$0")/.."
scripts/install-deps.sh
scripts/build.sh
cmake --build build --target samples -j"$(nproc)"
if [ -n "${DISPLAY:-}${WAYLAND_DISPLAY:-}" ] && [ -x build/bin/umbra ]; then
  echo "run-demo: opening the workstation on the demo case"
  exec build/bin/umbra --demo build/samples
fi
out=out/demo
mkdir -p "$out"
echo "run-demo: no display; reconstructing the demo captures into $out/"
for cap in weld_coupon reference_block phantom_p2 phantom_p2_cine practice_set_a practice_set_b practice_set_c; do
  [ -f "build/samples/$cap.h5" ] || { echo "run-demo: build/samples/$cap.h5 is missing" >&2; exit 1; }
  build/bin/umbra-cli reconstruct "build/samples/$cap.h5" -o "$out/$cap.image.h5" --png "$out/$cap.png" --frames all --timings
done
# The one-sided shear-wave inspection of the weld through a wedge, in its direct and skip views.
for view in T-T TT-T TT-TT; do
  build/bin/umbra-cli reconstruct build/samples/weld_coupon_wedge.h5 -o "$out/weld_coupon_wedge_$view.image.h5" \
    --png "$out/weld_coupon_wedge_$view.png" --set delay_model.mode=$view --timings
done
echo "run-demo: images written to $(cd "$out" && pwd)"
ls -1 "$out"
