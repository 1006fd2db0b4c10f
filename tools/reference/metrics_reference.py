#!/usr/bin/python3
"""Reference values for the image quality metrics (inspect.QualityMetrics, inspect.Ssim).

Makes small invented image pairs (seeded), saves them as float32 TIFF and writes the values scikit-image and
scipy compute for them into metrics-reference.txt. Run from the repository root with Debian's python3
(python3-skimage 0.19.3, python3-scipy 1.10.1, python3-tifffile 2023.2.3):

    /usr/bin/python3 tools/reference/metrics_reference.py
"""
import os

import numpy as np
import scipy
import scipy.ndimage as ndi
import scipy.stats
import skimage
import tifffile
from skimage.metrics import normalized_root_mse, peak_signal_noise_ratio, structural_similarity

OUT = os.path.join("src", "test", "resources", "reference")


def blobs(shape, rng, n):
    img = np.zeros(shape)
    grid = np.indices(shape).astype(float)
    for _ in range(n):
        c = [rng.uniform(0, s) for s in shape]
        r = rng.uniform(1.5, 4.0)
        d2 = sum((g - ci) ** 2 for g, ci in zip(grid, c))
        img += rng.uniform(100, 1000) * np.exp(-d2 / (2 * r * r))
    return img + 20


def pair(shape, seed, n):
    rng = np.random.default_rng(seed)
    ref = blobs(shape, rng, n)
    test = ndi.gaussian_filter(ref, 0.8) * 0.95 + rng.normal(0, 15, shape) + 5
    return ref.astype(np.float32), test.astype(np.float32)


def main():
    os.makedirs(OUT, exist_ok=True)
    cases = [
        # name, shape (numpy order: z, y, x), seed, blobs, data_range (None: reference max - min), channel_axis
        ("metrics-2d", (48, 64), 1, 12, None, None),
        ("metrics-3d", (14, 20, 24), 2, 10, 1000.0, None),
        ("metrics-thin", (5, 28, 32), 3, 8, None, 0),
    ]
    lines = ["# name metric value  (skimage %s, scipy %s, numpy %s; inputs cast to float64)"
             % (skimage.__version__, scipy.__version__, np.__version__)]
    for name, shape, seed, n, rng_value, axis in cases:
        ref, test = pair(shape, seed, n)
        axes = {"axes": "ZYX" if ref.ndim == 3 else "YX"}
        tifffile.imwrite(os.path.join(OUT, name + "-reference.tif"), ref, imagej=True, metadata=axes)
        tifffile.imwrite(os.path.join(OUT, name + "-input.tif"), test, imagej=True, metadata=axes)
        r = ref.astype(np.float64)
        t = test.astype(np.float64)
        dr = float(r.max() - r.min()) if rng_value is None else rng_value
        ssim = structural_similarity(r, t, gaussian_weights=True, sigma=1.5, use_sample_covariance=False,
                                     data_range=dr, channel_axis=axis)
        values = {
            "data_range": dr,
            "ssim": ssim,
            "psnr": peak_signal_noise_ratio(r, t, data_range=dr),
            "nrmse": normalized_root_mse(r, t, normalization="euclidean"),
            "nrmse_minmax": normalized_root_mse(r, t, normalization="min-max"),
            "nrmse_mean": normalized_root_mse(r, t, normalization="mean"),
            "pearson": scipy.stats.pearsonr(r.ravel(), t.ravel())[0],
        }
        for k, v in values.items():
            lines.append("%s %s %.12g" % (name, k, v))
    with open(os.path.join(OUT, "metrics-reference.txt"), "w") as f:
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
