#!/usr/bin/python3
"""Small TIFF files written by another TIFF library, for the TIFF reading tests.

Run from the repository root with Debian's Python (python3-tifffile 2023.2.3, python3-numpy 1.24.2):

    /usr/bin/python3 tools/reference/make_tiff_references.py

Writes src/test/resources/reference/tiff/:
  multipage.tif       5 pages of 16 x 12 uint16, one page per plane (not ImageJ's layout), no compression
  multipage-zlib.tif  the same with zlib (deflate) compression
  with-thumbnail.tif  the same 5 pages followed by a 4 x 4 page (a thumbnail), which ImageJ 1.x does not stack
Pixel value at (x, y, z) = (16 * 12 * z + 16 * y + x) mod 251.
"""
import os

import numpy as np
import tifffile

OUT = os.path.join("src", "test", "resources", "reference", "tiff")


def main():
    os.makedirs(OUT, exist_ok=True)
    a = (np.arange(5 * 12 * 16).reshape(5, 12, 16) % 251).astype(np.uint16)
    tifffile.imwrite(os.path.join(OUT, "multipage.tif"), a)
    tifffile.imwrite(os.path.join(OUT, "multipage-zlib.tif"), a, compression="zlib")
    with tifffile.TiffWriter(os.path.join(OUT, "with-thumbnail.tif")) as t:
        for page in a:
            t.write(page, contiguous=False)
        t.write(a[0, :4, :4])
    print("wrote %s with tifffile %s" % (OUT, tifffile.__version__))


if __name__ == "__main__":
    main()
