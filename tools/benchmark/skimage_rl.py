#!/usr/bin/python3
"""Times skimage.restoration.richardson_lucy (Debian python3-skimage) for the deconvolution benchmark
(org.stackwright.solve.DeconvolutionBenchmark calls this script; it is not needed by the tests).

  skimage_rl.py periter IMAGE.raw D H W PSF.raw PD PH PW ITER
      prints "periter WALL CPU": (time of ITER+1 iterations - time of 1 iteration) / ITER, wall and CPU seconds
  skimage_rl.py best IMAGE.raw D H W PSF.raw PD PH PW TRUTH.raw K1,K2,...
      runs num_iter = K for each K, prints "run K WALL NRMSE CPU" per K (seconds)
  skimage_rl.py repeat IMAGE.raw D H W PSF.raw PD PH PW K N
      runs num_iter = K N times after one untimed run, prints "repeat K MINWALL MEDIANWALL MEANCPU" (seconds)
Raw files: little-endian float32, x fastest. NRMSE = ||x - truth|| / ||truth||.
"""
import sys
import time

import numpy as np
import skimage
from skimage.restoration import richardson_lucy


def load(path, shape):
    return np.fromfile(path, dtype="<f4").reshape(shape)


def main():
    mode = sys.argv[1]
    img = load(sys.argv[2], tuple(int(v) for v in sys.argv[3:6]))
    psf = load(sys.argv[6], tuple(int(v) for v in sys.argv[7:10]))
    print("skimage", skimage.__version__, flush=True)
    if mode == "periter":
        n = int(sys.argv[10])
        t0, c0 = time.perf_counter(), time.process_time()
        richardson_lucy(img, psf, num_iter=1, clip=False)
        t1, c1 = time.perf_counter(), time.process_time()
        richardson_lucy(img, psf, num_iter=n + 1, clip=False)
        t2, c2 = time.perf_counter(), time.process_time()
        print("periter %.6f %.6f" % (((t2 - t1) - (t1 - t0)) / n, ((c2 - c1) - (c1 - c0)) / n), flush=True)
    elif mode == "repeat":
        k, n = int(sys.argv[10]), int(sys.argv[11])
        richardson_lucy(img, psf, num_iter=k, clip=False)
        walls, cpus = [], []
        for _ in range(n):
            t0, c0 = time.perf_counter(), time.process_time()
            richardson_lucy(img, psf, num_iter=k, clip=False)
            walls.append(time.perf_counter() - t0)
            cpus.append(time.process_time() - c0)
        print("repeat %d %.6f %.6f %.6f" % (k, min(walls), float(np.median(walls)), sum(cpus) / n), flush=True)
    else:
        truth = load(sys.argv[10], img.shape).astype(np.float64)
        for k in (int(v) for v in sys.argv[11].split(",")):
            t0, c0 = time.perf_counter(), time.process_time()
            x = richardson_lucy(img, psf, num_iter=k, clip=False)
            t, c = time.perf_counter() - t0, time.process_time() - c0
            e = np.sqrt(np.sum((x - truth) ** 2) / np.sum(truth ** 2))
            print("run %d %.6f %.6f %.6f" % (k, t, e, c), flush=True)


if __name__ == "__main__":
    main()
