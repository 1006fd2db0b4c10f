#!/usr/bin/python3
"""A second set of invented widefield stacks for the checks of the automatic deconvolution settings, made by a
generator independent of both the project's `simulate` and the first condition generator
(make_deconvolution_conditions.py): another PSF formula, specimen, camera and sampling, so a rule tuned on one set
can be tested on the other.

- PSF: the scalar paraxial Born & Wolf integral of a circular aperture in focus and out of focus,
    I(u, v) = |2 int_0^1 J0(v rho) exp(-i u rho^2 / 2) rho d rho|^2,  v = 2 pi NA r / lambda,
    u = 2 pi NA^2 z / (n lambda)
  (Born & Wolf, "Principles of Optics", 7th ed., 1999, sec. 8.8.1, eq. 8.8(13) with 8.8(14)), integrated in rho by
  adaptive quadrature (scipy.integrate.quad_vec) on a fine radial table, then averaged over 5 x 5 points of each
  pixel (point sampled in z). NA 1.0, water 1.33, 600 nm; voxels 0.1 x 0.1 x 0.3 um; the central 27 x 27 x 19
  voxels, normalised to unit sum, ARE the true PSF of the data (no aplanatic factor, no vector effects: a different
  model from the first generator's pupil-function FFT).
- Wrong PSFs given to the deconvolution: the true box cropped to the centred box of fewest voxels (square
  laterally) holding at least 60% of its energy (renormalised); the same formula at a 10% longer and a 10% shorter
  wavelength (every length 10% wider or narrower).
- Specimen: randomly oriented thin ellipsoidal shells (membrane label) around a faint lumen, wavy filaments
  (distance to a densely sampled centre line, scipy.spatial.cKDTree) and sub-resolution beads, drawn on a volume
  larger than the view, blurred by zero-padded FFT convolution (numpy.fft.rfftn) and cropped to the
  52 x 44 x 18 view, so light from outside the view reaches it.
- Camera, sCMOS-like with fixed pattern per camera pixel (the same for every plane): gain 1.6 ADU/e- with a 2%
  pixel-to-pixel spread, read noise log-normal around 1.2 e- (some pixels several times noisier), offset 100 ADU
  with a 0.7 ADU spread; ADU = round(gain_p * Poisson(photons) + offset_p + gain_p * read_p * Normal(0, 1)),
  clipped to 16 bits (numpy.random.Generator, PCG64).

Conditions (one data file each; the truth is the same specimen scaled to each condition's photons):
  base      blurred peak 800 photons, background 15 photons
  gradient  as base, background 4 + 60 (y / (h - 1))^1.5 + 8 z / (d - 1) photons (rises along y, curved)
  dim       blurred peak 25 photons, background 1.5
  bright    blurred peak 16000 photons, background 120

Run from the repository root:  /usr/bin/python3 tools/reference/make_born_wolf_conditions.py
Writes src/test/resources/reference/born-wolf-conditions/: <condition>.tif (uint16, ImageJ stack, calibrated,
zlib), truth.tif (float32, the specimen in the view with its brightest voxel 1), psf-{true,cropped60,wide10,
narrow10}.tif (float32, calibrated), conditions.txt (per condition: mean gain, read noise as the root mean square
over pixels in ADU, nominal offset, background photons (uniform, or the gradient's minimum), photons per truth unit)
and conditions.json (the same with the library versions, seed, cropped share). Deterministic.
"""
import json
import os

import numpy as np
import scipy
import scipy.integrate
import scipy.spatial
import scipy.special
import tifffile

OUT = os.path.join("src", "test", "resources", "reference", "born-wolf-conditions")

PIXEL = 0.10       # um, lateral
STEP = 0.30        # um, axial
NA = 1.0
INDEX = 1.33       # water
WAVELENGTH = 0.60  # um
PSF_SHAPE = (19, 27, 27)   # z, y, x
VIEW = (18, 44, 52)        # z, y, x
MARGIN = (9, 13, 13)       # drawn beyond the view on every side (half the PSF box)
SUB = 5                    # points per pixel side for the pixel average
SEED = 20261205


