#!/usr/bin/env bash
# SPDX-License-Identifier: MIT
# Renders screenshots of the workstation on the demo cases under Xvfb, at the default window size
# (1480 x 920). Builds nothing.
#   scripts/screenshots.sh [BUILD_DIR] [SAMPLES_DIR]
# BUILD_DIR defaults to build; SAMPLES_DIR to BUILD_DIR/samples (make them with
# `cmake --build BUILD_DIR --target samples`). Writes docs/screenshots/{weld,phantom,weld-export,weld-export-light,report-page,dac,practice-result,practice-progress,dicom}.png.
# umbra writes each PNG under a temporary name and renames it; this script then checks that every
# PNG decodes completely (Debian's python3 + zlib) and fails loudly if one does not.
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
# Each run gets its own X server number (-a) and its own settings/data folders, so runs never
# share state (auto-save recovery, window geometry) with each other or with the user.
run() {
  local home; home=$(mktemp -d)
  XDG_CONFIG_HOME="$home/config" XDG_DATA_HOME="$home/data" xvfb-run -a -s "-screen 0 1600x1000x24" "$umbra" "$@"
  rm -rf "$home"
}
weld_set=(--set grid.step_mm=0.08 --set grid.z_min_mm=0 --set grid.z_max_mm=24)

# Weld coupon, frame 11 (y = 0 mm) where the fusion-face reflector is, a finer grid. With the
# reference block present, the distance-amplitude curve is first read from its four side-drilled
# holes (same --set values), then the demo annotation: -6 dB sizing and caliper on the flaw, finding F1.
ref=()
[ -f "$samples/reference_block.h5" ] && ref=(--demo-reference)
run --demo "$samples" --frame 10 "${weld_set[@]}" "${ref[@]}" --demo-annotate \
    --screenshot "$out/weld.png" --export "$out/weld-export.png" --timings --timeout 240
# The same view exported in the light (print) theme, and the PDF report of the case; its first
# pages rendered with poppler's pdftoppm (report-page.png: the annotated image and the top view).
run --demo "$samples" --frame 10 "${weld_set[@]}" "${ref[@]}" --demo-annotate \
    --screenshot "$(mktemp -d)/weld.png" --export "$out/weld-export-light.png" --theme light \
    --report "$out/../weld-report.pdf.tmp" --timeout 240
if command -v pdftoppm >/dev/null; then
  pdftoppm -r 80 -f 3 -l 3 -png -singlefile "$out/../weld-report.pdf.tmp" "$out/report-page"
fi
rm -f "$out/../weld-report.pdf.tmp"
# The weld seen from a shear-wave wedge: TT-TT large with the weld overlay, T-T, TT-T and T-TT in
# the views strip, tip sizing of the lack of fusion (box from the scene's truth, samples/weld_coupon_wedge.json).
if [ -f "$samples/weld_coupon_wedge.h5" ]; then
  run --demo "$samples" --demo-case wedge --demo-measurement "tip sizing;lack of fusion;-37,8;-31,14" \
      --screenshot "$out/wedge-views.png" --export "$out/wedge-export.png" --timeout 240
else
  echo "screenshots: $samples/weld_coupon_wedge.h5 missing; wedge screenshots skipped" >&2
fi
# The Phantom P-2 demo case (its own case: no weld case text), an ellipse on the 6 mm anechoic
# cyst at (-8, 25) mm (position from samples/phantom_p2.json) and a finding from it.
if [ -f "$samples/phantom_p2.h5" ]; then
  run --demo "$samples" --demo-case phantom --demo-ellipse=-8,25,3.2,3.2 --screenshot "$out/phantom.png" --timings --timeout 240
else
  echo "screenshots: $samples/phantom_p2.h5 missing; phantom screenshot skipped" >&2
fi
# The reference block on its own: the curve from its four holes and the TCG made from it.
if [ -f "$samples/reference_block.h5" ]; then
  run "$samples/reference_block.h5" --demo-reference --demo-tcg --screenshot "$out/dac.png" --timeout 240
