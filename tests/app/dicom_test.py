#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""umbra-cli import / export-dicom / validate on DICOM ultrasound images, one case per ctest test.

usage: dicom_test.py UMBRA_CLI WORKDIR CASE

Inputs are written by pydicom (fixtures/make_dicom.py); imported image files are read back
with h5py; exports are read with pydicom and parsed with DCMTK's dcmdump. Expected axes follow
the Sequence of Ultrasound Regions definition (DICOM PS3.3 C.8.5.5): x = ReferencePixelPhysicalValueX
+ (column - RegionLocationMinX0 - ReferencePixelX0) * PhysicalDeltaX, likewise depth, in cm.
"""
import json
import os
import shutil
import subprocess
import sys

import h5py
import numpy as np
import pydicom

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True
sys.path.insert(0, os.path.join(HERE, "fixtures"))
sys.path.insert(0, os.path.join(HERE, "..", "core", "fixtures"))
import make_dicom as md  # noqa: E402
sys.path.insert(0, HERE)
from cli_case import CASE, CLI, WORK, check, main, run  # noqa: E402


def fresh_dir():
    d = os.path.join(WORK, "dicom_" + CASE)
    shutil.rmtree(d, ignore_errors=True)
    os.makedirs(d)
    return d


def cleanup():
    shutil.rmtree(os.path.join(WORK, "dicom_" + CASE), ignore_errors=True)


def imported(path, d, name="img.h5"):
    out = os.path.join(d, name)
    rc, so, se = run("import", path, "-o", out)
    check(rc == 0, f"import {os.path.basename(path)} exit {rc}: {se}")
    return out, so, se


def check_calibrated(h5, frames, samples):
    with h5py.File(h5, "r") as f:
        x = f["image/x_m"][...]
        z = f["image/z_m"][...]
        env = f["image/envelope"][...]
        check("axes_unit" not in f.attrs or f.attrs["axes_unit"] == "m", "calibrated file has metre axes")
        recipe = json.loads(f.attrs["recipe_json"])
    cols = np.arange(md.X0, md.X1 + 1)
    rows = np.arange(md.Y0, md.Y1 + 1)
    check(len(x) == len(cols) and len(z) == len(rows), f"region size {len(x)} x {len(z)}")
    check(np.allclose(x, md.expected_x_m(cols), rtol=0, atol=1e-12), "x axis from the region (PS3.3 C.8.5.5)")
    check(np.allclose(z, md.expected_z_m(rows), rtol=0, atol=1e-12), "depth axis from the region (PS3.3 C.8.5.5)")
    check(env.shape == (frames, len(rows), len(cols)), f"envelope shape {env.shape}")
    px = md.pixels(frames, samples).astype(float)[:, md.Y0:md.Y1 + 1, md.X0:md.X1 + 1, :]
    if samples == 3:  # ITU-R BT.601 luma weights
        want = 0.299 * px[..., 0] + 0.587 * px[..., 1] + 0.114 * px[..., 2]
    else:
        want = px[..., 0]
    check(np.allclose(env, want, atol=1e-3), "grey levels pixel by pixel")
    check(recipe["source"] == "dicom" and recipe["calibrated"] is True, "recipe records the DICOM source")
    check(recipe.get("synthetic") is True, "synthetic label carried from the Series Description")
    return recipe


def case_import_mono_single():
    d = fresh_dir()
    p = md.write(os.path.join(d, "mono1.dcm"))
    h5, so, se = imported(p, d)
    check_calibrated(h5, 1, 1)
    check("uncalibrated" not in se, "no calibration warning")


def case_import_mono_multi_frame_time():
    d = fresh_dir()
    p = md.write(os.path.join(d, "mono5.dcm"), frames=5, implicit=True)
    h5, _, _ = imported(p, d)
    r = check_calibrated(h5, 5, 1)
    check(abs(r["frame_time_s"] - md.FRAME_TIME_MS * 1e-3) < 1e-12, f"frame time from (0018,1063): {r.get('frame_time_s')}")


def case_import_rgb_multi_cine_rate():
    d = fresh_dir()
    p = md.write(os.path.join(d, "rgb3.dcm"), frames=3, samples=3, timing="cine_rate")
    h5, _, _ = imported(p, d)
    r = check_calibrated(h5, 3, 3)
    check(abs(r["frame_time_s"] - 1.0 / md.CINE_RATE) < 1e-12, f"frame time from Cine Rate (0018,0040): {r.get('frame_time_s')}")


def case_import_jpeg_baseline():
    # Compressed by DCMTK's own encoder (dcmcjpeg, JPEG baseline, lossy): axes exact, grey
    # levels within the loss of quality-90 JPEG.
    d = fresh_dir()
    p = md.write(os.path.join(d, "plain.dcm"), frames=2)
    j = os.path.join(d, "jpeg.dcm")
    cp = subprocess.run(["dcmcjpeg", "--encode-baseline", "--quality", "95", p, j], capture_output=True, text=True)
    check(cp.returncode == 0, f"dcmcjpeg: {cp.stderr}")
    check(str(pydicom.dcmread(j).file_meta.TransferSyntaxUID) == "1.2.840.10008.1.2.4.50", "JPEG baseline transfer syntax")
    out = os.path.join(d, "img.h5")
    rc, _, se = run("import", j, "-o", out)
    check(rc == 0, f"import jpeg exit {rc}: {se}")
    with h5py.File(out, "r") as f:
        x = f["image/x_m"][...]
        env = f["image/envelope"][...]
    check(np.allclose(x, md.expected_x_m(np.arange(md.X0, md.X1 + 1)), atol=1e-12), "x axis after JPEG")
    want = md.pixels(2, 1).astype(float)[:, md.Y0:md.Y1 + 1, md.X0:md.X1 + 1, 0]
    err = np.abs(env - want)
    # The pattern has sharp 255->0 wraps; judge the median error (lossy JPEG, common practice).
    check(np.median(err) < 4, f"JPEG grey levels: median error {np.median(err)}")


def case_import_uncalibrated():
    d = fresh_dir()
    p = md.write(os.path.join(d, "noregion.dcm"), regions=False)
    out = os.path.join(d, "img.h5")
    rc, so, se = run("import", p, "-o", out)
    check(rc == 0, f"import exit {rc}: {se}")
    check("uncalibrated - pixels" in se and "measurements are in pixels" in se, f"warning printed: {se!r}")
    with h5py.File(out, "r") as f:
        check(f.attrs["axes_unit"] == "px", "axes_unit = px")
        check(np.array_equal(f["image/x_m"][...], np.arange(md.COLS)), "x axis in pixel indices (whole frame)")
        check(np.array_equal(f["image/z_m"][...], np.arange(md.ROWS)), "z axis in pixel indices")
    rc, _, se = run("measure", out, "--tool", "peak", "--box-mm", "1:5:1:5")
    check(rc == 2 and "pixels" in se, f"measure refuses pixel axes: {rc} {se}")
    rc, _, se = run("export-dicom", out, "-o", os.path.join(d, "x.dcm"))
    check(rc == 2 and "pixels" in se, f"export refuses pixel axes: {rc} {se}")


def write_image(path, frames, nx=40, nz=30):
    """An Umbra image file written with h5py (format of docs/capture-format.md)."""
    x = -4e-3 + np.arange(nx) * 0.2e-3
    z = 5e-3 + np.arange(nz) * 0.25e-3
    env = np.zeros((frames, nz, nx), np.float32)
    for f in range(frames):
        env[f] = np.exp(-(((x[None, :] - 0.0) / 1e-3) ** 2 + ((z[:, None] - 8e-3 - f * 0.5e-3) / 1e-3) ** 2)) + 1e-4
    with h5py.File(path, "w") as h:
        h.attrs["umbra_format"] = "image"
        h.attrs["umbra_format_version"] = 1
        h.attrs["recipe_json"] = "{}"
        h.attrs["capture_sha256"] = "ab" * 32
        g = h.create_group("image")
        g["x_m"] = x
        g["z_m"] = z
        g["envelope"] = env
    return x, z, env


def case_export_roundtrip():
    d = fresh_dir()
    src = os.path.join(d, "img.h5")
    x, z, env = write_image(src, 6)
    out = os.path.join(d, "out.dcm")
    rc, so, se = run("export-dicom", src, "-o", out, "--frames", "0,2-4", "--title", "Phantom test", "--part", "P-2")
    check(rc == 0, f"export exit {rc}: {se}")
    ds = pydicom.dcmread(out)
    check(ds.SOPClassUID == md.US_MULTI, "Ultrasound Multi-frame Image Storage")
    check(int(ds.NumberOfFrames) == 4, f"frames {ds.NumberOfFrames}")
    check(ds.Rows == len(z) and ds.Columns == len(x), "rows and columns")
    check(str(ds.PatientName) == "P-2" and ds.PatientID == "P-2", "part id as identifier")
    check("ab" * 32 in ds.ImageComments and "recipe" in ds.ImageComments, "SHA-256 and recipe in Image Comments")
    r = ds.SequenceOfUltrasoundRegions[0]
    check(r.PhysicalUnitsXDirection == 3 and r.PhysicalUnitsYDirection == 3, "units cm")
    check(abs(r.PhysicalDeltaX - 0.02) < 1e-12 and abs(r.PhysicalDeltaY - 0.025) < 1e-12, "PhysicalDeltaX/Y in cm")
    for uid in (ds.SOPInstanceUID, ds.StudyInstanceUID, ds.SeriesInstanceUID):
        check(pydicom.uid.UID(uid).is_valid, f"valid UID {uid}")
    arr = ds.pixel_array
    check(arr.shape == (4, len(z), len(x)), f"pixel array shape {arr.shape}")
    # Brightest pixel of each exported frame where the Gaussian spot is (frames 0, 2, 3, 4).
    for k, f in enumerate([0, 2, 3, 4]):
        iz, ix = np.unravel_index(np.argmax(arr[k]), arr[k].shape)
        jz, jx = np.unravel_index(np.argmax(env[f]), env[f].shape)
        check((iz, ix) == (jz, jx), f"frame {f}: peak at {(iz, ix)} vs {(jz, jx)}")
    dump = subprocess.run(["dcmdump", "+E", out], capture_output=True, text=True)
    check(dump.returncode == 0 and "SequenceOfUltrasoundRegions" in dump.stdout, f"dcmdump parses: {dump.stderr}")
    # export -> import keeps the axes within half a pixel.
    back = os.path.join(d, "back.h5")
    rc, _, se = run("import", out, "-o", back)
    check(rc == 0, f"re-import exit {rc}: {se}")
    with h5py.File(back, "r") as f:
        bx, bz = f["image/x_m"][...], f["image/z_m"][...]
    check(len(bx) == len(x) and np.max(np.abs(bx - x)) < 0.5 * 0.2e-3, "x within half a pixel")
    check(len(bz) == len(z) and np.max(np.abs(bz - z)) < 0.5 * 0.25e-3, "z within half a pixel")


def case_dicom_roundtrip_grey():
    # DICOM -> image file -> DICOM keeps grey levels, region and frame time.
    d = fresh_dir()
    p = md.write(os.path.join(d, "mono.dcm"), frames=3)
    h5, _, _ = imported(p, d)
    out = os.path.join(d, "again.dcm")
    rc, _, se = run("export-dicom", h5, "-o", out)
    check(rc == 0, f"export exit {rc}: {se}")
    ds = pydicom.dcmread(out)
    want = md.pixels(3, 1)[:, md.Y0:md.Y1 + 1, md.X0:md.X1 + 1, 0]
    check(np.array_equal(ds.pixel_array, want), "grey levels unchanged")
    check(abs(float(ds.FrameTime) - md.FRAME_TIME_MS) < 1e-6, f"Frame Time kept: {ds.FrameTime}")
    check("SYNTHETIC" in ds.SeriesDescription.upper() and "SYNTHETIC" in ds.ImageComments.upper(), "synthetic label")
    r = ds.SequenceOfUltrasoundRegions[0]
    x_cm = r.ReferencePixelPhysicalValueX
    check(abs(x_cm * 1e-2 - md.expected_x_m(md.X0)) < 1e-12, "region origin kept")


def case_export_rgb_and_single():
    d = fresh_dir()
    src = os.path.join(d, "img.h5")
    write_image(src, 2)
    out = os.path.join(d, "rgb.dcm")
    rc, _, se = run("export-dicom", src, "-o", out, "--frames", "1", "--rgb")
    check(rc == 0, f"export exit {rc}: {se}")
    ds = pydicom.dcmread(out)
    check(ds.SOPClassUID == md.US_SINGLE, "Ultrasound Image Storage for one frame")
    check(ds.PhotometricInterpretation == "RGB" and ds.SamplesPerPixel == 3, "RGB")
    check(ds.pixel_array.shape == (30, 40, 3), f"shape {ds.pixel_array.shape}")
    check(str(ds.PatientName) == "", "no invented name")
    rc, so, se = run("validate", out)
    check(rc == 0 and "valid DICOM image" in so, f"validate: {rc} {so} {se}")
    rc, _, se = run("export-dicom", src, "-o", os.path.join(d, "bad.dcm"), "--frames", "5")
    check(rc == 2, f"frame out of range exit {rc}")


def damaged(d):
    """(name, bytes or path, words expected in the message)"""
    good = md.write(os.path.join(d, "good.dcm"), frames=4)
    raw = open(good, "rb").read()
    cases = []
    t = os.path.join(d, "truncated.dcm")
    open(t, "wb").write(raw[: len(raw) // 2])
    cases.append((t, ["truncated"]))
    # No pixel data.
    ds = pydicom.dcmread(good)
    del ds.PixelData
    p = os.path.join(d, "nopixels.dcm")
    ds.save_as(p)
    cases.append((p, ["no pixel data"]))
    # Frames beyond the file: header says 1000 frames, pixel data holds 4.
    ds = pydicom.dcmread(good)
    ds.NumberOfFrames = 1000
    p = os.path.join(d, "frames_beyond_file.dcm")
    ds.save_as(p)
    cases.append((p, ["pixel data holds"]))
    # Beyond the limit: 8000 x 8000 x 100000 frames.
    ds = pydicom.dcmread(good)
    ds.Rows, ds.Columns, ds.NumberOfFrames = 8000, 8000, 90000
    p = os.path.join(d, "beyond_limit.dcm")
    ds.save_as(p)
    cases.append((p, ["beyond the limit"]))
    # Unsupported compression: JPEG-LS made by DCMTK's encoder.
    p = os.path.join(d, "jpegls.dcm")
    subprocess.run(["dcmcjpls", good, p], check=True, capture_output=True)
    cases.append((p, ["not supported"]))
    # 16-bit pixels.
    ds = pydicom.dcmread(good)
    ds.BitsAllocated, ds.BitsStored, ds.HighBit = 16, 16, 15
    p = os.path.join(d, "sixteen.dcm")
    ds.save_as(p)
    cases.append((p, ["only 8-bit"]))
    # Not DICOM at all, and an empty file.
    p = os.path.join(d, "text.dcm")
    open(p, "w").write("hello, this is not a DICOM file at all " * 10)
    cases.append((p, ["DICOM"]))
    p = os.path.join(d, "empty.dcm")
    open(p, "wb").close()
    cases.append((p, [("too short", "is empty")]))  # the reader's words, or validate's file sniffing
    return cases


def case_damaged():
    d = fresh_dir()
    for path, words in damaged(d):
        for cmd in (["import", path, "-o", os.path.join(d, "x.h5")], ["validate", path]):
            rc, so, se = run(*cmd)
            name = os.path.basename(path)
            check(rc == 2, f"{cmd[0]} {name}: exit {rc} (want 2): {se}")
            check(path in se, f"{cmd[0]} {name}: message names the file: {se!r}")
            for w in words:
                alts = w if isinstance(w, tuple) else (w,)
                check(any(a.lower() in se.lower() for a in alts), f"{cmd[0]} {name}: message says '{w}': {se!r}")
        check(not os.path.exists(os.path.join(d, "x.h5")), "no output for a bad input")


if __name__ == "__main__":
    main({k: v for k, v in globals().items() if k.startswith("case_")}, cleanup)
