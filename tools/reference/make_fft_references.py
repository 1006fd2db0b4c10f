#!/usr/bin/python3
"""Reference arrays for the FFT convolution engine and for padding, made with SciPy and NumPy.

Run from the repository root with Debian's Python (python3-scipy 1.10.1, python3-numpy 1.24.2):

    /usr/bin/python3 tools/reference/make_fft_references.py

Writes src/test/resources/reference/fft/. Every array is little-endian float32 in C order with shape
(nz, ny, nx), so x is fastest, as in the project's volumes. Inputs are drawn from a seeded generator, stored as
float32, and the references are computed in float64 from those stored float32 values, then rounded to float32.

Per convolution case NAME (listed in cases.txt as "NAME nx ny nz kx ky kz periodic"):
  NAME-image.raw     the image
  NAME-kernel.raw    the kernel (odd sizes: its centre is index k//2, the project's PSF convention)
  NAME-same.raw      scipy.signal.fftconvolve(image, kernel, mode='same')         (zero outside the image)
  NAME-corr.raw      scipy.signal.correlate(image, kernel, mode='same', method='fft')
  NAME-wrap.raw      periodic convolution: scipy.ndimage.convolve(image, kernel, mode='wrap') when the kernel
                     fits in the image, cross-checked against (and otherwise replaced by) a direct sum of
                     shifted copies (numpy.roll); only when periodic = 1
Padding (padding.txt lists "NAME nx ny nz before_x after_x before_y after_y before_z after_z"):
  pad-image.raw, pad-zero.raw and pad-mirror.raw from numpy.pad modes 'constant' and 'symmetric' (mirror, edge
  repeated), pad-periodic.raw from indices taken modulo the size (numpy.take), cross-checked against numpy.pad
  mode 'wrap' where its widths do not exceed the size.
"""
import os
import sys

import numpy as np
import scipy
import scipy.ndimage
import scipy.signal

OUT = os.path.join("src", "test", "resources", "reference", "fft")

# name, image (nx, ny, nz), kernel (kx, ky, kz), periodic reference too
CASES = [
    ("line-prime", (37, 1, 1), (9, 1, 1), True),
    ("plane-37x23", (37, 23, 1), (9, 7, 1), True),
    ("plane-1x29", (1, 29, 1), (1, 5, 1), True),
    ("stack-17x13x7", (17, 13, 7), (5, 7, 3), True),
    ("stack-30x1x11", (30, 1, 11), (7, 1, 3), True),
    ("stack-1x1x19", (1, 1, 19), (1, 1, 5), True),
    ("stack-40x36x12", (40, 36, 12), (11, 11, 7), True),
    ("stack-kernel-larger", (12, 10, 4), (15, 13, 5), True),
]

PADDING = ("pad", (5, 4, 3), (2, 7, 3, 0, 1, 4))  # x before/after, y before/after, z before/after


def f32(a):
    return np.ascontiguousarray(a, dtype="<f4")


def write(name, a):
    f32(a).tofile(os.path.join(OUT, name))


def periodic_direct(image, kernel):
    """out(x) = sum_j k(j) image(x - (j - c)), indices taken modulo the image size."""
    out = np.zeros(image.shape, dtype=np.float64)
    c = [s // 2 for s in kernel.shape]
    for jz in range(kernel.shape[0]):
        for jy in range(kernel.shape[1]):
            for jx in range(kernel.shape[2]):
                out += kernel[jz, jy, jx] * np.roll(image, (jz - c[0], jy - c[1], jx - c[2]), axis=(0, 1, 2))
    return out


def main():
    os.makedirs(OUT, exist_ok=True)
    rng = np.random.default_rng(20261201)
    lines = []
    for name, (nx, ny, nz), (kx, ky, kz), periodic in CASES:
        image = f32(rng.uniform(-1, 1, size=(nz, ny, nx))).astype(np.float64)
        kernel = f32(rng.uniform(-1, 1, size=(kz, ky, kx))).astype(np.float64)
        same = scipy.signal.fftconvolve(image, kernel, mode="same")
        corr = scipy.signal.correlate(image, kernel, mode="same", method="fft")
        write(name + "-image.raw", image)
        write(name + "-kernel.raw", kernel)
        write(name + "-same.raw", same)
        write(name + "-corr.raw", corr)
        if periodic:
            direct = periodic_direct(image, kernel)
            if kx <= nx and ky <= ny and kz <= nz:
                wrap = scipy.ndimage.convolve(image, kernel, mode="wrap")
                err = np.max(np.abs(wrap - direct)) / np.max(np.abs(direct))
                if err > 1e-12:
                    sys.exit("ndimage wrap and the direct periodic sum disagree for %s: %g" % (name, err))
            else:
                wrap = direct
            write(name + "-wrap.raw", wrap)
        lines.append("%s %d %d %d %d %d %d %d" % (name, nx, ny, nz, kx, ky, kz, 1 if periodic else 0))
    with open(os.path.join(OUT, "cases.txt"), "w") as f:
        f.write("# name nx ny nz kx ky kz periodic (made by tools/reference/make_fft_references.py)\n")
        f.write("\n".join(lines) + "\n")

    name, (nx, ny, nz), (bx, ax, by, ay, bz, az) = PADDING
    image = f32(rng.uniform(-1, 1, size=(nz, ny, nx)))
    write(name + "-image.raw", image)
    widths = ((bz, az), (by, ay), (bx, ax))
    write(name + "-zero.raw", np.pad(image, widths, mode="constant"))
    write(name + "-mirror.raw", np.pad(image, widths, mode="symmetric"))
    # numpy 1.24's mode 'wrap' is not periodic when a width exceeds the size on both sides (np.pad(arange(5),
    # (2, 7), 'wrap') ends in ... 4 3 4), so the periodic reference takes indices modulo the size (the definition),
    # checked against numpy.pad 'wrap' on widths it handles.
    periodic = image
    for axis, (b, a) in enumerate(widths):
        n = image.shape[axis]
        periodic = np.take(periodic, np.arange(-b, n + a) % n, axis=axis)
        small = ((0, 0),) * axis + ((min(b, n), min(a, n)),) + ((0, 0),) * (2 - axis)
        check = np.take(image, np.arange(-min(b, n), n + min(a, n)) % n, axis=axis)
        if not np.array_equal(check, np.pad(image, small, mode="wrap")):
            sys.exit("numpy.pad 'wrap' disagrees with indices modulo the size along axis %d" % axis)
    write(name + "-periodic.raw", periodic)
    with open(os.path.join(OUT, "padding.txt"), "w") as f:
        f.write("# name nx ny nz before_x after_x before_y after_y before_z after_z\n")
        f.write("%s %d %d %d %d %d %d %d %d %d\n" % (name, nx, ny, nz, bx, ax, by, ay, bz, az))
    print("wrote %s with scipy %s, numpy %s" % (OUT, scipy.__version__, np.__version__))


if __name__ == "__main__":
    main()
