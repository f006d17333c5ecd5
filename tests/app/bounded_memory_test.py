#!/usr/bin/python3
# SPDX-License-Identifier: MIT
"""umbra-cli reconstruct keeps memory at one frame whatever the number of frames.

usage: bounded_memory_test.py UMBRA_CLI WORKDIR

A capture written here with h5py has many frames with echoes only in the first and the last
(the others hold zeros; 16 MiB on disk). Its frames x pixels
as float32 exceed the address-space cap (RLIMIT_AS, as `ulimit -v`) the program runs under,
so a program holding every frame at once fails with std::bad_alloc; reconstructing frame by
frame succeeds. Outside checks on the image file, read back with h5py:
- shape [N_frames, N_z, N_x] (docs/capture-format.md, image files);
- in frames 0 and N-1 the envelope peaks, on the column through the point reflector, at the
  pulse-echo depth z = c t / 2 of the echo written (t = two-way time of flight; textbook
  pulse-echo relation, e.g. Krautkraemer, Ultrasonic Testing of Materials), within one pulse
  length;
- a frame in between, whose traces are zero, is zero everywhere.
Peak resident memory comes from GNU time (/usr/bin/time -v) and is printed.
"""
import math
import os
import re
import resource
import shutil
import subprocess
import sys

import h5py
import numpy as np

HERE = os.path.dirname(os.path.abspath(__file__))
sys.dont_write_bytecode = True
sys.path.insert(0, os.path.join(HERE, "..", "core", "fixtures"))
import write_capture as wc  # noqa: E402

CLI, WORK = sys.argv[1], sys.argv[2]
D = os.path.join(WORK, f"bounded_memory_{os.getpid()}")

N_FRAMES = int(os.environ.get("UMBRA_BOUNDED_FRAMES", "512"))
CAP_BYTES = 320 << 20            # address-space cap for umbra-cli (the libraries alone map about 200 MiB)
GRID_MM = "-3:3:1:15:0.02"      # 301 x 701 pixels: 0.84 MB per frame
N_SAMPLES = 256
C = wc.SPEED_OF_SOUND_M_S
FS = wc.SAMPLING_FREQUENCY_HZ
F0 = wc.CENTRE_FREQUENCY_HZ
Z_ECHO_M = [6.0e-3, 10.0e-3]    # point reflector depth in the first and the last frame


def write_capture(path):
    """The h5py fixture with /data/rf replaced: [N_FRAMES, N_tx, N_el, N_SAMPLES] float32,
    start times 0, no wedge, a point echo (Gaussian-windowed 5 MHz tone burst) in frames
    0 and N_FRAMES - 1 only."""
    wc.write(path, wedge=False)
    with h5py.File(path, "r+") as f:
        del f["data/rf"]
        del f["scan"]
        del f["truth"]
        del f["receive/start_time_s"]
        del f["transmit/delay_s"]
        del f["transmit/apodization"]
        f["receive"].create_dataset("start_time_s", data=np.zeros(wc.N_TX))
        rf = f["data"].create_dataset("rf", shape=(N_FRAMES, wc.N_TX, wc.N_EL, N_SAMPLES), dtype=np.float32,
                                      chunks=(1, 1, wc.N_EL, N_SAMPLES))
        rf.attrs["scale"] = 1.0
        rf.attrs["units"] = "V"
        # Every frame is stored (zeros between the two echo frames): a capture whose traces were
        # never written is refused as damaged.
        rf[...] = np.zeros(rf.shape, dtype=np.float32)
        x = np.array(wc.ELEMENT_X_M)
        t = np.arange(N_SAMPLES) / FS
        sigma = 1.5 / F0 / 2.355  # about 1.5 cycles at half amplitude
        for frame, z in ((0, Z_ECHO_M[0]), (N_FRAMES - 1, Z_ECHO_M[1])):
            block = np.zeros((wc.N_TX, wc.N_EL, N_SAMPLES), dtype=np.float32)
            for k, src in enumerate(wc.SOURCE_ELEMENT):
                for r in range(wc.N_EL):
                    tof = (math.hypot(x[src], z) + math.hypot(x[r], z)) / C
                    block[k, r] = np.exp(-0.5 * ((t - tof) / sigma) ** 2) * np.cos(2 * math.pi * F0 * (t - tof))
            rf[frame] = block


def limit_address_space():
    resource.setrlimit(resource.RLIMIT_AS, (CAP_BYTES, CAP_BYTES))


def main():
    shutil.rmtree(D, ignore_errors=True)
    os.makedirs(D)
    failures = []
    try:
        cap = os.path.join(D, "many_frames.h5")
        write_capture(cap)
        out = os.path.join(D, "many_frames.image.h5")
        p = subprocess.run(["/usr/bin/time", "-v", CLI, "reconstruct", cap, "-o", out, "--grid-mm", GRID_MM,
                            "--threads", "1", "--set", "tgc.mode=off"],
                           capture_output=True, text=True, timeout=900, preexec_fn=limit_address_space)
        peak_kb = re.search(r"Maximum resident set size \(kbytes\): (\d+)", p.stderr)
        if p.returncode != 0:
            print(p.stderr[-3000:])
            print(f"FAIL: reconstruct exit {p.returncode} under an address-space cap of {CAP_BYTES >> 20} MiB")
            return 1
        with h5py.File(out, "r") as f:
            env = f["image/envelope"]
            xs, zs = f["image/x_m"][:], f["image/z_m"][:]
            shape = env.shape
            frames = {i: env[i] for i in (0, N_FRAMES // 2, N_FRAMES - 1)}
        all_bytes = shape[0] * shape[1] * shape[2] * 4
        print(f"capture {os.path.getsize(cap) / 1e3:.0f} kB claiming {N_FRAMES} frames; image {shape} float32 = "
              f"{all_bytes / 2**20:.0f} MiB for all frames; address-space cap {CAP_BYTES / 2**20:.0f} MiB; "
              f"peak resident {int(peak_kb.group(1)) / 1024 if peak_kb else float('nan'):.1f} MiB; exit {p.returncode}")
        if not all_bytes > CAP_BYTES:
            failures.append("the test does not exceed the cap: frames x pixels must be larger than it")
        if shape != (N_FRAMES, len(zs), len(xs)):
            failures.append(f"shape {shape}")
        ix = int(np.argmin(np.abs(xs)))
        for i, z in ((0, Z_ECHO_M[0]), (N_FRAMES - 1, Z_ECHO_M[1])):
            col = frames[i][:, ix]
            z_peak = zs[int(np.argmax(col))]
            pulse_m = 1.5 / F0 * C / 2  # echo length in depth
            print(f"frame {i}: peak at z = {z_peak * 1e3:.2f} mm, expected {z * 1e3:.2f} mm (+- {pulse_m * 1e3:.2f})")
            if not abs(z_peak - z) <= pulse_m:
                failures.append(f"frame {i}: peak at {z_peak} m, expected {z} m")
        if np.any(frames[N_FRAMES // 2] != 0):
            failures.append("a frame with zero traces is not zero")
    finally:
        shutil.rmtree(D, ignore_errors=True)
    for f in failures:
        print("FAIL:", f)
    return 1 if failures else 0


if __name__ == "__main__":
    sys.exit(main())
