#!/usr/bin/python3
"""Times one real FFT round trip (scipy.fft.rfftn + irfftn, float32) for the FFT benchmark to compare against.

Usage: /usr/bin/python3 tools/reference/fft_benchmark.py NX NY NZ THREADS
Prints a description line, then the median wall-clock and process CPU times in milliseconds on the last line.
Debian's python3-scipy 1.10.1 (pocketfft).
"""
import sys
import time

import numpy as np
import scipy
import scipy.fft


def main():
    nx, ny, nz, threads = (int(a) for a in sys.argv[1:5])
    a = np.random.default_rng(1).random((nz, ny, nx), dtype=np.float32)
    times = []
    cpu = []
    for i in range(8):
        c0 = time.process_time()
        t0 = time.perf_counter()
        s = scipy.fft.rfftn(a, workers=threads)
        b = scipy.fft.irfftn(s, s=a.shape, workers=threads)
        t = (time.perf_counter() - t0) * 1e3
        c = (time.process_time() - c0) * 1e3
        if i >= 3:
            times.append(t)
            cpu.append(c)
    err = np.max(np.abs(b - a)) / np.max(np.abs(a))
    print("scipy %s rfftn+irfftn %dx%dx%d float32, %d workers, round-trip error %.1e" % (
        scipy.__version__, nx, ny, nz, threads, err))
    print("%.1f %.1f" % (float(np.median(times)), float(np.median(cpu))))


if __name__ == "__main__":
    main()