def born_wolf_psf(wavelength, shape=PSF_SHAPE):
    """Paraxial Born & Wolf intensity, radial table per plane by quad_vec, averaged over SUB x SUB points per pixel."""
    nz, ny, nx = shape
    offsets = (np.arange(SUB) + 0.5) / SUB - 0.5
    ys = ((np.arange(ny) - ny // 2)[:, None] + offsets[None, :]).ravel() * PIXEL
    xs = ((np.arange(nx) - nx // 2)[:, None] + offsets[None, :]).ravel() * PIXEL
    r = np.hypot(ys[:, None], xs[None, :])
    table_r = np.linspace(0.0, r.max() + PIXEL, 1200)
    v = 2 * np.pi * NA * table_r / wavelength
    out = np.zeros(shape)
    for iz in range(nz):
        z = (iz - nz // 2) * STEP
        u = 2 * np.pi * NA ** 2 * z / (INDEX * wavelength)

        def integrand(rho):
            j = scipy.special.j0(v * rho) * rho
            return np.concatenate([j * np.cos(u * rho ** 2 / 2), -j * np.sin(u * rho ** 2 / 2)])

        amp, _ = scipy.integrate.quad_vec(integrand, 0.0, 1.0, epsabs=1e-10, epsrel=1e-8, limit=400)
        profile = 4 * (amp[:v.size] ** 2 + amp[v.size:] ** 2)
        inten = np.interp(r, table_r, profile)
        out[iz] = inten.reshape(ny, SUB, nx, SUB).mean(axis=(1, 3))
    return out / out.sum()


def crop_to_share(psf, share):
    """Centred box of fewest voxels (square laterally, any depth) holding at least `share` of the energy."""
    nz, ny, nx = psf.shape
    best = None
    for hz in range(nz // 2 + 1):
        for h in range(min(ny, nx) // 2 + 1):
            box = psf[nz // 2 - hz:nz // 2 + hz + 1, ny // 2 - h:ny // 2 + h + 1, nx // 2 - h:nx // 2 + h + 1]
            if box.sum() >= share:
                if best is None or box.size < best.size:
                    best = box
                break
    return best / best.sum(), float(best.sum())


def rotation(rng):
    """A random rotation matrix (QR of a Gaussian matrix, signs fixed)."""
    q, r = np.linalg.qr(rng.normal(size=(3, 3)))
    return q * np.sign(np.diag(r))


def specimen(rng):
    """Shells, wavy filaments and beads on the view plus margins, in um (z, y, x)."""
    shape = tuple(v + 2 * m for v, m in zip(VIEW, MARGIN))
    grid = np.stack(np.meshgrid(np.arange(shape[0]) * STEP, np.arange(shape[1]) * PIXEL,
                                np.arange(shape[2]) * PIXEL, indexing="ij"), axis=-1)
    extent = np.array([shape[0] * STEP, shape[1] * PIXEL, shape[2] * PIXEL])
    vol = np.zeros(shape)
    for _ in range(4):  # ellipsoidal shells, 0.06 um thick (Gaussian), faint lumen
        c = rng.uniform(0.15, 0.85, size=3) * extent
        a = rng.uniform([0.7, 0.9, 0.9], [1.2, 1.8, 1.8])
        p = (grid - c) @ rotation(rng)
        rr = np.sqrt(((p / a) ** 2).sum(axis=-1))
        depth = (rr - 1.0) * a.mean()
        vol += rng.uniform(0.25, 0.45) * np.exp(-depth ** 2 / (2 * 0.06 ** 2))
        vol += 0.04 / (1.0 + np.exp(depth / 0.05))
    points = grid.reshape(-1, 3)
    for _ in range(7):  # wavy filaments: a line with a sinusoidal wiggle, Gaussian cross-section 0.045 um
        start = rng.uniform(0, 1, size=3) * extent
        d = rng.normal(size=3)
        d[0] *= 0.3  # mostly lateral
        d /= np.linalg.norm(d)
        n = np.cross(d, rng.normal(size=3))
        n /= np.linalg.norm(n)
        t = np.linspace(-8.0, 8.0, 4000)
        line = start + t[:, None] * d + 0.25 * np.sin(2 * np.pi * t / rng.uniform(1.5, 3.0))[:, None] * n
        dist, _ = scipy.spatial.cKDTree(line).query(points, distance_upper_bound=0.4)
        dist = np.where(np.isfinite(dist), dist, 1.0).reshape(shape)
        vol += rng.uniform(0.3, 0.6) * np.exp(-dist ** 2 / (2 * 0.045 ** 2))
    for _ in range(30):  # sub-resolution beads
        q = rng.uniform(0, 1, size=3) * extent
        d2 = ((grid[..., 0] - q[0]) / 0.15) ** 2 + ((grid[..., 1] - q[1]) / 0.06) ** 2 \
            + ((grid[..., 2] - q[2]) / 0.06) ** 2
        vol += rng.uniform(0.5, 1.0) * np.exp(-d2 / 2)
    return vol


def convolve(obj, psf):
    """Linear convolution by zero-padded real FFTs, 'same' size, centre of the kernel at index k // 2."""
    s = [a + b - 1 for a, b in zip(obj.shape, psf.shape)]
    full = np.fft.irfftn(np.fft.rfftn(obj, s) * np.fft.rfftn(psf, s), s)
    o = [k // 2 for k in psf.shape]
    return full[o[0]:o[0] + obj.shape[0], o[1]:o[1] + obj.shape[1], o[2]:o[2] + obj.shape[2]]


def view(a):
    return a[MARGIN[0]:MARGIN[0] + VIEW[0], MARGIN[1]:MARGIN[1] + VIEW[1], MARGIN[2]:MARGIN[2] + VIEW[2]]


def write_stack(name, a, dtype):
    tifffile.imwrite(os.path.join(OUT, name), a.astype(dtype), imagej=True, compression="zlib",
                     resolution=(1 / PIXEL, 1 / PIXEL), metadata={"spacing": STEP, "unit": "micron", "axes": "ZYX"})


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(SEED)
    psf = born_wolf_psf(WAVELENGTH)
    cropped, share = crop_to_share(psf, 0.60)
    wide = born_wolf_psf(WAVELENGTH * 1.1)
    narrow = born_wolf_psf(WAVELENGTH * 0.9)
    obj = specimen(rng)
    truth = view(obj)
    blurred = view(convolve(obj, psf))
    unit = 1.0 / truth.max()
    truth = truth * unit
    blurred = np.maximum(blurred * unit, 0.0)
    # camera: fixed pattern per pixel, the same for every plane
    gain = 1.6 * (1 + 0.02 * rng.normal(size=VIEW[1:]))
    read_e = 1.2 * np.exp(0.35 * rng.normal(size=VIEW[1:]))
    offset = 100.0 + 0.7 * rng.normal(size=VIEW[1:])
    read_adu_rms = float(np.sqrt(np.mean((gain * read_e) ** 2)))
    zz, yy, _ = np.meshgrid(np.arange(VIEW[0]), np.arange(VIEW[1]), np.arange(VIEW[2]), indexing="ij")
    ramp = 4.0 + 60.0 * (yy / (VIEW[1] - 1)) ** 1.5 + 8.0 * zz / (VIEW[0] - 1)
    conditions = {
        "base": dict(peak=800.0, background=15.0),
        "gradient": dict(peak=800.0, background="ramp"),
        "dim": dict(peak=25.0, background=1.5),
        "bright": dict(peak=16000.0, background=120.0),
    }
    meta = {"voxel_um": [PIXEL, PIXEL, STEP], "view_xyz": [VIEW[2], VIEW[1], VIEW[0]],
            "psf_xyz": [PSF_SHAPE[2], PSF_SHAPE[1], PSF_SHAPE[0]], "na": NA, "immersion_index": INDEX,
            "wavelength_nm": WAVELENGTH * 1000, "cropped60_shape_xyz": list(cropped.shape[::-1]),
            "cropped60_energy_share": share, "seed": SEED, "numpy": np.__version__, "scipy": scipy.__version__,
            "tifffile": tifffile.__version__, "gain_mean": float(gain.mean()), "read_noise_adu_rms": read_adu_rms,
            "read_noise_adu_median": float(np.median(gain * read_e)), "offset_mean": float(offset.mean()),
            "conditions": {}}
    for name, c in conditions.items():
        scale = c["peak"] / blurred.max()
        bg = ramp if c["background"] == "ramp" else np.full(VIEW, c["background"])
        electrons = rng.poisson(blurred * scale + bg)
        adu = gain * electrons + offset + gain * read_e * rng.normal(size=VIEW)
        write_stack(name + ".tif", np.clip(np.rint(adu), 0, 65535), np.uint16)
        entry = dict(c)
        entry["photons_per_truth_unit"] = float(scale)
        if c["background"] == "ramp":
            entry["background"] = "4 + 60 (y / (h - 1))^1.5 + 8 z / (d - 1) photons"
            entry["background_min"] = 4.0
            entry["background_mean"] = float(ramp.mean())
        meta["conditions"][name] = entry
    write_stack("truth.tif", truth, np.float32)
    write_stack("psf-true.tif", psf, np.float32)
    write_stack("psf-cropped60.tif", cropped, np.float32)
    write_stack("psf-wide10.tif", wide, np.float32)
    write_stack("psf-narrow10.tif", narrow, np.float32)
    with open(os.path.join(OUT, "conditions.txt"), "w") as f:
        f.write("# condition gain_adu_per_e (mean over pixels) read_noise_adu (rms over pixels) offset_adu (nominal)"
                " background_photons (uniform; for the gradient its minimum) photons_per_truth_unit\n")
        for name, e in meta["conditions"].items():
            bg = e.get("background_min", e["background"])
            f.write("%s %.4f %.4f %g %g %.6f\n" % (name, meta["gain_mean"], read_adu_rms, 100.0, bg,
                                                   e["photons_per_truth_unit"]))
    with open(os.path.join(OUT, "conditions.json"), "w") as f:
        json.dump(meta, f, indent=1, sort_keys=True)
        f.write("\n")
    print("wrote %s (cropped PSF %s holds %.3f of the energy)" % (OUT, cropped.shape[::-1], share))


if __name__ == "__main__":
    main()
