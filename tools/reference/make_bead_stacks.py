#!/usr/bin/python3
"""Bead stacks made outside the project, for checking psf-refine: an independent generator.

The scalar Gibson-Lanni focus (Gibson & Lanni, JOSA A 8(10):1601-1613, 1991) is integrated here with
Gauss-Legendre quadrature from SciPy (scipy.special.roots_legendre, 3000 nodes) instead of the project's
Simpson rule over tabulated Bessel values:

  I(r, z) = |integral_0^rho_max J0(k NA r rho) exp(i k W(rho, z)) rho d rho|^2,  k = 2 pi / lambda
  W = depth (ns cs - ni ci) - z ni ci,  c_m = sqrt(1 - (NA rho / n_m)^2)

(z = focus movement from where an index-matched sample would be in focus, positive = deeper). Each bead is a
point at a random sub-voxel position; its axial intensity maximum is found here by a dense scan and placed at
that position. Every voxel is the mean of 5 x 5 sub-samples of I (linear interpolation on a 2 nm radial grid),
scaled so that each plane carries `photons` in total; then the camera: Poisson photons (NumPy PCG64), gain,
offset, Gaussian read noise, rounded to 16-bit ADU.

Writes src/test/resources/reference/beads-<name>.tif (16-bit, ImageJ calibration) and beads-<name>.json (the
truth). Run with Debian's /usr/bin/python3 (python3-scipy, python3-numpy, python3-tifffile).
"""
import json
import os

import numpy as np
import scipy
import tifffile
from scipy.special import j0, roots_legendre

NA, LAM, NI, NS = 1.3, 0.52, 1.518, 1.33
PX, PZ = 0.1, 0.2
NX, NY, NZ = 56, 56, 32
GAIN, OFFSET, READ_NOISE = 2.0, 100.0, 1.5
CASES = {"depth8": dict(depth=8.0, seed=101), "depth20": dict(depth=20.0, seed=202)}

NODES, WEIGHTS = roots_legendre(3000)


def focus(depth, r, z):
    """I(r, z) for arrays r (radii, um) and one z."""
    k = 2 * np.pi / LAM
    rho_max = min(1.0, NS / NA * (1 - 1e-9))
    rho = 0.5 * rho_max * (NODES + 1)
    w = 0.5 * rho_max * WEIGHTS
    ci = np.sqrt(1 - (NA * rho / NI) ** 2)
    cs = np.sqrt(np.maximum(0, 1 - (NA * rho / NS) ** 2))
    phase = k * (depth * (NS * cs - NI * ci) - z * NI * ci)
    pupil = np.exp(1j * phase) * rho * w
    field = j0(k * NA * np.outer(r, rho)) @ pupil
    return np.abs(field) ** 2


def axial_maximum(depth):
    zs = np.linspace(-2, 2 + 0.3 * depth, 2001)
    on_axis = np.array([focus(depth, np.array([0.0]), z)[0] for z in zs])
    i = int(np.argmax(on_axis))
    fine = np.linspace(zs[max(i - 1, 0)], zs[min(i + 1, len(zs) - 1)], 401)
    vals = np.array([focus(depth, np.array([0.0]), z)[0] for z in fine])
    return fine[int(np.argmax(vals))]


def render(depth, beads, rng):
    peak = axial_maximum(depth)
    r_grid = np.arange(0, 4.0, 0.002)
    k = 2 * np.pi / LAM
    power = np.pi * min(1.0, NS / NA) ** 2 / (k * NA) ** 2
    sub = (np.arange(5) - 2) / 5.0
    mu = np.full((NZ, NY, NX), 0.0)
    yy, xx = np.mgrid[0:NY, 0:NX]
    for b in beads:
        for z in range(NZ):
            prof = focus(depth, r_grid, peak + (z - b["z"]) * PZ) / power
            acc = np.zeros((NY, NX))
            for sy in sub:
                for sx in sub:
                    rr = np.hypot((xx + sx - b["x"]) * PX, (yy + sy - b["y"]) * PX)
                    acc += np.interp(rr, r_grid, prof, right=0.0)
            mu[z] += b["photons"] * acc / 25 * PX * PX
    mu += 15.0
    counts = rng.poisson(mu)
    adu = GAIN * counts + OFFSET + READ_NOISE * rng.standard_normal(mu.shape)
    return np.clip(np.rint(adu), 0, 65535).astype(np.uint16), peak


here = os.path.dirname(__file__)
out_dir = os.path.join(here, "..", "..", "src", "test", "resources", "reference")
for name, c in CASES.items():
    rng = np.random.Generator(np.random.PCG64(c["seed"]))
    beads = []
    for bx in (14, 41):
        for by in (14, 41):
            beads.append(dict(x=bx + rng.uniform(-0.5, 0.5), y=by + rng.uniform(-0.5, 0.5),
                              z=15.5 + rng.uniform(-0.5, 0.5), photons=float(rng.uniform(3000, 5000))))
    stack, peak = render(c["depth"], beads, rng)
    tifffile.imwrite(os.path.join(out_dir, "beads-%s.tif" % name), stack, imagej=True,
                     resolution=(1 / PX, 1 / PX), metadata={"spacing": PZ, "unit": "micron", "axes": "ZYX"})
    truth = dict(made_by="tools/reference/make_bead_stacks.py", scipy=scipy.__version__, numpy=np.__version__,
                 tifffile=tifffile.__version__, na=NA, wavelength_nm=LAM * 1000, immersion_index=NI,
                 sample_index=NS, depth_um=c["depth"], pixel_um=PX, step_um=PZ, gain=GAIN, offset_adu=OFFSET,
                 read_noise_adu=READ_NOISE, background_photons=15.0, axial_maximum_um=float(peak),
                 beads=beads, photons_are="per plane (the in-focus plane integral)")
    with open(os.path.join(out_dir, "beads-%s.json" % name), "w") as f:
        json.dump(truth, f, indent=1)
    print(name, "axial maximum", peak, "max ADU", stack.max())
