"""Same computation as lib/strain/batch.ts (F, E, principal values and axis, rotation, areal strain,
max shear), vectorised in numpy, single-threaded. Used by test/bench/kernel.ts.

usage: kernel_numpy.py REF.bin CUR.bin N_TRIANGLES N_EPOCHS OUT.bin RUNS
Prints one JSON line {"medianS": ..., "runsS": [...]} (CPU seconds, time.process_time) and writes the outputs of the last run to OUT.bin
as float64 columns [F00, F01, F10, F11, Exx, Eyy, Exy, gMax, gMin, azimuthDeg, rotationDeg, areal, maxShear].
"""
import os

for _v in ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS", "NUMEXPR_NUM_THREADS", "VECLIB_MAXIMUM_THREADS"):
    os.environ[_v] = "1"

import json
import sys
import time

import numpy as np


def compute(ref, cur):
    # ref: (nTri, 6), cur: (nEp, nTri, 6)
    e1x = ref[:, 2] - ref[:, 0]
    e1y = ref[:, 3] - ref[:, 1]
    e2x = ref[:, 4] - ref[:, 0]
    e2y = ref[:, 5] - ref[:, 1]
    inv = 1.0 / (e1x * e2y - e2x * e1y)
    g00 = e2y * inv
    g01 = -e2x * inv
    g10 = -e1y * inv
    g11 = e1x * inv
    u = cur - ref[None, :, :]
    d1x = u[..., 2] - u[..., 0]
    d1y = u[..., 3] - u[..., 1]
    d2x = u[..., 4] - u[..., 0]
    d2y = u[..., 5] - u[..., 1]
    h00 = d1x * g00 + d2x * g10
    h01 = d1x * g01 + d2x * g11
    h10 = d1y * g00 + d2y * g10
    h11 = d1y * g01 + d2y * g11
    exx = h00 + 0.5 * (h00 * h00 + h10 * h10)
    eyy = h11 + 0.5 * (h01 * h01 + h11 * h11)
    exy = 0.5 * (h01 + h10 + h00 * h01 + h10 * h11)
    mean = 0.5 * (exx + eyy)
    half = 0.5 * (exx - eyy)
    radius = np.sqrt(half * half + exy * exy)
    gmax = mean + radius
    gmin = mean - radius
    theta = 0.5 * np.arctan2(2.0 * exy, exx - eyy)
    az = np.mod(90.0 - np.degrees(theta), 180.0)
    rot = np.degrees(np.arctan2(h10 - h01, 2.0 + h00 + h11))
    areal = h00 + h11 + (h00 * h11 - h01 * h10)
    return (1.0 + h00, h01, h10, 1.0 + h11, exx, eyy, exy, gmax, gmin, az, rot, areal, 2.0 * radius)


def main():
    ref_path, cur_path, n_tri, n_ep, out_path, runs = sys.argv[1:7]
    n_tri, n_ep, runs = int(n_tri), int(n_ep), int(runs)
    ref = np.fromfile(ref_path, dtype=np.float64).reshape(n_tri, 6)
    cur = np.fromfile(cur_path, dtype=np.float64).reshape(n_ep, n_tri, 6)
    compute(ref, cur)  # warm-up
    times = []
    out = None
    for _ in range(runs):
        t0 = time.process_time()
        out = compute(ref, cur)
        times.append(time.process_time() - t0)
    np.stack([np.ravel(c) for c in out], axis=1).astype(np.float64).tofile(out_path)
    print(json.dumps({"medianS": float(np.median(times)), "runsS": times, "numpy": np.__version__}))


if __name__ == "__main__":
    main()
