package org.stackwright.fft;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;
import org.stackwright.testing.VolumeAssert;

/**
 * The half-spectrum transform against the definition of the discrete Fourier transform,
 * X(k) = sum_x f(x) exp(-2 pi i (kx x / nx + ky y / ny + kz z / nz)), evaluated naively in double on tiny sizes
 * (1, 2, 3, 4, 5, 6, 7 along each axis: odd and even, so both of JTransforms' packed real layouts are unpacked);
 * and forward-inverse round trips.
 */
class RealFft3DTest {

    private static final int[] SIZES = {1, 2, 3, 4, 5, 6, 7};

    private static float[] random(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] f = new float[n];
        for (int i = 0; i < n; i++) {
            f[i] = (float) (2 * r.nextDouble() - 1);
        }
        return f;
    }

    /** Naive DFT (double), only the half spectrum kx = 0 .. nx/2, interleaved (re, im), kx fastest. */
    private static float[] naiveHalfSpectrum(float[] f, int nx, int ny, int nz) {
        int hx = nx / 2 + 1;
        float[] s = new float[2 * hx * ny * nz];
        for (int kz = 0; kz < nz; kz++) {
            for (int ky = 0; ky < ny; ky++) {
                for (int kx = 0; kx < hx; kx++) {
                    double re = 0;
                    double im = 0;
                    for (int z = 0; z < nz; z++) {
                        for (int y = 0; y < ny; y++) {
                            for (int x = 0; x < nx; x++) {
                                double phase = -2 * Math.PI * ((double) kx * x / nx + (double) ky * y / ny
                                        + (double) kz * z / nz);
                                double v = f[(z * ny + y) * nx + x];
                                re += v * Math.cos(phase);
                                im += v * Math.sin(phase);
                            }
                        }
                    }
                    int i = 2 * ((kz * ny + ky) * hx + kx);
                    s[i] = (float) re;
                    s[i + 1] = (float) im;
                }
            }
        }
        return s;
    }

    @Test
    void forwardMatchesTheNaiveDftOnTinySizes() {
        try (Workers w = new Workers(2)) {
            for (int nz : SIZES) {
                for (int ny : SIZES) {
                    for (int nx : SIZES) {
                        float[] f = random(nx * ny * nz, 31L * nx + 7L * ny + nz);
                        float[] before = f.clone();
                        RealFft3D fft = new RealFft3D(nx, ny, nz, w);
                        float[] spectrum = fft.newSpectrum();
                        fft.forward(f, spectrum);
                        // float transform against the double definition: 1e-5 of the largest coefficient
                        VolumeAssert.assertClose(naiveHalfSpectrum(f, nx, ny, nz), spectrum, 1e-5,
                                2 * (nx / 2 + 1), ny, "forward " + nx + "x" + ny + "x" + nz + " (x index = 2 kx + re/im)");
                        assertArrayEquals(before, f, "forward must not modify its input");
                    }
                }
            }
        }
    }

    @Test
    void forwardMatchesTheNaiveDftWhereYAndZUseSeveralRadixStages() {
        // y and z lengths 2^a 3^b 5^c go through LineFft: 48 = 4*4*3, 40 = 4*2*5, 18 = 2*3*3, 50 = 2*5*5 and 16
        // = 4*4 exercise twiddles after every radix; 11 lines of x (hx = 11) leave an incomplete group of lines
        int[][] sizes = {{20, 48, 10}, {3, 40, 18}, {4, 50, 16}};
        try (Workers w = new Workers(2)) {
            for (int[] s : sizes) {
                float[] f = random(s[0] * s[1] * s[2], s[0] + 100L * s[1] + 10000L * s[2]);
                RealFft3D fft = new RealFft3D(s[0], s[1], s[2], w);
                float[] spectrum = fft.newSpectrum();
                fft.forward(f, spectrum);
                // definition of the DFT in double; float bound 1e-5 of the largest coefficient as above
                VolumeAssert.assertClose(naiveHalfSpectrum(f, s[0], s[1], s[2]), spectrum, 1e-5,
                        2 * (s[0] / 2 + 1), s[1], "forward " + s[0] + "x" + s[1] + "x" + s[2]);
                float[] back = new float[f.length];
                fft.inverse(spectrum, back);
                VolumeAssert.assertClose(f, back, 1e-5, s[0], s[1], "round trip " + s[0] + "x" + s[1] + "x" + s[2]);
            }
        }
    }

    @Test
    void inverseUndoesForward() {
        int[][] sizes = {{1, 1, 1}, {2, 3, 5}, {7, 6, 1}, {17, 19, 23}, {64, 30, 9}, {45, 1, 27}};
        try (Workers w = new Workers(2)) {
            for (int[] s : sizes) {
                RealFft3D fft = new RealFft3D(s[0], s[1], s[2], w);
                float[] f = random(fft.realLength(), s[0] + 100L * s[1] + 10000L * s[2]);
                float[] spectrum = fft.newSpectrum();
                float[] back = new float[f.length];
                fft.forward(f, spectrum);
                fft.inverse(spectrum, back);
                // round trip in float, prime sizes included (Bluestein's algorithm, measured ~1e-6): the issue's
                // float bound of 1e-5 of the largest value
                VolumeAssert.assertClose(f, back, 1e-5, s[0], s[1], "round trip " + s[0] + "x" + s[1] + "x" + s[2]);
            }
        }
    }

    @Test
    void resultsAreBitIdenticalForAnyThreadCount() {
        float[] f = random(36 * 25 * 14, 5);
        float[] ref = null;
        for (int threads : new int[] {1, 2, 3, 5}) {
            try (Workers w = new Workers(threads)) {
                RealFft3D fft = new RealFft3D(36, 25, 14, w);
                float[] s = fft.newSpectrum();
                fft.forward(f, s);
                if (ref == null) {
                    ref = s;
                } else {
                    assertTrue(java.util.Arrays.equals(ref, s), threads + " threads changed the spectrum");
                }
            }
        }
    }

    @Test
    void refusesBadSizesAndArrays() {
        try (Workers w = new Workers(1)) {
            IllegalArgumentException e = assertThrows(IllegalArgumentException.class, () -> new RealFft3D(0, 4, 4, w));
            assertTrue(e.getMessage().contains("0x4x4"), e.getMessage());
            RealFft3D fft = new RealFft3D(4, 4, 4, w);
            assertThrows(IllegalArgumentException.class, () -> fft.forward(new float[63], fft.newSpectrum()));
        }
    }
}
