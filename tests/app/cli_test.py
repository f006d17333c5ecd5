#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""Command-line tests of umbra-cli, one case per ctest test.

usage: cli_test.py UMBRA_CLI WORKDIR CASE

The capture used is the synthetic fixture of tests/core/fixtures/write_capture.py (written
by h5py, independently of Umbra); expected numbers are computed here from its known values
with the formulas the summary promises: duration = N_samples / f_s, pulse-echo depth
z = c * t / 2 (two-way travel time t), pitch = mean neighbour spacing along x.
"""
import json
import math
import os
import shutil
import subprocess
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
FIXTURES = os.path.join(HERE, "..", "core", "fixtures")
sys.dont_write_bytecode = True  # keep the source tree clean
sys.path.insert(0, FIXTURES)
import write_capture as wc  # noqa: E402
sys.path.insert(0, HERE)
from cli_case import CASE, CLI, WORK, check, main, run  # noqa: E402,F401


def fresh_dir():
    d = os.path.join(WORK, CASE)
    shutil.rmtree(d, ignore_errors=True)
    os.makedirs(d)
    return d


def capture():
    path = os.path.join(fresh_dir(), "fixture.h5")
    wc.write(path)
    return path


# Expected summary numbers from the fixture's known values.
T0_MIN, T0_MAX = min(wc.START_TIME_S), max(wc.START_TIME_S)
DURATION_S = wc.N_SAMPLES / wc.SAMPLING_FREQUENCY_HZ
C = wc.SPEED_OF_SOUND_M_S
DEPTH_MIN_M = T0_MIN * C / 2
DEPTH_MAX_M = (T0_MAX + DURATION_S) * C / 2


def case_info_json():
    path = capture()
    rc, out, err = run("info", "--json", path)
    check(rc == 0, f"info --json exit {rc}: {err}")
    j = json.loads(out)
    rel = lambda a, b: math.isclose(a, b, rel_tol=1e-12, abs_tol=1e-15)  # noqa: E731
    check(j["file"] == path, "file")
    check(j["title"] == wc.TITLE, "title")
    check(j["synthetic"] is True, "synthetic flag")
    check(j["array"]["elements"] == wc.N_EL, "elements")
    check(rel(j["array"]["pitch_m"], wc.PITCH_M), f"pitch {j['array']['pitch_m']}")
    check(rel(j["array"]["centre_frequency_hz"], wc.CENTRE_FREQUENCY_HZ), "centre frequency")
    check(rel(j["array"]["element_width_m"], wc.ELEMENT_WIDTH_M), "element width")
    check(rel(j["array"]["fractional_bandwidth"], wc.FRACTIONAL_BANDWIDTH), "bandwidth")
    check(j["transmit"]["kind"] == "single_element", "transmit kind")
    check(j["transmit"]["count"] == wc.N_TX, "transmit count")
    check(j["receive"]["channels"] == wc.N_EL, "receive channels")
    check(rel(j["receive"]["sampling_frequency_hz"], wc.SAMPLING_FREQUENCY_HZ), "sampling frequency")
    check(j["traces"]["samples"] == wc.N_SAMPLES, "samples")
    check(rel(j["traces"]["duration_s"], DURATION_S), f"duration {j['traces']['duration_s']} vs {DURATION_S}")
    check(j["traces"]["sample_type"] == "int16", "sample type")
    check(rel(j["traces"]["scale"], wc.RF_SCALE), "scale")
    check(j["traces"]["units"] == "V", "units")
    check(rel(j["traces"]["depth_min_m"], DEPTH_MIN_M), f"depth min {j['traces']['depth_min_m']} vs {DEPTH_MIN_M}")
    check(rel(j["traces"]["depth_max_m"], DEPTH_MAX_M), f"depth max {j['traces']['depth_max_m']} vs {DEPTH_MAX_M}")
    check(j["frames"] == wc.N_FRAMES, "frames")
    check(j["file_size_bytes"] == os.path.getsize(path), "file size")
    check(rel(j["medium"]["speed_of_sound_m_s"], C), "speed of sound")
    check(rel(j["medium"]["thickness_m"], wc.THICKNESS_M), "thickness")
    check(rel(j["wedge"]["speed_of_sound_m_s"], wc.WEDGE_SPEED_M_S), "wedge speed")
    check(j["provenance"]["part_id"] == "SYN-0001", "provenance")


def case_info_text():
    path = capture()
    rc, out, err = run("info", path)
    check(rc == 0, f"info exit {rc}: {err}")
    lines = {l[:13].strip(): l[13:] for l in out.splitlines() if len(l) > 13}
    print(out)
    check(f"{wc.N_EL} elements" in lines.get("Array", ""), "elements")
    check(f"pitch {wc.PITCH_M * 1e3:.3f} mm" in lines.get("Array", ""), "pitch")
    check(f"{wc.CENTRE_FREQUENCY_HZ / 1e6:.2f} MHz" in lines.get("Array", ""), "centre frequency")
    check(f"{wc.N_TX} events" in lines.get("Transmit", ""), "transmit count")
    check(f"{wc.N_EL} channels" in lines.get("Receive", ""), "channels")
    check(f"{wc.SAMPLING_FREQUENCY_HZ / 1e6:.2f} MHz, {wc.N_SAMPLES} samples ({DURATION_S * 1e6:.2f} us)"
          in lines.get("Sampling", ""), "sampling and duration")
    check(f"{DEPTH_MIN_M * 1e3:.1f} to {DEPTH_MAX_M * 1e3:.1f} mm" in lines.get("Depth range", ""), "depth range")
    check(lines.get("Frames", "").startswith(f"{wc.N_FRAMES}"), "frames")
    check(f"{os.path.getsize(path) / 2**20:.2f} MiB" in lines.get("File size", ""), "file size")
    check("synthetic" in out, "synthetic label")


def case_validate_external():
    path = capture()
    rc, out, err = run("validate", path)
    check(rc == 0, f"validate exit {rc}: {err}")
    check("valid" in out and path in out, "validate message")
    rc, out, err = run("validate", "--quiet", path)
    check(rc == 0 and out == "", "validate --quiet prints nothing")


def case_validate_bad():
    d = fresh_dir()
    subprocess.run(["/usr/bin/python3", os.path.join(FIXTURES, "make_bad_captures.py"), d],
                   check=True, capture_output=True)
    manifest = json.load(open(os.path.join(d, "manifest.json")))
    check(len(manifest) > 50, "manifest has the cases")
    # The program runs are independent: several at a time keeps the case short.
    from concurrent.futures import ThreadPoolExecutor
    with ThreadPoolExecutor(max_workers=4) as pool:
        results = list(pool.map(lambda c: run("validate", os.path.join(d, c["file"])), manifest))
    for c, (rc, out, err) in zip(manifest, results):
        f = os.path.join(d, c["file"])
        lines = err.strip().splitlines()
        check(rc == 2, f"{c['name']}: exit {rc}")
        check(out == "", f"{c['name']}: nothing on stdout")
        check(len(lines) >= 1, f"{c['name']}: no message")
        # One line per problem: "FILE: /hdf5/path: what" (or "FILE: what" for the file itself).
        for line in lines:
            check(line.startswith(f + ": "), f"{c['name']}: line does not name the file: {line}")
            rest = line[len(f) + 2:]
            check(rest.startswith("/") or not c["where"] or rest == "", f"{c['name']}: no HDF5 path: {line}")
        check(len(set(lines)) == len(lines), f"{c['name']}: repeated lines")
        prefix = f + ": " + (c["where"] + ": " if c["where"] else "")
        check(any(l.startswith(prefix) and c["what"] in l[len(prefix):].lower() for l in lines),
              f"{c['name']}: expected '{prefix}...{c['what']}...', got {lines}")
        print(f"{c['name']:45s} {' | '.join(l[len(f) + 2:] for l in lines)}")
    # `info` refuses the same files the same way (a sample of the kinds of problem).
    for name in ("truncated_0.5", "not_hdf5", "directory", "missing_data_rf", "version_2", "rf_1e12_samples",
                 "nan_speed", "element_index_too_big"):
        f = os.path.join(d, name + ".h5")
        rc, out, err = run("info", f)
        check(rc == 2 and err.startswith(f + ": "), f"{name}: info exit {rc}: {err}")


def case_damaged_bytes():
    """Random bytes overwritten in the fixture (fixed seed): whatever the damage, umbra-cli
    answers 0 (damage in trace bytes only, still a valid file) or 2 with messages naming the
    file; it never crashes or hangs (the HDF5 library can, so umbra-cli checks in a child)."""
    import random
    from concurrent.futures import ThreadPoolExecutor
    good = open(capture(), "rb").read()
    d = os.path.dirname(capture())
    rng = random.Random(46)
    files = []
    for i in range(48):
        b = bytearray(good)
        for _ in range(rng.choice([1, 2, 4, 8])):
            b[rng.randrange(0, min(8192, len(b)) if i % 2 == 0 else len(b))] = rng.randrange(256)
        f = os.path.join(d, f"damaged_{i}.h5")
        open(f, "wb").write(b)
        files.append(f)
    env = dict(os.environ, UMBRA_HEADER_TIMEOUT_S="5")

    def one(f):
        p = subprocess.run([CLI, "validate", f], capture_output=True, timeout=120, env=env)
        return f, p.returncode, p.stderr.decode("utf-8", errors="replace")
    with ThreadPoolExecutor(max_workers=4) as pool:
        results = list(pool.map(one, files))
    codes = {}
    for f, rc, err in results:
        codes[rc] = codes.get(rc, 0) + 1
        check(rc in (0, 2), f"{f}: exit {rc}")
        if rc == 2:
            check(all(l.startswith(f + ": ") for l in err.strip().splitlines()), f"{f}: lines name the file: {err}")
    print("exit codes:", codes)


def case_help():
    rc, out, err = run("--help")
    check(rc == 0 and "usage:" in out, f"umbra-cli --help exit {rc}")
    for cmd in ("info", "validate", "simulate", "reconstruct", "batch", "measure", "calibrate"):
        rc, out, err = run(cmd, "--help")
        check(rc == 0, f"{cmd} --help exit {rc}: {err.strip()}")
        check("usage:" in out, f"{cmd} --help prints a usage line")


def case_usage_errors():
    path = capture()
    for cmd in ("info", "validate", "simulate", "reconstruct", "batch"):
        rc, out, err = run(cmd, "--no-such-option", path)
        check(rc == 2, f"{cmd} --no-such-option exit {rc}")
        check("--no-such-option" in err, f"{cmd}: message names the option: {err.strip()}")
    rc, out, err = run("frobnicate")
    check(rc == 2 and "frobnicate" in err, f"unknown command exit {rc}")
    rc, out, err = run()
    check(rc == 2, f"no command exit {rc}")
    for cmd in ("info", "validate"):
        rc, out, err = run(cmd)
        check(rc == 2, f"{cmd} without a file exit {rc}")
        rc, out, err = run(cmd, path, path)
        check(rc == 2, f"{cmd} with two files exit {rc}")


MEASURE_SCENE = {
    "title": "measure test scene (synthetic)", "scenario": "unit_test", "seed": 5,
    "array": {"elements": 32, "pitch_mm": 0.6, "element_width_mm": 0.5, "centre_frequency_mhz": 5,
              "fractional_bandwidth": 0.6, "elevation_beam_width_mm": 2.0},
    "transmit": {"kind": "single_element"},
    "sampling": {"frequency_mhz": 50, "max_depth_mm": 16},
    "medium": {"speed_m_s": 5920},
    "noise": {"snr_db": 30, "reference": "peak"},
    # A planar flaw seen by its two tip echoes only (face amplitude 0; tip-to-tip height
    # 3.04 mm) over y -3..3 mm, and a point reflector; nine frames 1 mm apart along the scan axis.
    # (Tips of opposite phase are covered by tests/reconstruction/sizing_coverage_test.cpp.)
    "reflectors": {
        "planar_flaws": [{"start_mm": [-2.0, 9.0], "end_mm": [-1.5, 12.04], "amplitude": 0.0,
                          "tip_amplitude": 0.5, "y_range_mm": [-3.0, 3.0]}],
        "points": [{"position_mm": [4.03, 0.0, 8.07], "amplitude": 1.0}],
    },
    "frames": {"kind": "encoded", "count": 9, "start_mm": -4, "step_mm": 1},
}


def case_measure():
    """umbra-cli measure: JSON keys, tip-to-tip height against the scene's truth within the
    expanded uncertainty (tip-diffraction sizing, common practice), a point flagged
    resolution-limited, scan-axis length (-6 dB drop, common practice), exit 2 for bad boxes."""
    d = fresh_dir()
    scene = os.path.join(d, "scene.json")
    with open(scene, "w") as f:
        json.dump(MEASURE_SCENE, f)
    cap, img, one = (os.path.join(d, n) for n in ("cap.h5", "img.h5", "one.h5"))
    rc, out, err = run("simulate", scene, "-o", cap)
    check(rc == 0, f"simulate exit {rc}: {err}")
    rc, out, err = run("reconstruct", cap, "-o", img, "--grid-mm", "-6:7:6:14:0.1", "--threads", "2")
    check(rc == 0, f"reconstruct exit {rc}: {err}")
    rc, out, err = run("measure", img, "--tool", "tips", "--box-mm", "-4:0.5:7.5:13.5", "--frame", "4", "--json")
    check(rc == 0, f"measure tips exit {rc}: {err}")
    j = json.loads(out)
    for k in ("tool", "frame", "x_mm", "depth_mm", "length_mm", "height_mm", "peak_db", "uncertainty_mm",
              "resolution_limited", "warnings", "tips_mm"):
        check(k in j, f"JSON key {k}")
    check(set(j["uncertainty_mm"]) == {"x", "depth", "length", "height"}, f"uncertainty keys {j['uncertainty_mm']}")
    truth = 12.04 - 9.0
    check(abs(j["height_mm"] - truth) <= j["uncertainty_mm"]["height"],
          f"tip-to-tip height {j['height_mm']} +- {j['uncertainty_mm']['height']} covers {truth}")
    check(len(j["tips_mm"]) == 2 and abs(j["tips_mm"][0][1] - 9.0) < 0.3, f"tips {j['tips_mm']}")
    print("tips:", j["height_mm"], "+-", j["uncertainty_mm"]["height"], "truth", truth)
    rc, out, err = run("measure", img, "--tool", "drop6", "--box-mm", "2.5:5.5:7:9", "--frame", "4", "--json")
    j = json.loads(out)
    check(rc == 0 and j["resolution_limited"] is True, f"point reflector flagged resolution-limited: {j}")
    check(isinstance(j["peak_db"], float) and j["peak_db"] <= 0, "peak_db re the frame peak")
    rc, out, err = run("measure", img, "--tool", "scan-length", "--box-mm", "-4:0.5:7.5:13.5", "--json")
    check(rc == 0, f"scan-length exit {rc}: {err}")
    j = json.loads(out)
    check(abs(j["length_mm"] - 6.0) <= j["uncertainty_mm"]["length"], f"scan length {j['length_mm']} covers 6.0 mm")
    rc, out, err = run("measure", img, "--tool", "peak", "--box-mm", "2.5:5.5:7:9", "--frame", "4")
    check(rc == 0 and "±" in out and "mm" in out, f"readable line: {out}")
    for box in ("20:30:7:9", "5:2:7:9", "nan:1:7:9", "1:2:3", "inf:1:2:3"):
        rc, out, err = run("measure", img, "--tool", "peak", "--box-mm", box)
        check(rc == 2 and "--box-mm" in err, f"box {box}: exit {rc}: {err.strip()}")
    # A single-frame image has no scan positions: scan-length is refused with exit 2.
    rc, out, err = run("reconstruct", cap, "-o", one, "--grid-mm", "-6:7:6:14:0.2", "--frames", "0", "--threads", "2")
    rc, out, err = run("measure", one, "--tool", "scan-length", "--box-mm", "-4:0.5:7.5:13.5")
    check(rc == 2, f"scan-length on one frame exit {rc}: {err.strip()}")
    # An image without the acquisition attributes: measured with a warning, no model.
    import h5py
    with h5py.File(one, "a") as f:
        for a in ("centre_frequency_hz", "fractional_bandwidth", "speed_of_sound_m_s"):
            if a in f.attrs:
                del f.attrs[a]
    rc, out, err = run("measure", one, "--tool", "peak", "--box-mm", "2.5:5.5:7:9", "--json")
    j = json.loads(out)
    check(rc == 0 and any("point-spread widths unknown" in w for w in j["warnings"]), f"fallback warning: {j['warnings']}")
    rc, out, err = run("measure", os.path.join(d, "missing.h5"), "--tool", "peak", "--box-mm", "0:1:0:1")
    check(rc == 2 and "missing.h5" in err, f"missing file exit {rc}: {err.strip()}")


CALIBRATE_SCENE = {
    "title": "calibration test plate (synthetic)", "scenario": "unit_test", "seed": 9,
    "array": {"elements": 16, "pitch_mm": 0.6, "element_width_mm": 0.5, "centre_frequency_mhz": 5,
              "fractional_bandwidth": 0.6},
    "transmit": {"kind": "single_element"},
    "sampling": {"frequency_mhz": 50, "samples": 300},
    "medium": {"speed_m_s": 6100, "thickness_mm": 12},
    "reflectors": {"back_wall": {"depth_mm": 12}},
    "noise": {"snr_db": 40, "reference": "peak"},
}


def case_calibrate():
    """umbra-cli calibrate: the speed of a simulated 12 mm plate (6100 m/s) within its expanded
    uncertainty (c = 2 d / t, pulse-echo travel time), a zeroed element found dead and excluded in
    reconstruct, exit 2 for bad requests and a missing file."""
    d = fresh_dir()
    scene = os.path.join(d, "scene.json")
    with open(scene, "w") as f:
        json.dump(CALIBRATE_SCENE, f)
    cap, img = os.path.join(d, "cap.h5"), os.path.join(d, "img.h5")
    rc, out, err = run("simulate", scene, "-o", cap)
    check(rc == 0, f"simulate exit {rc}: {err}")
    import h5py
    with h5py.File(cap, "a") as f:  # element 3 (index 2) silenced as transmitter and receiver
        rf = f["/data/rf"]
        rf[0, 2, :, :] = 0
        rf[0, :, 2, :] = 0
    rc, out, err = run("calibrate", cap, "--thickness-mm", "12", "--elements", "--json")
    check(rc == 0, f"calibrate exit {rc}: {err}")
    j = json.loads(out)
    c = j["speed_m_s"]
    check(j["method"] == "back wall", f"method {j['method']} (300 samples hold no repeat)")
    check(abs(c["value"] - 6100) <= c["expanded_uncertainty"], f"speed {c['value']} +- {c['expanded_uncertainty']} covers 6100")
    t = j["echoes"][0]["time_us"]
    check(abs(t - 2 * 12e-3 / 6100 * 1e6) < 0.005, f"echo time {t} us vs 2 d / c = {2 * 12e-3 / 6100 * 1e6:.4f} us")
    check(j["synthetic"] is True, "labelled synthetic")
    check(j["exclude"] == "3", f"flagged elements {j['exclude']}")
    check([e["status"] for e in j["elements"]].count("dead") == 1, "one dead element")
    rc, out, err = run("calibrate", cap, "--thickness-mm", "12")
    check(rc == 0 and "m/s (k = 2)" in out and "synthetic" in out, f"readable lines: {out}")
    rc, out, err = run("reconstruct", cap, "-o", img, "--set", "das.excluded_elements=" + j["exclude"], "--threads", "2")
    check(rc == 0, f"reconstruct with the element excluded: exit {rc}: {err}")
    rc, out, err = run("reconstruct", cap, "-o", img, "--set", "das.excluded_elements=17")
    check(rc == 2 and "das.excluded_elements" in err, f"element beyond the array: exit {rc}: {err.strip()}")
    for args in ([], ["--thickness-mm", "12", "--holes-mm", "5,10"], ["--holes-mm", "5"], ["--speed", "5900"],
                 ["--thickness-mm", "-3"], ["--thickness-mm", "40"], ["--reflector-mm", "5"], ["--reflector-mm", "0,-2"],
                 ["--reflector-mm", "0,5", "--wave", "S"], ["--hole-diameter-mm", "2"], ["--reflector-mm", "0,5", "--search-us", "0"],
                 ["--reflector-mm", "0,5", "--thickness-mm", "12"]):
        rc, out, err = run("calibrate", cap, *args)
        check(rc == 2 and err.strip(), f"calibrate {args}: exit {rc}: {err.strip()}")
    rc, out, err = run("calibrate", os.path.join(d, "missing.h5"), "--thickness-mm", "12")
    check(rc == 2 and "missing.h5" in err, f"missing file exit {rc}: {err.strip()}")


if __name__ == "__main__":
    main(globals())
