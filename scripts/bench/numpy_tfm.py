#!/usr/bin/python3
# SPDX-License-Identifier: MIT
# Peer for end-to-end speed comparisons: a vectorised numpy total focusing method (Holmes,
# Drinkwater & Wilcox, NDT&E Int. 38 (2005) 701-711; delay (|r - tx| + |r - rx|) / c) on a
# full-matrix capture read with h5py: analytic signal by scipy.signal.hilbert, linear
# interpolation at the delay, every transmit-receive pair summed (no aperture), envelope.
# Usage: numpy_tfm.py CAPTURE.h5 XMIN XMAX ZMIN ZMAX N  (mm, N x N pixels); prints the peak.
import sys

import h5py
import numpy as np
from scipy.signal import hilbert


def main():
    path = sys.argv[1]
    x0, x1, z0, z1 = (float(v) * 1e-3 for v in sys.argv[2:6])
    n = int(sys.argv[6])
    with h5py.File(path, "r") as f:
        rf = f["/data/rf"][0].astype(np.float32) * float(f["/data/rf"].attrs.get("scale", 1.0))
        pos = f["/array/element_position_m"][:, 0]
        fs = float(f["/receive"].attrs["sampling_frequency_hz"])
        c = float(f["/medium"].attrs["speed_of_sound_m_s"])
        t0 = f["/receive/start_time_s"][:]
        tx_el = f["/transmit/source_element"][:]
        rx_el = f["/receive/element_index"][:]
    ntx, nrx, ns = rf.shape
    iq = hilbert(rf, axis=-1).astype(np.complex64)
    x = np.linspace(x0, x1, n, dtype=np.float32)
    z = np.linspace(z0, z1, n, dtype=np.float32)
    X, Z = np.meshgrid(x, z)
    # One-way times (samples) from every element to every pixel.
    dist = np.sqrt((X[None] - pos[:, None, None].astype(np.float32)) ** 2 + Z[None] ** 2) * np.float32(fs / c)
    img = np.zeros((n, n), np.complex64)
    for t in range(ntx):
        q = dist[tx_el[t]][None] + dist[rx_el] - np.float32(t0[t] * fs)  # [nrx, n, n]
        q = np.clip(q, 0, ns - 2)
        i = q.astype(np.int32)
        frac = (q - i).astype(np.float32)
        tr = iq[t]
        a = np.take_along_axis(tr, i.reshape(nrx, -1), axis=1).reshape(i.shape)
        b = np.take_along_axis(tr, (i + 1).reshape(nrx, -1), axis=1).reshape(i.shape)
        img += (a + frac * (b - a)).sum(axis=0)
    print("peak", float(np.abs(img).max()))


if __name__ == "__main__":
    main()
