#!/usr/bin/python3
"""Small TIFF files written by another TIFF library, for the TIFF reading tests.

Run from the repository root with Debian's Python (python3-tifffile 2023.2.3, python3-numpy 1.24.2):

    /usr/bin/python3 tools/reference/make_tiff_references.py

Writes src/test/resources/reference/tiff/:
  multipage.tif       5 pages of 16 x 12 uint16, one page per plane (not ImageJ's layout), no compression
  multipage-zlib.tif  the same with zlib (deflate) compression
  with-thumbnail.tif  the same 5 pages followed by a 4 x 4 page (a thumbnail), which ImageJ 1.x does not stack
  signed16.tif        3 pages of 16 x 12 int16 (SampleFormat 2), value ((16 * 12 * z + 16 * y + x) mod 251) - 125
  czyx.ome.tif        OME-TIFF, 2 channels x 3 planes of 16 x 12 uint16, DimensionOrder XYZCT (planes channel by
                      channel), PhysicalSizeX 0.065 um, PhysicalSizeY 65 nm, PhysicalSizeZ 0.2 um;
                      value 100 c + 10 z + (x + y) mod 7
  zcyx.ome.tif        the same data as DimensionOrder XYCZT (channels interleaved), sizes in um
  no-z-step.tif       the first three pages of multipage.tif with a pixel size in the TIFF resolution tags
                      (100000 per cm = 0.1 um) and no z step (plain TIFF has no tag for it)
Pixel value at (x, y, z) of the first three = (16 * 12 * z + 16 * y + x) mod 251.
The files are the same on every run except the random UUID tifffile writes into each OME-XML.
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
    tifffile.imwrite(os.path.join(OUT, "signed16.tif"), a[:3].astype(np.int16) - 125, photometric="minisblack")
    tifffile.imwrite(os.path.join(OUT, "no-z-step.tif"), a[:3], photometric="minisblack",
                     resolution=(1e5, 1e5), resolutionunit="CENTIMETER")
    c, z, y, x = np.mgrid[0:2, 0:3, 0:12, 0:16]
    ome = (100 * c + 10 * z + (x + y) % 7).astype(np.uint16)
    tifffile.imwrite(os.path.join(OUT, "czyx.ome.tif"), ome, photometric="minisblack",
                     metadata={"axes": "CZYX", "PhysicalSizeX": 0.065, "PhysicalSizeY": 65,
                               "PhysicalSizeYUnit": "nm", "PhysicalSizeZ": 0.2})
    tifffile.imwrite(os.path.join(OUT, "zcyx.ome.tif"), np.ascontiguousarray(ome.transpose(1, 0, 2, 3)),
                     photometric="minisblack",
                     metadata={"axes": "ZCYX", "PhysicalSizeX": 0.065, "PhysicalSizeY": 0.065, "PhysicalSizeZ": 0.2})
    print("wrote %s with tifffile %s" % (OUT, tifffile.__version__))


if __name__ == "__main__":
    main()
