#!/usr/bin/python3
"""Stacks written by another library, for the random-access reader (blocks.TiffPlaneSource), and a check of the
stacks our writer makes (blocks.TiffStackFile), read back by the same library.

Run from the repository root with Debian's Python (python3-tifffile, python3-numpy):

    /usr/bin/python3 tools/reference/make_stream_references.py            # writes src/test/resources/reference/stream/
    /usr/bin/python3 tools/reference/make_stream_references.py check DIR   # reads every .tif our test wrote into DIR

Written files (all deterministic; pixel values v(x, y, z) = (x + 3 y + 7 z) mod 251, plus 0.25 for float):
  imagej-u16.tif     ImageJ hyperstack layout (imagej=True), 16-bit, 3 slices of 37 x 29, 0.2 um pixels, 0.5 um z
  bigtiff-f32.tif    BigTIFF, float32, 4 pages of 33 x 21, resolution 0.1 um (resolution unit cm)
  bigendian-u8.tif   big-endian, uint8, 5 pages of 40 x 30, 7 rows per strip (several strips per plane)
  planes/plane-000N.tif  one uint16 plane of 25 x 19 per file, 4 files (a folder of planes)
The check mode prints, for each file, the shape, dtype, BigTIFF flag and ImageJ metadata tifffile finds, and
the largest difference from the same formula (our test writes the same values), and exits 1 on any mismatch.
"""
import os
import sys

import numpy as np
import tifffile

OUT = os.path.join("src", "test", "resources", "reference", "stream")


def values(nz, ny, nx, dtype):
    z, y, x = np.meshgrid(np.arange(nz), np.arange(ny), np.arange(nx), indexing="ij")
    v = (x + 3 * y + 7 * z) % 251
    if np.dtype(dtype).kind == "f":
        return (v + 0.25).astype(dtype)
    return v.astype(dtype)


def write():
    os.makedirs(os.path.join(OUT, "planes"), exist_ok=True)
    tifffile.imwrite(os.path.join(OUT, "imagej-u16.tif"), values(3, 29, 37, np.uint16), imagej=True,
                     resolution=(1 / 0.2, 1 / 0.2), metadata={"spacing": 0.5, "unit": "micron", "axes": "ZYX"})
    # 0.1 um = 1e-5 cm: 1e5 pixels per cm
    tifffile.imwrite(os.path.join(OUT, "bigtiff-f32.tif"), values(4, 21, 33, np.float32), bigtiff=True,
                     resolution=(1e5, 1e5), resolutionunit="CENTIMETER", photometric="minisblack",
                     metadata=None)
    tifffile.imwrite(os.path.join(OUT, "bigendian-u8.tif"), values(5, 30, 40, np.uint8), byteorder=">",
                     rowsperstrip=7, photometric="minisblack", metadata=None)
    planes = values(4, 19, 25, np.uint16)
    for z in range(4):
        tifffile.imwrite(os.path.join(OUT, "planes", "plane-%04d.tif" % z), planes[z], photometric="minisblack",
                         metadata=None)


def check(folder):
    bad = 0
    for name in sorted(os.listdir(folder)):
        if not name.endswith(".tif"):
            continue
        path = os.path.join(folder, name)
        with tifffile.TiffFile(path) as t:
            a = t.asarray()
            meta = t.imagej_metadata
            big = t.is_bigtiff
            a3 = a.reshape((-1,) + a.shape[-2:])
            want = values(a3.shape[0], a3.shape[1], a3.shape[2], a.dtype)
            diff = float(np.max(np.abs(a3.astype(np.float64) - want.astype(np.float64))))
            page = t.pages[0]
            xres = page.tags["XResolution"].value
            print("%s: shape %s, %s, bigtiff %s, imagej %s, x resolution %s, max difference %g"
                  % (name, a.shape, a.dtype, big, meta, xres, diff))
            if diff != 0:
                bad += 1
    sys.exit(1 if bad else 0)


if __name__ == "__main__":
    if len(sys.argv) > 2 and sys.argv[1] == "check":
        check(sys.argv[2])
    else:
        write()