fi
# Practice set C: four attempts by one trainee (one practice log, kept in a private data folder
# across the runs), each placing calipers and an ellipse and submitting; the last one is shot
# with its results, and the progress view (Bland-Altman of measured - true, error per structure).
if [ -f "$samples/practice_set_c.h5" ]; then
  phome=$(mktemp -d)
  practice() {
    XDG_CONFIG_HOME="$phome/config" XDG_DATA_HOME="$phome/data" xvfb-run -a -s "-screen 0 1600x1000x24" "$umbra" \
      --practice "$samples/practice_set_c.h5" --trainee "Trainee A" --demo-submit --timeout 240 "$@"
  }
  attempt() {  # nodule C1, cyst C2, vessel C3 (across), lesion C4 (ellipse), vessel C3 (along): positions in mm
    local m=(--demo-measurement "caliper;nodule C1;$1,11;$2,11" --demo-measurement "caliper;cyst C2;$3,16;$4,16"
             --demo-measurement "caliper;vessel C3;-10,$5;-10,$6" --demo-measurement "ellipse;lesion C4;9,32;$7;$8"
             --demo-measurement "caliper;vessel C3;$9,26;${10},26")
    shift 10
    practice --screenshot "$phome/attempt.png" "${m[@]}" "$@"
  }
  attempt 3.0 9.1 -13.9 -10.0 23.5 28.6 15.2,35.6 7.0,35.6 -17.0 -2.5
  attempt 3.3 8.9 -13.6 -10.3 23.8 28.3 14.6,35.2 7.1,35.3 -17.5 -2.3
  attempt 3.5 8.6 -13.5 -10.5 24.0 28.1 14.3,35.1 7.2,35.1 -17.8 -2.2
  attempt 3.45 8.5 -13.5 -10.45 24.0 28.05 14.25,35.05 7.2,35.05 -17.8 -2.1 \
    --progress-screenshot "$out/practice-progress.png"
  mv "$phome/attempt.png" "$out/practice-result.png"
  rm -rf "$phome"
else
  echo "screenshots: $samples/practice_set_c.h5 missing; practice screenshots skipped" >&2
fi
# A stored DICOM frame: the phantom reconstructed, exported as DICOM and reopened, with a caliper
# across the 6 mm cyst at (-8, 25) mm, i.e. from x = -11 to -5 mm at 25 mm depth (pixels from the
# exported file's ultrasound region, read with pydicom).
if [ -f "$samples/phantom_p2.h5" ]; then
  tmpd=$(mktemp -d)
  "$build/bin/umbra-cli" reconstruct "$samples/phantom_p2.h5" -o "$tmpd/phantom.h5" >/dev/null
  "$build/bin/umbra-cli" export-dicom "$tmpd/phantom.h5" -o "$tmpd/phantom_p2.dcm" --capture "$samples/phantom_p2.h5" \
      --part "Phantom P-2" --quiet
  cal=$(/usr/bin/python3 - "$tmpd/phantom_p2.dcm" <<'PY'
import sys, pydicom
r = pydicom.dcmread(sys.argv[1]).SequenceOfUltrasoundRegions[0]
col = lambda x_mm: round((x_mm / 10 - r.ReferencePixelPhysicalValueX) / r.PhysicalDeltaX)
row = round((2.5 - r.ReferencePixelPhysicalValueY) / r.PhysicalDeltaY)
print(f"{col(-11)},{row},{col(-5)},{row}")
PY
)
  run "$tmpd/phantom_p2.dcm" --stored-caliper "$cal" --screenshot "$out/dicom.png"
  rm -rf "$tmpd"
fi
for f in "$out"/weld.png "$out"/weld-export.png "$out"/weld-export-light.png "$out"/wedge-views.png "$out"/wedge-export.png "$out"/report-page.png "$out"/phantom.png "$out"/dac.png "$out"/practice-result.png "$out"/practice-progress.png "$out"/dicom.png; do
  [ -f "$f" ] || continue
  /usr/bin/python3 - "$f" <<'PY'
import struct, sys, zlib
path = sys.argv[1]
d = open(path, 'rb').read()
assert d[:8] == b'\x89PNG\r\n\x1a\n', f'{path}: not a PNG'
i, idat, w, h = 8, b'', 0, 0
while i < len(d):
    n = struct.unpack('>I', d[i:i + 4])[0]
    t, c = d[i + 4:i + 8], d[i + 8:i + 8 + n]
    if zlib.crc32(t + c) & 0xffffffff != struct.unpack('>I', d[i + 8 + n:i + 12 + n])[0]:
        sys.exit(f'{path}: bad CRC in {t}')
    if t == b'IHDR':
        w, h, depth, ctype = struct.unpack('>IIBB', c[:10])
        bpp = {2: 3, 6: 4, 0: 1}[ctype]
    if t == b'IDAT':
        idat += c
    i += 12 + n
    if t == b'IEND':
        break
else:
    sys.exit(f'{path}: no IEND (truncated)')
raw = zlib.decompress(idat)
if len(raw) != h * (1 + w * bpp):
    sys.exit(f'{path}: image data {len(raw)} bytes, expected {h * (1 + w * bpp)}')
print(f'{path}: {w} x {h} PNG, complete')
PY
done
ls -l "$out"
