#!/usr/bin/python3
"""Reference fills for the biharmonic inpainting check (org.stackwright.repair.InpaintReferenceTest).

Run with Debian's python3 (python3-skimage 0.19.3, numpy):  /usr/bin/python3 tools/reference/make_inpaint_reference.py
Writes into src/test/resources/reference/: for each case NAME
  inpaint-NAME.json            shape, library versions, what the files hold
  inpaint-NAME-image.raw       the image, float32 little-endian, row-major (y, x)
  inpaint-NAME-mask.raw        uint8, 1 = fill
  inpaint-NAME-biharmonic.raw  skimage.restoration.inpaint_biharmonic(image, mask), float32 little-endian
All holes are interior (at least 4 pixels from the border) and at least 6 pixels apart, so the 13-point stencil of
the bi-Laplacian is the same in both programs (skimage uses another stencil near the image border).

Finding (checked below for every case): for some holes, e.g. a disk of radius 4 or 5 or an 11 x 11 square, the
output of inpaint_biharmonic in scikit-image 0.19.3 does not satisfy its own 13-point equations inside the hole
(residual of the bi-Laplacian up to ~0.08 on data of range ~0.6), while a direct sparse solve of those equations
does. The committed cases are ones where skimage's output satisfies its equations (residual < 1e-9), so the
comparison tests our solver, not that discrepancy.
"""
import json
import os

import numpy as np
import skimage
from scipy import ndimage as ndi
from skimage.restoration import inpaint_biharmonic

OUT = os.path.join(os.path.dirname(os.path.abspath(__file__)), "..", "..", "src", "test", "resources", "reference")


def smooth_image(h, w, seed):
    rng = np.random.default_rng(seed)
    y, x = np.mgrid[0:h, 0:w].astype(np.float64)
    img = 0.3 + 0.1 * np.sin(x / 7.0) * np.cos(y / 5.0)
    for _ in range(6):
        cx, cy = rng.uniform(0, w), rng.uniform(0, h)
        s = rng.uniform(3, 9)
        img += rng.uniform(0.1, 0.4) * np.exp(-((x - cx) ** 2 + (y - cy) ** 2) / (2 * s * s))
    return img


def case_blobs():
    h, w = 64, 64
    img = smooth_image(h, w, 1)
    mask = np.zeros((h, w), bool)
    mask[8:15, 10:19] = True                       # rectangle 7 x 9
    yy, xx = np.mgrid[0:h, 0:w]
    mask |= (xx - 44) ** 2 + (yy - 20) ** 2 <= 9   # disk of radius 3
    mask[40, 6:20] = True                          # thin line
    mask[50:52, 30:58] = True                      # short seam-like band
    mask[31:44:6, 28:58:6] = True                  # isolated pixels, 6 apart
    return img, mask


def case_band():
    h, w = 40, 48
    img = smooth_image(h, w, 2) + 0.05 * np.outer(np.linspace(0, 1, h), np.linspace(1, 0, w))
    mask = np.zeros((h, w), bool)
    mask[17:20, 5:43] = True                       # seam band 3 px wide
    mask[5:12, 30:36] = True
    mask[28:33, 8:13] = True
    return img, mask


def write(name, img, mask):
    img32 = img.astype(np.float32)
    ref = inpaint_biharmonic(img32.astype(np.float64), mask)
    stencil = np.array([[0, 0, 1, 0, 0], [0, 2, -8, 2, 0], [1, -8, 20, -8, 1], [0, 2, -8, 2, 0], [0, 0, 1, 0, 0]], float)
    residual = np.abs(ndi.correlate(ref, stencil)[mask]).max()
    if residual > 1e-9:
        raise SystemExit("case %s: skimage's fill leaves a bi-Laplacian residual of %g; choose another hole" % (name, residual))
    base = os.path.join(OUT, "inpaint-" + name)
    img32.astype("<f4").tofile(base + "-image.raw")
    mask.astype(np.uint8).tofile(base + "-mask.raw")
    ref.astype("<f4").tofile(base + "-biharmonic.raw")
    with open(base + ".json", "w") as fh:
        json.dump({"width": img.shape[1], "height": img.shape[0], "library": "scikit-image " + skimage.__version__,
                   "numpy": np.__version__, "call": "skimage.restoration.inpaint_biharmonic(image.astype(float64), mask)",
                   "files": ["image float32 LE", "mask uint8", "biharmonic float32 LE"]}, fh, indent=1)


if __name__ == "__main__":
    write("blobs", *case_blobs())
    write("band", *case_band())
