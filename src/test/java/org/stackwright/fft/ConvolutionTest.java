package org.stackwright.fft;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.CsvSource;
import org.stackwright.parallel.Workers;
import org.stackwright.testing.VolumeAssert;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * FFT convolution against a brute-force direct sum written in the test, on awkward sizes (1, odd, prime, non
 * powers of two), zero-padded and periodic, and the adjoint identity <Hx, y> = <x, H^T y> (common practice for
 * any linear operator and its adjoint).
 */
class ConvolutionTest {

    static Volume random(int nx, int ny, int nz, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] d = new float[nx * ny * nz];
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (r.nextDouble() * 2 - 1);
        }
        return new Volume(nx, ny, nz, d, VoxelSize.UNIT);
    }

    /** Direct sum: out(x) = sum_j k(j) in(x - (j - c)), zero or periodic outside. */
    static Volume direct(Volume in, Volume k, boolean periodic, boolean correlate) {
        Volume out = Volume.zeros(in.width(), in.height(), in.depth(), in.voxel());
        int cx = k.width() / 2;
        int cy = k.height() / 2;
        int cz = k.depth() / 2;
        for (int z = 0; z < in.depth(); z++) {
            for (int y = 0; y < in.height(); y++) {
                for (int x = 0; x < in.width(); x++) {
                    double s = 0;
                    for (int kz = 0; kz < k.depth(); kz++) {
                        for (int ky = 0; ky < k.height(); ky++) {
                            for (int kx = 0; kx < k.width(); kx++) {
                                int sgn = correlate ? -1 : 1;
                                int sx = x - sgn * (kx - cx);
                                int sy = y - sgn * (ky - cy);
                                int sz = z - sgn * (kz - cz);
                                if (periodic) {
                                    sx = Math.floorMod(sx, in.width());
                                    sy = Math.floorMod(sy, in.height());
                                    sz = Math.floorMod(sz, in.depth());
                                } else if (sx < 0 || sy < 0 || sz < 0 || sx >= in.width() || sy >= in.height()
                                        || sz >= in.depth()) {
                                    continue;
                                }
                                s += (double) k.get(kx, ky, kz) * in.get(sx, sy, sz);
                            }
                        }
                    }
                    out.set(x, y, z, (float) s);
                }
            }
        }
        return out;
    }

    @ParameterizedTest(name = "{0}x{1}x{2} kernel {3}x{4}x{5}")
    @CsvSource({
        "1, 1, 1, 1, 1, 1",
        "7, 1, 1, 3, 1, 1",
        "13, 11, 1, 5, 3, 1",
        "17, 12, 1, 7, 7, 1",
        "9, 10, 7, 3, 5, 3",
        "11, 13, 5, 5, 3, 5",
        "16, 8, 6, 5, 5, 3",
        "23, 19, 3, 9, 7, 3"})
    void matchesDirectSum(int nx, int ny, int nz, int kx, int ky, int kz) {
        Volume in = random(nx, ny, nz, 11);
        Volume k = random(kx, ky, kz, 12);
        for (int threads : new int[] {1, 2}) {
            try (Workers w = new Workers(threads)) {
                for (Convolution.Boundary b : Convolution.Boundary.values()) {
                    boolean periodic = b == Convolution.Boundary.PERIODIC;
                    for (boolean corr : new boolean[] {false, true}) {
                        Volume expected = direct(in, k, periodic, corr);
                        Volume actual = Convolution.apply(in, k, b, corr, w);
                        // float FFT against a double direct sum: 1e-5 of the largest value (issue's bound)
                        VolumeAssert.assertClose(expected, actual, 1e-5,
                                b + (corr ? " correlation" : " convolution") + ", " + threads + " threads");
                    }
                }
            }
        }
    }

    @ParameterizedTest(name = "grid {0}x{1}x{2}")
    @CsvSource({"1, 1, 1", "31, 1, 1", "12, 18, 1", "15, 14, 9", "20, 27, 11"})
    void correlationIsTheAdjointOfConvolution(int nx, int ny, int nz) {
        Volume k = random(Math.min(nx | 1, 7), Math.min(ny | 1, 5), Math.min(nz | 1, 3), 3);
        Volume x = random(nx, ny, nz, 4);
        Volume y = random(nx, ny, nz, 5);
        try (Workers w = new Workers(2)) {
            Convolver c = new Convolver(k, nx, ny, nz, w);
            float[] hx = new float[x.size()];
            float[] hty = new float[y.size()];
            c.convolve(x.data(), hx);
            c.correlate(y.data(), hty);
            double a = 0;
            double b = 0;
            double scale = 0;
            for (int i = 0; i < hx.length; i++) {
                a += (double) hx[i] * y.data()[i];
                b += (double) x.data()[i] * hty[i];
                scale += Math.abs((double) hx[i] * y.data()[i]);
            }
            // <Hx, y> = <x, H^T y> (common practice), relative to the sum of magnitudes
            assertEquals(a, b, 1e-5 * scale);
        }
    }

    @ParameterizedTest(name = "{0} threads")
    @CsvSource({"1", "2", "3"})
    void threadCountDoesNotChangeTheResult(int threads) {
        Volume in = random(30, 28, 10, 8);
        Volume k = random(7, 7, 5, 9);
        Volume ref;
        try (Workers w = new Workers(1)) {
            ref = Convolution.convolve(in, k, w);
        }
        try (Workers w = new Workers(threads)) {
            Volume out = Convolution.convolve(in, k, w);
            // every 1D line is transformed identically whatever the split: bit-identical (stronger than 1e-6)
            assertTrue(java.util.Arrays.equals(ref.data(), out.data()), "results differ with " + threads + " threads");
        }
    }
}
