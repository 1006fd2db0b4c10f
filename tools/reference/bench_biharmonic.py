#!/usr/bin/python3
"""Times skimage.restoration.inpaint_biharmonic (Debian python3-skimage 0.19.3) for the repair benchmark.

Called by org.stackwright.repair.RepairBenchmark:  bench_biharmonic.py IMAGE.raw MASK.raw WIDTH HEIGHT REPEATS
IMAGE.raw: float32 little-endian, row-major; MASK.raw: uint8, nonzero = fill. Prints the best wall time in
seconds over REPEATS runs (one line, a plain number).
"""
import sys
import time

import numpy as np
from skimage.restoration import inpaint_biharmonic


def main():
    image_path, mask_path, w, h, repeats = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5])
    image = np.fromfile(image_path, "<f4").reshape(h, w).astype(np.float64)
    mask = np.fromfile(mask_path, np.uint8).reshape(h, w) != 0
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        inpaint_biharmonic(image, mask)
        best = min(best, time.perf_counter() - t0)
    print("%.6f" % best)


if __name__ == "__main__":
    main()
