#!/usr/bin/python3
"""Reference half spectra for the FFT engines (native and Java), made with SciPy's scipy.fft.rfftn.

Run from the repository root with Debian's Python (python3-scipy 1.10.1, python3-numpy 1.24.2):

    /usr/bin/python3 tools/reference/make_rfftn_references.py

Writes src/test/resources/reference/rfftn/. The sizes are awkward on purpose: primes, products of 2, 3, 5 and 7,
and a size of 1 along any axis. Inputs are NOT stored: both sides make them from an integer hash of the voxel
index i = x + nx (y + ny z), value(i) = ((i * 2654435761 + 12345) mod 2^32) / 2^32 - 0.5, which is exact in
float32 and identical in Java (fft.RfftnReferenceTest). The transform runs in float64 on the float32 inputs with
the axes (z, y, x) of a C-order (nz, ny, nx) array, so the last (x) axis is halved: (nx//2 + 1) x ny x nz complex
values, kx fastest, stored as little-endian float32 pairs (re, im), the project's spectrum layout.

cases.txt lists "NAME nx ny nz"; NAME.raw holds the spectrum.
"""
import os

import numpy as np
import scipy
import scipy.fft

OUT = os.path.join("src", "test", "resources", "reference", "rfftn")

CASES = [
    (1, 1, 1), (2, 1, 1), (17, 1, 1), (1, 13, 1), (1, 1, 11), (1, 23, 19), (29, 1, 7), (31, 29, 1),
    (7, 5, 3), (13, 11, 7), (49, 12, 5), (28, 45, 7), (21, 20, 18), (97, 2, 19), (30, 28, 1), (8, 9, 10),
]


def values(nx, ny, nz):
    i = np.arange(nx * ny * nz, dtype=np.uint64)
    h = (i * np.uint64(2654435761) + np.uint64(12345)) % np.uint64(2 ** 32)
    v = (h.astype(np.float64) / 2.0 ** 32 - 0.5).astype(np.float32)
    return v.reshape(nz, ny, nx)


def main():
    os.makedirs(OUT, exist_ok=True)
    lines = []
    for nx, ny, nz in CASES:
        name = "r-%dx%dx%d" % (nx, ny, nz)
        a = values(nx, ny, nz).astype(np.float64)
        s = scipy.fft.rfftn(a, axes=(0, 1, 2))
        inter = np.empty(s.shape + (2,), dtype="<f4")
        inter[..., 0] = s.real
        inter[..., 1] = s.imag
        np.ascontiguousarray(inter).tofile(os.path.join(OUT, name + ".raw"))
        lines.append("%s %d %d %d" % (name, nx, ny, nz))
    with open(os.path.join(OUT, "cases.txt"), "w") as f:
        f.write("# made by tools/reference/make_rfftn_references.py with SciPy %s, NumPy %s\n"
                % (scipy.__version__, np.__version__))
        f.write("\n".join(lines) + "\n")


if __name__ == "__main__":
    main()
