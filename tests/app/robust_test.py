#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""umbra-cli robustness tests, one case per ctest test.

usage: robust_test.py UMBRA_CLI WORKDIR CASE

validate_kinds: `validate` tells every file kind Umbra reads by its content (not its name) and
  checks it: exit 0 naming the kind, or exit 2 with the problems.
unwritten_traces: a capture whose /data/rf claims far more traces than the file stores (2^20
  frames of which nothing was written, h5py with its default late allocation) is refused at
  once, whatever its layout, instead of reading fill values for minutes.
timeout: --timeout SECONDS stops simulate and reconstruct (exit 124, as GNU timeout(1)), leaves
  no partial output, and bad values are usage errors (exit 2).
"""
import hashlib
import json
import os
import shutil
import subprocess
import sys
import time

HERE = os.path.dirname(os.path.abspath(__file__))
FIXTURES = os.path.join(HERE, "..", "core", "fixtures")
sys.dont_write_bytecode = True
sys.path.insert(0, FIXTURES)
import write_capture as wc  # noqa: E402
sys.path.insert(0, HERE)
from cli_case import CASE, CLI, WORK, check, main, run  # noqa: E402

SCENE = os.path.join(HERE, "fixtures", "small_block_scene.json")


def fresh_dir():
    d = os.path.join(WORK, "robust_" + CASE)
    shutil.rmtree(d, ignore_errors=True)
    os.makedirs(d)
    return d


def cleanup():
    shutil.rmtree(os.path.join(WORK, "robust_" + CASE), ignore_errors=True)


def expect(path, rc_expected, text):
    rc, out, err = run("validate", path)
    check(rc == rc_expected, f"{os.path.basename(path)}: exit {rc}, expected {rc_expected}: {out}{err}")
    where = out if rc_expected == 0 else err
    check(text in where, f"{os.path.basename(path)}: expected '{text}' in: {out}{err}")
    if rc != 0:
        for line in err.strip().splitlines():
            check(line.startswith(path + ": "), f"{os.path.basename(path)}: line does not name the file: {line}")
    print(f"{os.path.basename(path):28s} exit {rc}: {(out + err).strip()[:150]}")


def case_validate_kinds():
    d = fresh_dir()
    cap = os.path.join(d, "fixture.h5")
    wc.write(cap)
    expect(cap, 0, "valid capture")
    # Kinds are told by content: the same capture named .json is still a capture.
    shutil.copy(cap, os.path.join(d, "capture_named.json"))
    expect(os.path.join(d, "capture_named.json"), 0, "valid capture")

    sim = os.path.join(d, "small_block.h5")
    rc, out, err = run("simulate", SCENE, "-o", sim, timeout=600)
    check(rc == 0, f"simulate exit {rc}: {err}")
    img = os.path.join(d, "small_block.image.h5")
    rc, out, err = run("reconstruct", sim, "-o", img, "--grid-mm", "-2:2:1:6:0.1", timeout=300)
    check(rc == 0, f"reconstruct exit {rc}: {err}")
    expect(img, 0, "valid image file")

    expect(SCENE, 0, "valid scene file")
    scene_h5 = os.path.join(d, "scene_named.h5")
    shutil.copy(SCENE, scene_h5)
    expect(scene_h5, 0, "valid scene file")
    bad_scene = json.load(open(SCENE))
    bad_scene["array"]["elements"] = 0
    json.dump(bad_scene, open(os.path.join(d, "bad_scene.json"), "w"))
    expect(os.path.join(d, "bad_scene.json"), 2, "array.elements")

    json.dump({"das": {"f_number": 1.5}}, open(os.path.join(d, "recipe.json"), "w"))
    expect(os.path.join(d, "recipe.json"), 0, "valid recipe")
    json.dump({"das": {"no_such_setting": 1}}, open(os.path.join(d, "bad_recipe.json"), "w"))
    expect(os.path.join(d, "bad_recipe.json"), 2, "no_such_setting")

    json.dump({"captures": ["fixture.h5"], "settings": ["tgc.mode=off"]}, open(os.path.join(d, "manifest.json"), "w"))
    expect(os.path.join(d, "manifest.json"), 0, "valid batch manifest")
    json.dump({"captures": ["missing.h5"]}, open(os.path.join(d, "bad_manifest.json"), "w"))
    expect(os.path.join(d, "bad_manifest.json"), 2, "does not exist")

    sha = hashlib.sha256(open(cap, "rb").read()).hexdigest()  # SHA-256 by Python's hashlib
    case = {"format": "umbracase", "version": 1, "title": "validate test (synthetic)",
            "captures": [{"path": "fixture.h5", "sha256": sha}]}
    json.dump(case, open(os.path.join(d, "good.umbracase"), "w"))
    expect(os.path.join(d, "good.umbracase"), 0, "valid case file (version 1, 1 captures, 0 findings)")
    case["captures"][0]["sha256"] = "0" * 64
    json.dump(case, open(os.path.join(d, "changed.umbracase"), "w"))
    rc, out, err = run("validate", os.path.join(d, "changed.umbracase"))
    check(rc == 0 and "warning" in err and "has changed" in err, f"changed capture is a warning: {rc} {err}")
    case["version"] = 2
    json.dump(case, open(os.path.join(d, "v2.umbracase"), "w"))
    expect(os.path.join(d, "v2.umbracase"), 2, "version")

    # DICOM Part 10: 128-byte preamble then "DICM" (PS3.10 section 7.1).
    open(os.path.join(d, "image.dcm"), "wb").write(b"\0" * 128 + b"DICM" + b"\x02\x00\x00\x00")
    expect(os.path.join(d, "image.dcm"), 2, "DICOM")
    open(os.path.join(d, "notes.txt"), "w").write("time,amplitude\n0,1\n")
    expect(os.path.join(d, "notes.txt"), 2, "not a file Umbra reads")
    open(os.path.join(d, "broken.json"), "w").write('{"format": "umbracase", "version": 1,')
    expect(os.path.join(d, "broken.json"), 2, "not valid JSON")
    json.dump({"format": "something-else"}, open(os.path.join(d, "other.json"), "w"))
    expect(os.path.join(d, "other.json"), 2, "not a file Umbra reads")
    summary = {"umbra_format": "batch_summary", "umbra_format_version": 1}
    json.dump(summary, open(os.path.join(d, "summary.json"), "w"))
    expect(os.path.join(d, "summary.json"), 2, "batch summary")
    expect(os.path.join(d, "missing.h5"), 2, "does not exist")


def case_unwritten_traces():
    import h5py
    d = fresh_dir()
    for layout in ("chunked", "contiguous"):
        path = os.path.join(d, f"unwritten_{layout}.h5")
        wc.write(path)
        with h5py.File(path, "r+") as f:
            attrs = dict(f["data/rf"].attrs)
            del f["data/rf"]
            shape = (2 ** 20, wc.N_TX, wc.N_EL, wc.N_SAMPLES)
            if layout == "chunked":
                ds = f.create_dataset("data/rf", shape=shape, dtype="<i2", chunks=(1, 1, wc.N_EL, wc.N_SAMPLES))
            else:
                ds = f.create_dataset("data/rf", shape=shape, dtype="<i2")
            for k, v in attrs.items():
                ds.attrs[k] = v
        t0 = time.monotonic()
        rc, out, err = run("validate", path, timeout=120)
        seconds = time.monotonic() - t0
        check(rc == 2, f"{layout}: exit {rc}: {err}")
        check("never written" in err, f"{layout}: message says the traces were never written: {err}")
        check(seconds < 30, f"{layout}: took {seconds:.1f} s (limit 30 s)")
        print(f"{layout}: {seconds:.2f} s: {err.strip()}")
        rc, out, err = run("info", path)
        check(rc == 2 and "never written" in err, f"{layout}: info refuses too: {rc} {err}")


def case_timeout():
    d = fresh_dir()
    # simulate: many frames of the small scene take far longer than 0.3 s.
    scene = json.load(open(SCENE))
    scene["frames"] = {"kind": "cine", "count": 2000, "interval_ms": 50, "oscillation_mm": [0.1, 0.3], "period_ms": 1000}
    sp = os.path.join(d, "long_scene.json")
    json.dump(scene, open(sp, "w"))
    out_h5 = os.path.join(d, "long.h5")
    t0 = time.monotonic()
    rc, out, err = run("simulate", sp, "-o", out_h5, "--timeout", "0.3", timeout=120)
    seconds = time.monotonic() - t0
    check(rc == 124, f"simulate --timeout: exit {rc}: {err}")
    check("time limit of 0.3 s (--timeout)" in err, f"simulate message: {err}")
    check(not os.path.exists(out_h5), "no capture written")
    check(not any(n.startswith("long.h5") for n in os.listdir(d)), f"no partial file left: {os.listdir(d)}")
    check(seconds < 0.3 + 10, f"stopped in {seconds:.1f} s")
    print(f"simulate stopped after {seconds:.2f} s: {err.strip()}")

    cap = os.path.join(d, "small.h5")
    rc, out, err = run("simulate", SCENE, "-o", cap, "--timeout", "600", timeout=600)
    check(rc == 0, f"simulate within its limit: exit {rc}: {err}")
    img = os.path.join(d, "small.image.h5")
    t0 = time.monotonic()
    rc, out, err = run("reconstruct", cap, "-o", img, "--grid-mm", "-6:6:0:12:0.003", "--timeout", "0.5", timeout=300)
    seconds = time.monotonic() - t0
    check(rc == 124, f"reconstruct --timeout: exit {rc}: {err}")
    check("time limit of 0.5 s (--timeout)" in err, f"reconstruct message: {err}")
    check(not any(n.startswith("small.image") for n in os.listdir(d)), f"no partial image left: {os.listdir(d)}")
    print(f"reconstruct stopped after {seconds:.2f} s: {err.strip()}")

    for bad in ("0", "-1", "abc", "1e999"):
        rc, out, err = run("reconstruct", cap, "-o", img, "--timeout", bad)
        check(rc == 2 and "--timeout" in err, f"--timeout {bad}: exit {rc}: {err}")
    rc, out, err = run("reconstruct", cap, "-o", img, "--timeout")
    check(rc == 2 and "--timeout" in err, f"--timeout without a value: exit {rc}: {err}")


if __name__ == "__main__":
    main(globals(), cleanup)
