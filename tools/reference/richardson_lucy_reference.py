#!/usr/bin/python3
"""Reference results of skimage.restoration.richardson_lucy (Debian python3-skimage 0.19.3) for the
compatibility check of our Richardson-Lucy: zero-padded 'same' convolution, start value 0.5, flipped PSF as
adjoint, no normalisation, clip=False.

Run from the repository root with Debian's python:  /usr/bin/python3 tools/reference/richardson_lucy_reference.py
Writes src/test/resources/reference/rl-<case>-{image,psf,result}.raw (little-endian float32, x fastest) and
rl-<case>.json (shapes as [depth, height, width], iterations, library versions).
"""
import json
import os

import numpy as np
import scipy
import skimage
from skimage.restoration import richardson_lucy

OUT = os.path.join("src", "test", "resources", "reference")


def gaussian_psf(shape, sigmas):
    grids = np.meshgrid(*[np.arange(n) - n // 2 for n in shape], indexing="ij")
    r2 = sum((g / s) ** 2 for g, s in zip(grids, sigmas))
    psf = np.exp(-0.5 * r2)
    return (psf / psf.sum()).astype(np.float32)


def specimen(shape, rng):
    img = np.full(shape, 5.0)
    for _ in range(12):
        c = [rng.integers(0, n) for n in shape]
        sl = tuple(slice(max(0, ci - 2), ci + 3) for ci in c)
        img[sl] += rng.uniform(20, 200)
    return img


def write(name, a):
    a.astype("<f4").tofile(os.path.join(OUT, name))


def case(name, shape, psf_shape, sigmas, iterations, seed):
    rng = np.random.default_rng(seed)
    truth = specimen(shape, rng)
    psf = gaussian_psf(psf_shape, sigmas)
    blurred = scipy.signal.convolve(truth, psf.astype(np.float64), mode="same")
    image = rng.poisson(np.maximum(blurred, 0)).astype(np.float32) + 1.0
    result = richardson_lucy(image, psf, num_iter=iterations, clip=False)
    write("rl-%s-image.raw" % name, image)
    write("rl-%s-psf.raw" % name, psf)
    write("rl-%s-result.raw" % name, result.astype(np.float32))
    meta = {
        "image_shape_zyx": list(image.shape) if image.ndim == 3 else [1] + list(image.shape),
        "psf_shape_zyx": list(psf.shape) if psf.ndim == 3 else [1] + list(psf.shape),
        "iterations": iterations,
        "call": "skimage.restoration.richardson_lucy(image, psf, num_iter=%d, clip=False)" % iterations,
        "skimage": skimage.__version__,
        "scipy": scipy.__version__,
        "numpy": np.__version__,
        "seed": seed,
    }
    with open(os.path.join(OUT, "rl-%s.json" % name), "w") as f:
        json.dump(meta, f, indent=1)


if __name__ == "__main__":
    os.makedirs(OUT, exist_ok=True)
    case("2d", (40, 36), (7, 5), (1.5, 1.2), 10, 1)
    case("3d", (10, 24, 20), (5, 7, 5), (1.0, 1.5, 1.3), 10, 2)
