#!/usr/bin/python3
"""Invented widefield stacks for the checks of the automatic deconvolution settings (camera values, stop, background),
made WITHOUT the project's own PSF models, specimens or camera: an independent generator.

- PSF: scalar pupil-function model computed by numpy FFT. A pupil of radius NA / lambda in the lateral frequency
  plane with the aplanatic amplitude factor sqrt(cos theta) and the defocus phase exp(2 pi i kz z),
  kz = sqrt((n / lambda)^2 - k^2), is transformed to the image plane per z; the intensity is integrated over each
  pixel (3 x 3 sub-pixels) and the central 31 x 31 x 17 voxels (0.12 x 0.12 x 0.35 um; NA 0.8, water, 520 nm) are kept and normalised to unit
  sum. That box IS the true PSF of the data. (Goodman, "Introduction to Fourier Optics", 3rd ed., 2005, ch. 6:
  coherent transfer function of a circular pupil; defocus as the angular-spectrum propagator, ch. 3.10.)
- Wrong PSFs given to the deconvolution: the same box cropped to the smallest centred box holding 60% of its energy
  (renormalised); the model at a wavelength 10% longer (every length 10% wider) and 10% shorter.
- Specimen: soft-edged ellipsoidal cells with a textured cytoplasm and a brighter nucleus, curved filaments and
  point-like puncta, drawn on a volume larger than the view, blurred by FFT convolution (scipy.signal.fftconvolve)
  and cropped to the 48 x 48 x 16 view, so light from outside the view reaches it.
- Camera: photo-electrons ~ Poisson(blurred photons + background), ADU = gain * electrons + offset + Normal(0,
  read noise), rounded and clipped to 16 bits (numpy.random.Generator, PCG64).

Conditions (one data file each; the truth is the same specimen scaled to each condition's photons):
  base      sCMOS-like gain 2.2 ADU/e-, read noise 3 ADU, offset 100; blurred peak 1000 photons; background 20
  readnoise gain 1, read noise 6 ADU, offset 100; peak 200; background 4 (read noise dominates the background)
  gradient  as base, background rising from 5 to 80 photons across x and 10 more from the first to the last plane
  dim       as base, peak 30 photons, background 2
  bright    as base, peak 20000 photons, background 200

Run from the repository root:  /usr/bin/python3 tools/reference/make_deconvolution_conditions.py
Writes src/test/resources/reference/conditions/: <condition>.tif (uint16, ImageJ hyperstack, calibrated),
truth.tif (float32, the specimen in the view with its brightest voxel 1), psf-{true,cropped60,wide10,narrow10}.tif
(float32, calibrated), conditions.json (all truths: camera values, backgrounds, photon scale per condition,
energy share of the cropped PSF, library versions, seeds) and conditions.txt (the same truths as a table for the
tests). Deterministic.
"""
import json
import os

import numpy as np
import scipy
import scipy.signal
import tifffile

OUT = os.path.join("src", "test", "resources", "reference", "conditions")

PIXEL = 0.12      # um, lateral
STEP = 0.35       # um, axial
NA = 0.8
INDEX = 1.333     # water immersion, matched sample
WAVELENGTH = 0.52  # um
PSF_SHAPE = (17, 31, 31)  # z, y, x
VIEW = (16, 48, 48)
MARGIN = (8, 15, 15)     # drawn beyond the view on every side
SEED = 20261101


