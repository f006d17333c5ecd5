#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""umbra-cli on wedge captures: info lists the views, reconstruct images a view in the specimen
frame and records it, and bad wedge geometry or an impossible view is exit 2 with a message.

usage: wedge_test.py UMBRA_CLI WORKDIR CASE

The capture is the h5py fixture of tests/core/fixtures/write_capture.py (a wedge, shear speed
and thickness recorded), edited here with h5py for the bad cases.
"""
import math
import json
import os
import shutil
import sys

import h5py

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True
sys.path.insert(0, os.path.join(HERE, "..", "core", "fixtures"))
import write_capture as wc  # noqa: E402
sys.path.insert(0, HERE)
from cli_case import CASE, WORK, check, main, run  # noqa: E402

ALL_MODES = ["L-L", "T-T", "L-T", "T-L", "LL-L", "L-LL", "LL-LL", "TT-T", "T-TT", "TT-TT", "LT-T", "T-LT", "TL-T", "T-TL"]


def capture(name="fixture.h5"):
    d = os.path.join(WORK, "wedge_" + CASE)
    os.makedirs(d, exist_ok=True)
    path = os.path.join(d, name)
    wc.write(path)
    return path


def case_info():
    path = capture()
    rc, out, err = run("info", "--json", path)
    check(rc == 0, f"info exit {rc}: {err}")
    j = json.loads(out)
    check(j["valid_modes"] == ALL_MODES, f"valid modes {j['valid_modes']}")
    # Snell's law for the central ray: sin(theta) = c / c_wedge * sin(tilt).
    want_t = math.degrees(math.asin(wc.SHEAR_SPEED_M_S / wc.WEDGE_SPEED_M_S * math.sin(wc.WEDGE_TILT_RAD)))
    check(abs(j["wedge"]["refracted_t_deg"] - want_t) < 1e-9, f"refracted T {j['wedge']['refracted_t_deg']} vs {want_t}")
    rc, out, err = run("info", path)
    check(rc == 0 and "Views        L-L T-T" in out and "specimen frame" in out, f"text info: {out}")
    with h5py.File(path, "r+") as f:
        del f["medium"].attrs["shear_speed_m_s"]
    rc, out, err = run("info", "--json", path)
    check(json.loads(out)["valid_modes"] == ["L-L", "LL-L", "L-LL", "LL-LL"], f"without shear speed: {out}")


def case_reconstruct():
    path = capture()
    img = os.path.join(os.path.dirname(path), "tt_t.h5")
    rc, out, err = run("reconstruct", path, "-o", img, "--grid-mm", "2:12:1:11:0.5", "--set", "delay_model.mode=TT-T", "--frames", "1")
    check(rc == 0, f"reconstruct TT-T exit {rc}: {err}")
    if rc == 0:
        with h5py.File(img, "r") as f:
            check(f.attrs["view_mode"] == "TT-T", f"view_mode {f.attrs.get('view_mode')}")
            check(f.attrs["image_frame"] == "specimen", f"image_frame {f.attrs.get('image_frame')}")
            x = f["image/x_m"][()]
            check(abs(x[0] - 2e-3) < 1e-12 and abs(x[-1] - 12e-3) < 1e-9, f"x axis in the specimen frame {x[0]}..{x[-1]}")
            check(json.loads(f.attrs["recipe_json"])["delay_model"]["mode"] == "TT-T", "recipe records the mode")
            # The geometry the view-aware point-spread model of measure needs, copied from /medium.
            for name, want in [("shear_speed_m_s", wc.SHEAR_SPEED_M_S), ("thickness_m", wc.THICKNESS_M),
                               ("wedge_speed_m_s", wc.WEDGE_SPEED_M_S), ("wedge_origin_x_m", wc.WEDGE_ORIGIN_M[0]),
                               ("wedge_origin_z_m", wc.WEDGE_ORIGIN_M[2]), ("wedge_tilt_rad", wc.WEDGE_TILT_RAD)]:
                check(name in f.attrs and abs(f.attrs[name] - want) < 1e-12, f"{name} {f.attrs.get(name)} (want {want})")
        # (The fixture's 64 samples hold no TT-T echo: the image is empty and measure finds
        # nothing, exit 1, but it still reports its warnings.)
        rc, out, err = run("measure", img, "--tool", "peak", "--box-mm", "4:10:3:9", "--json")
        check(rc in (0, 1), f"measure exit {rc}: {err}")
        if rc in (0, 1):
            j = json.loads(out)
            check(not any("assumes contact" in w for w in j["warnings"]), f"view model used: {j['warnings']}")
        # The same image without the wedge geometry (a file written before it was recorded): the
        # contact model, with its warning.
        with h5py.File(img, "r+") as f:
            del f.attrs["wedge_tilt_rad"]
        rc, out, err = run("measure", img, "--tool", "peak", "--box-mm", "4:10:3:9", "--json")
        check(rc in (0, 1) and any("assumes contact" in w for w in json.loads(out)["warnings"]), f"older image: {out} {err}")


def expect_refused(path, needle, *extra):
    img = os.path.join(os.path.dirname(path), "out.h5")
    rc, out, err = run("reconstruct", path, "-o", img, "--frames", "1", *extra)
    check(rc == 2, f"{needle}: exit {rc} (want 2): {err}")
    check(needle in err, f"message should mention '{needle}': {err}")
    check(not os.path.exists(img), f"{needle}: no image written")


def case_errors():
    base = capture()
    grid = ("--grid-mm", "2:12:1:11:0.5")

    def edited(name, fn):
        p = os.path.join(os.path.dirname(base), name)
        shutil.copy(base, p)
        with h5py.File(p, "r+") as f:
            fn(f)
        return p

    inside = edited("inside.h5", lambda f: f["medium/wedge"].attrs.__setitem__("surface_origin_m", [0.0, 0.0, -0.004]))
    expect_refused(inside, "below the part surface", *grid, "--set", "delay_model.mode=T-T")
    steep = edited("steep.h5", lambda f: f["medium/wedge"].attrs.__setitem__("surface_tilt_rad", math.pi / 2))
    expect_refused(steep, "surface_tilt_rad", *grid)
    slow = edited("slow.h5", lambda f: f["medium/wedge"].attrs.__setitem__("speed_of_sound_m_s", 30.0))
    expect_refused(slow, "wedge", *grid)
    expect_refused(base, "no path", "--grid-mm", "2:12:25:30:0.5", "--set", "delay_model.mode=TT-T")
    noshear = edited("noshear.h5", lambda f: f["medium"].attrs.__delitem__("shear_speed_m_s"))
    expect_refused(noshear, "shear_speed_m_s", *grid, "--set", "delay_model.mode=T-T")
    expect_refused(base, "delay_model.mode", *grid, "--set", "delay_model.mode=Q-Q")


def cleanup():
    shutil.rmtree(os.path.join(WORK, "wedge_" + CASE), ignore_errors=True)


main(globals(), cleanup)
