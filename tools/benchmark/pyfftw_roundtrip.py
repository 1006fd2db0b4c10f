#!/usr/bin/python3
"""Times one forward + inverse real 3D FFT in single precision with FFTW through pyFFTW (Debian python3-pyfftw),
the transform alone, for the deconvolution benchmark (org.stackwright.solve.DeconvolutionBenchmark calls this
script; the tests do not need it).

  pyfftw_roundtrip.py NZ NY NX THREADS REPEATS
      prints "pyfftw VERSION" and, for the planning flags FFTW_ESTIMATE and FFTW_MEASURE,
      "roundtrip FLAG PLAN_SECONDS BEST_SECONDS": planning time, and the best of REPEATS executions of the forward
      and the inverse plan (FFTW objects executed on their own aligned arrays: no copies, no normalisation pass)
"""
import sys
import time

import numpy as np
import pyfftw


def main():
    nz, ny, nx, threads, reps = (int(v) for v in sys.argv[1:6])
    print("pyfftw", pyfftw.__version__, flush=True)
    for flag in ("FFTW_ESTIMATE", "FFTW_MEASURE"):
        real = pyfftw.empty_aligned((nz, ny, nx), dtype="float32")
        spec = pyfftw.empty_aligned((nz, ny, nx // 2 + 1), dtype="complex64")
        t0 = time.perf_counter()
        fwd = pyfftw.FFTW(real, spec, axes=(0, 1, 2), direction="FFTW_FORWARD", flags=(flag,), threads=threads)
        inv = pyfftw.FFTW(spec, real, axes=(0, 1, 2), direction="FFTW_BACKWARD", flags=(flag,), threads=threads)
        plan = time.perf_counter() - t0
        real[:] = np.random.default_rng(1).random((nz, ny, nx), dtype=np.float32)
        best = float("inf")
        for _ in range(reps):
            t0 = time.perf_counter()
            fwd.execute()
            inv.execute()
            best = min(best, time.perf_counter() - t0)
        print("roundtrip %s %.6f %.6f" % (flag, plan, best), flush=True)


if __name__ == "__main__":
    main()