def pupil_psf(wavelength, shape=PSF_SHAPE, oversample=3, n_fine=768):
    """Scalar widefield PSF by the angular spectrum of a circular pupil; intensity integrated over each pixel."""
    dx = PIXEL / oversample
    f = np.fft.fftfreq(n_fine, d=dx)
    kx, ky = np.meshgrid(f, f, indexing="xy")
    k2 = kx ** 2 + ky ** 2
    cutoff = NA / wavelength
    kmed = INDEX / wavelength
    inside = k2 <= cutoff ** 2
    cos_theta = np.sqrt(np.maximum(0.0, 1.0 - k2 / kmed ** 2))
    amplitude = np.where(inside, np.sqrt(cos_theta), 0.0)
    kz = np.sqrt(np.maximum(0.0, kmed ** 2 - k2))
    nz, ny, nx = shape
    half_y, half_x = ny // 2, nx // 2
    out = np.zeros(shape)
    centre = n_fine // 2
    for iz in range(nz):
        z = (iz - nz // 2) * STEP
        field = np.fft.ifft2(amplitude * np.exp(2j * np.pi * kz * z))
        inten = np.abs(np.fft.fftshift(field)) ** 2
        # pixel (0, 0) of the output is centred on the optical axis at fine index `centre`
        y0 = centre - oversample // 2 - half_y * oversample
        x0 = centre - oversample // 2 - half_x * oversample
        block = inten[y0:y0 + ny * oversample, x0:x0 + nx * oversample]
        out[iz] = block.reshape(ny, oversample, nx, oversample).sum(axis=(1, 3))
    return out / out.sum()


def crop_to_energy(psf, share):
    """Smallest centred box (odd sizes, sizes shrunk in proportion) holding at least `share` of the energy."""
    nz, ny, nx = psf.shape
    best = None
    for s in np.linspace(1.0, 0.02, 400):
        hz = int(round((nz // 2) * s))
        hy = int(round((ny // 2) * s))
        hx = int(round((nx // 2) * s))
        box = psf[nz // 2 - hz:nz // 2 + hz + 1, ny // 2 - hy:ny // 2 + hy + 1, nx // 2 - hx:nx // 2 + hx + 1]
        if box.sum() >= share:
            best = box
        else:
            break
    return best / best.sum(), float(best.sum())


def specimen(rng):
    """Cells, filaments and puncta on the view plus margins; brightest voxel of the view later set to 1."""
    nz, ny, nx = (v + 2 * m for v, m in zip(VIEW, MARGIN))
    z, y, x = np.meshgrid(np.arange(nz) * STEP, np.arange(ny) * PIXEL, np.arange(nx) * PIXEL, indexing="ij")
    vol = np.zeros((nz, ny, nx))
    extent = (nz * STEP, ny * PIXEL, nx * PIXEL)
    # cells: soft ellipsoids, textured cytoplasm, nucleus
    for _ in range(4):
        c = [rng.uniform(0.2 * e, 0.8 * e) for e in extent]
        a = (rng.uniform(0.9, 1.4), rng.uniform(0.8, 1.3), rng.uniform(0.8, 1.3))
        r = np.sqrt(((z - c[0]) / a[0]) ** 2 + ((y - c[1]) / a[1]) ** 2 + ((x - c[2]) / a[2]) ** 2)
        edge = 1.0 / (1.0 + np.exp((r - 1.0) / 0.06))
        texture = 1.0
        for _ in range(3):
            k = rng.normal(0, 2.5, size=3)
            texture = texture + 0.25 * np.cos(k[0] * z + k[1] * y + k[2] * x + rng.uniform(0, 2 * np.pi))
        vol += 0.18 * edge * np.clip(texture, 0.3, None)
        rn = np.sqrt(((z - c[0]) / (0.45 * a[0])) ** 2 + ((y - c[1]) / (0.45 * a[1])) ** 2
                     + ((x - c[2]) / (0.45 * a[2])) ** 2)
        vol += 0.25 / (1.0 + np.exp((rn - 1.0) / 0.08))
    # filaments: quadratic Bezier curves with a Gaussian cross-section
    for _ in range(8):
        p = [np.array([rng.uniform(0, e) for e in extent]) for _ in range(3)]
        for t in np.linspace(0, 1, 160):
            q = (1 - t) ** 2 * p[0] + 2 * (1 - t) * t * p[1] + t ** 2 * p[2]
            d2 = ((z - q[0]) / 1.5) ** 2 + (y - q[1]) ** 2 + (x - q[2]) ** 2
            vol += 0.012 * np.exp(-d2 / (2 * 0.07 ** 2))
    # puncta
    for _ in range(20):
        q = [rng.uniform(0, e) for e in extent]
        d2 = ((z - q[0]) / 2.0) ** 2 + (y - q[1]) ** 2 + (x - q[2]) ** 2
        vol += rng.uniform(0.6, 1.2) * np.exp(-d2 / (2 * 0.06 ** 2))
    return vol


def view(a):
    mz, my, mx = MARGIN
    vz, vy, vx = VIEW
    return a[mz:mz + vz, my:my + vy, mx:mx + vx]


def record(rng, photons, gain, read_noise, offset):
    electrons = rng.poisson(np.maximum(photons, 0))
    adu = gain * electrons + offset + rng.normal(0, read_noise, size=photons.shape)
    return np.clip(np.rint(adu), 0, 65535).astype(np.uint16)


def write_stack(name, a, dtype):
    tifffile.imwrite(os.path.join(OUT, name), a.astype(dtype), imagej=True,
                     resolution=(1 / PIXEL, 1 / PIXEL), metadata={"spacing": STEP, "unit": "micron", "axes": "ZYX"})


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(SEED)
    psf = pupil_psf(WAVELENGTH)
    cropped, share = crop_to_energy(psf, 0.60)
    wide = pupil_psf(WAVELENGTH * 1.1)
    narrow = pupil_psf(WAVELENGTH * 0.9)
    obj = specimen(rng)
    blurred_full = scipy.signal.fftconvolve(obj, psf, mode="same")
    truth = view(obj)
    blurred = view(blurred_full)
    unit = 1.0 / truth.max()
    truth = truth * unit
    blurred = blurred * unit
    zz, yy, xx = np.meshgrid(np.arange(VIEW[0]), np.arange(VIEW[1]), np.arange(VIEW[2]), indexing="ij")
    ramp = 5.0 + 75.0 * xx / (VIEW[2] - 1) + 10.0 * zz / (VIEW[0] - 1)
    conditions = {
        "base": dict(peak=1000.0, background=20.0, gain=2.2, read_noise=3.0, offset=100.0),
        "readnoise": dict(peak=200.0, background=4.0, gain=1.0, read_noise=6.0, offset=100.0),
        "gradient": dict(peak=1000.0, background="ramp", gain=2.2, read_noise=3.0, offset=100.0),
        "dim": dict(peak=30.0, background=2.0, gain=2.2, read_noise=3.0, offset=100.0),
        "bright": dict(peak=20000.0, background=200.0, gain=2.2, read_noise=3.0, offset=100.0),
    }
    meta = {"voxel_um": [PIXEL, PIXEL, STEP], "view_xyz": [VIEW[2], VIEW[1], VIEW[0]],
            "psf_xyz": [PSF_SHAPE[2], PSF_SHAPE[1], PSF_SHAPE[0]], "na": NA, "immersion_index": INDEX,
            "wavelength_nm": WAVELENGTH * 1000, "cropped60_shape_xyz": list(cropped.shape[::-1]),
            "cropped60_energy_share": share, "seed": SEED, "numpy": np.__version__, "scipy": scipy.__version__,
            "tifffile": tifffile.__version__, "conditions": {}}
    for name, c in conditions.items():
        scale = c["peak"] / blurred.max()
        bg = ramp if c["background"] == "ramp" else np.full(VIEW, c["background"])
        data = record(rng, blurred * scale + bg, c["gain"], c["read_noise"], c["offset"])
        write_stack(name + ".tif", data, np.uint16)
        entry = dict(c)
        entry["photons_per_truth_unit"] = float(scale)
        if c["background"] == "ramp":
            entry["background"] = "5 + 75 x / (w - 1) + 10 z / (d - 1) photons"
            entry["background_min"] = 5.0
            entry["background_mean"] = float(ramp.mean())
        meta["conditions"][name] = entry
    write_stack("truth.tif", truth, np.float32)
    write_stack("psf-true.tif", psf, np.float32)
    write_stack("psf-cropped60.tif", cropped, np.float32)
    write_stack("psf-wide10.tif", wide, np.float32)
    write_stack("psf-narrow10.tif", narrow, np.float32)
    with open(os.path.join(OUT, "conditions.txt"), "w") as f:
        f.write("# condition gain_adu_per_e read_noise_adu offset_adu background_photons (uniform; for the ramp its"
                " minimum) photons_per_truth_unit\n")
        for name, e in meta["conditions"].items():
            bg = e.get("background_min", e["background"])
            f.write("%s %g %g %g %g %.6f\n" % (name, e["gain"], e["read_noise"], e["offset"], bg,
                                               e["photons_per_truth_unit"]))
    with open(os.path.join(OUT, "conditions.json"), "w") as f:
        json.dump(meta, f, indent=1, sort_keys=True)
        f.write("\n")
    print("wrote %s (cropped PSF %s holds %.3f of the energy)" % (OUT, cropped.shape[::-1], share))


if __name__ == "__main__":
    main()
