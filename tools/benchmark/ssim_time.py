#!/usr/bin/python3
"""Times scikit-image's SSIM (Gaussian window, sigma 1.5) on two float32 TIFF stacks; prints seconds and value.

Called by the Java benchmark org.stackwright.inspect.InspectBenchmark; run with Debian's /usr/bin/python3
(python3-skimage 0.19.3). Usage: ssim_time.py A.tif B.tif DATA_RANGE REPEATS
"""
import sys
import time

import numpy as np
import tifffile
from skimage.metrics import structural_similarity


def main():
    a = tifffile.imread(sys.argv[1]).astype(np.float64)
    b = tifffile.imread(sys.argv[2]).astype(np.float64)
    data_range = float(sys.argv[3])
    repeats = int(sys.argv[4])
    times = []
    value = None
    for _ in range(repeats):
        t0 = time.perf_counter()
        value = structural_similarity(a, b, gaussian_weights=True, sigma=1.5, use_sample_covariance=False,
                                      data_range=data_range)
        times.append(time.perf_counter() - t0)
    print("%.6f %.8f" % (sorted(times)[len(times) // 2], value))


if __name__ == "__main__":
    main()
