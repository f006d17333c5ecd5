#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""Tests of `umbra-cli batch`, one case per ctest test.

usage: batch_test.py UMBRA_CLI WORKDIR CASE

Captures are simulated here from fixtures/small_block_scene.json (a 16-element array over a
block with one side-drilled hole; synthetic), with different seeds. Outside references: SHA-256 of each capture from Python's
hashlib (FIPS 180-4), output bytes compared with filecmp, shard membership from the
documented rule (0-based position i goes to shard i mod N + 1).
"""
import filecmp
import hashlib
import json
import os
import shutil
import sys

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True  # keep the source tree clean
sys.path.insert(0, HERE)
from cli_case import CASE, WORK, check, main, run  # noqa: E402

D = os.path.join(WORK, f"batch_{CASE}_{os.getpid()}")
SCENE = os.path.join(HERE, "fixtures", "small_block_scene.json")


def simulate(path, seed):
    rc, out, err = run("simulate", SCENE, "-o", path, "--seed", str(seed), "--quiet")
    assert rc == 0, err


def setup(n=5, png=True, settings=("das.f_number=1.5",)):
    """n captures in D/captures (listed relative to the manifest in D) and the manifest."""
    shutil.rmtree(D, ignore_errors=True)
    os.makedirs(os.path.join(D, "captures"))
    names = [f"captures/cap{i}.h5" for i in range(n)]
    for i, name in enumerate(names):
        simulate(os.path.join(D, name), 10 + i)
    write_manifest({"captures": names, "settings": list(settings), "grid_mm": "-3:3:0:8:0.1", "png": png})
    return names


def write_manifest(m, name="manifest.json"):
    path = os.path.join(D, name)
    json.dump(m, open(path, "w"), indent=1)
    return path


def sha256(path):
    return hashlib.sha256(open(path, "rb").read()).hexdigest()


def summary(out, i=1, n=1):
    return json.load(open(os.path.join(out, f"summary-{i}-of-{n}.json")))


def outputs(out):
    return sorted(f for f in os.listdir(out) if not f.startswith("summary-"))


def case_shards_identical():
    names = setup()
    manifest = os.path.join(D, "manifest.json")
    whole = os.path.join(D, "whole")
    rc, out, err = run("batch", manifest, "--out", whole)
    check(rc == 0, f"whole run exit {rc}: {err}")
    expected = sorted([os.path.basename(n)[:-3] + ".image.h5" for n in names] + [os.path.basename(n)[:-3] + ".png" for n in names])
    check(outputs(whole) == expected, f"outputs {outputs(whole)}")
    s = summary(whole)
    check([c["index"] for c in s["captures"]] == list(range(len(names))), "whole run lists every capture")
    for c in s["captures"]:
        check(c["status"] == "done", f"{c['capture']}: {c['status']}")
        check(c["sha256"] == sha256(os.path.join(D, c["capture"])), f"{c['capture']}: SHA-256 against hashlib")
        check(c["frames"] == 1, "frames")
    # Three shards with different thread counts: the same bytes.
    sharded = os.path.join(D, "sharded")
    for i in (1, 2, 3):
        rc, out, err = run("batch", manifest, "--out", sharded, "--shard", f"{i}/3", "--threads", str(i % 2 + 1))
        check(rc == 0, f"shard {i}/3 exit {rc}: {err}")
        s = summary(sharded, i, 3)
        check([c["index"] for c in s["captures"]] == [k for k in range(len(names)) if k % 3 == i - 1],
              f"shard {i}/3 holds positions i with i mod 3 = {i - 1}: {[c['index'] for c in s['captures']]}")
    check(outputs(sharded) == expected, f"sharded outputs {outputs(sharded)}")
    for f in expected:
        check(filecmp.cmp(os.path.join(whole, f), os.path.join(sharded, f), shallow=False), f"{f}: bytes differ between runs")
    # `reconstruct` with the same settings writes the same image (one code path).
    single = os.path.join(D, "single.image.h5")
    rc, out, err = run("reconstruct", os.path.join(D, names[0]), "-o", single, "--grid-mm", "-3:3:0:8:0.1",
                       "--set", "das.f_number=1.5")
    check(rc == 0, f"reconstruct exit {rc}: {err}")
    check(filecmp.cmp(single, os.path.join(whole, "cap0.image.h5"), shallow=False), "reconstruct and batch differ")


def case_resume():
    names = setup(n=3, png=False)
    manifest = os.path.join(D, "manifest.json")
    out_dir = os.path.join(D, "out")
    rc, out, err = run("batch", manifest, "--out", out_dir)
    check(rc == 0, f"first run exit {rc}: {err}")
    mtimes = {f: os.stat(os.path.join(out_dir, f)).st_mtime_ns for f in outputs(out_dir)}
    rc, out, err = run("batch", manifest, "--out", out_dir, "--resume")
    check(rc == 0, f"resume exit {rc}: {err}")
    check([c["status"] for c in summary(out_dir)["captures"]] == ["up to date"] * 3, f"resume statuses: {summary(out_dir)}")
    check(all(os.stat(os.path.join(out_dir, f)).st_mtime_ns == t for f, t in mtimes.items()), "resume rewrote an output")
    # A changed capture is made again, the others are not.
    simulate(os.path.join(D, names[1]), 99)
    rc, out, err = run("batch", manifest, "--out", out_dir, "--resume")
    statuses = [c["status"] for c in summary(out_dir)["captures"]]
    check(statuses == ["up to date", "done", "up to date"], f"changed capture: {statuses}")
    check(summary(out_dir)["captures"][1]["sha256"] == sha256(os.path.join(D, names[1])), "new SHA-256 recorded")
    # A changed recipe makes everything again.
    write_manifest({"captures": names, "settings": ["das.f_number=2"], "grid_mm": "-3:3:0:8:0.1"})
    rc, out, err = run("batch", manifest, "--out", out_dir, "--resume")
    check([c["status"] for c in summary(out_dir)["captures"]] == ["done"] * 3, "changed recipe: all made again")
    # An interrupted run leaves no image in place (only PATH.partial, made again).
    os.remove(os.path.join(out_dir, "cap2.image.h5"))
    open(os.path.join(out_dir, "cap2.image.h5.partial"), "wb").write(b"half")
    rc, out, err = run("batch", manifest, "--out", out_dir, "--resume")
    check([c["status"] for c in summary(out_dir)["captures"]] == ["up to date", "up to date", "done"], "missing output made again")
    check(not os.path.exists(os.path.join(out_dir, "cap2.image.h5.partial")), "partial file replaced")


def case_failure_continues():
    names = setup(n=3, png=False)
    bad = os.path.join(D, "captures", "broken.h5")
    open(bad, "wb").write(b"not a capture\n" * 10)
    names.insert(1, "captures/broken.h5")
    manifest = write_manifest({"captures": names, "grid_mm": "-3:3:0:8:0.1"})
    out_dir = os.path.join(D, "out")
    rc, out, err = run("batch", manifest, "--out", out_dir)
    print(err)
    check(rc == 2, f"exit {rc} with one failed capture")
    s = summary(out_dir)
    statuses = [c["status"] for c in s["captures"]]
    check(statuses == ["done", "failed", "done", "done"], f"statuses {statuses}")
    failed = s["captures"][1]
    check(bad in failed.get("error", ""), f"error names the file: {failed.get('error')}")
    check(failed["sha256"] == sha256(bad), "failed capture's SHA-256 recorded")
    check(s["counts"] == {"done": 3, "up_to_date": 0, "failed": 1, "total": 4}, f"counts {s['counts']}")
    check("failed:" in err and "captures/broken.h5" in err.split("failed:")[-1], "failures listed at the end")
    check(not os.path.exists(os.path.join(out_dir, "broken.image.h5")), "no image for the failed capture")


def case_manifest_errors():
    setup(n=2, png=False)
    out_dir = os.path.join(D, "out")
    good = {"captures": ["captures/cap0.h5", "captures/cap1.h5"]}
    cases = [
        ("unknown key", dict(good, colour="red"), "colour"),
        ("missing capture", dict(good, captures=["captures/cap0.h5", "captures/nope.h5"]), "captures[1]"),
        ("empty captures", dict(good, captures=[]), "captures"),
        ("capture not text", dict(good, captures=[3]), "captures[0]"),
        ("bad setting", dict(good, settings=["das.f_number=1.5", "das.no_such=1"]), "settings[1]"),
        ("setting out of range", dict(good, settings=["das.f_number=-4"]), "settings[0]"),
        ("bad grid", dict(good, grid_mm="1:2:3"), "grid_mm"),
        ("png not bool", dict(good, png="yes"), "png"),
        ("recipe not object", dict(good, recipe=[1]), "recipe"),
        ("recipe unknown stage", dict(good, recipe={"nostage": {"x": 1}}), "recipe"),
        ("same stem twice", dict(good, captures=["captures/cap0.h5", "captures/../captures/cap0.h5"]), "captures[1]"),
    ]
    for name, m, key in cases:
        path = write_manifest(m, "bad.json")
        rc, out, err = run("batch", path, "--out", out_dir)
        print(f"{name:22s} {err.strip()}")
        check(rc == 2, f"{name}: exit {rc}")
        check(err.startswith(f"{path}: {key}: "), f"{name}: message names the manifest and '{key}': {err.strip()}")
        check(not os.path.exists(out_dir), f"{name}: nothing written")
    path = os.path.join(D, "bad.json")
    open(path, "w").write("{not json")
    rc, out, err = run("batch", path, "--out", out_dir)
    check(rc == 2 and err.startswith(path + ": ") and "JSON" in err, f"not JSON: {err}")
    rc, out, err = run("batch", os.path.join(D, "absent.json"), "--out", out_dir)
    check(rc == 2 and "absent.json" in err, f"absent manifest: {err}")
    for shard in ("0/2", "3/2", "1/0", "x", "1/2/3"):
        rc, out, err = run("batch", os.path.join(D, "manifest.json"), "--out", out_dir, "--shard", shard)
        check(rc == 2 and "--shard" in err, f"--shard {shard}: exit {rc}: {err}")
    rc, out, err = run("batch", os.path.join(D, "manifest.json"))
    check(rc == 2 and "--out" in err, f"without --out: {err}")


if __name__ == "__main__":
    main(globals(), cleanup=lambda: shutil.rmtree(D, ignore_errors=True))
