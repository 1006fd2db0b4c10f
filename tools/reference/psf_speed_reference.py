#!/usr/bin/python3
"""Speed yardstick for PsfBenchmark: the same Gibson-Lanni computation written with NumPy / SciPy vectorised
operations (scipy.special.j0 table, one matrix product per plane, np.interp of the radial profile at the voxel
centres: no pixel-area integration, so it does less work than the Java code). Prints the median seconds of three
runs. Usage: psf_speed_reference.py NX NY NZ PIXEL STEP. Run with Debian's /usr/bin/python3."""
import sys
import time
import numpy as np
from scipy.special import j0

nx, ny, nz = (int(a) for a in sys.argv[1:4])
pixel, step = float(sys.argv[4]), float(sys.argv[5])
na, lam, ni, ns, depth = 1.4, 0.52, 1.518, 1.33, 10.0


def psf():
    k = 2 * np.pi / lam
    dr = min(pixel / 4, 0.05 * lam / na)
    rmax = np.hypot(nx // 2 + 1, ny // 2 + 1) * pixel
    r = np.arange(0, rmax + 4 * dr, dr)
    rho_max = min(1.0, ns / na * (1 - 1e-9))
    n = int(16 * (k * na * rho_max * r[-1] / (2 * np.pi) + 60)) | 1
    rho = np.linspace(0, rho_max, n)
    w = np.ones(n)
    w[1:-1:2], w[2:-1:2] = 4, 2
    w *= (rho[1] - rho[0]) / 3 * rho
    table = j0(k * na * np.outer(r, rho)) * w
    ci = np.sqrt(1 - (na * rho / ni) ** 2)
    cs = np.sqrt(np.maximum(0, 1 - (na * rho / ns) ** 2))
    fixed = k * depth * (ns * cs - ni * ci)
    x = (np.arange(nx) - nx // 2) * pixel
    y = (np.arange(ny) - ny // 2) * pixel
    radius = np.hypot(x[None, :], y[:, None])
    out = np.empty((nz, ny, nx), np.float32)
    for iz in range(nz):
        z = (iz - nz // 2) * step
        field = table @ np.exp(1j * (fixed - k * z * ni * ci))
        out[iz] = np.interp(radius, r, np.abs(field) ** 2)
    return out / out.sum()


times = []
for _ in range(3):
    t0 = time.perf_counter()
    psf()
    times.append(time.perf_counter() - t0)
print("%.3f" % sorted(times)[1])
