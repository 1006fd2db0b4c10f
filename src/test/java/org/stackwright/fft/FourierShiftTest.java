package org.stackwright.fft;

import static org.junit.jupiter.api.Assertions.assertEquals;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;

/**
 * Fourier shift against the shift theorem (a sampled Gaussian wide enough to be band-limited, moved by a
 * fraction of a voxel, must equal the Gaussian sampled at the moved centre) and a whole-voxel shift, which must
 * be an exact periodic roll.
 */
class FourierShiftTest {

    private static float[] gaussian(int nx, int ny, int nz, double cx, double cy, double cz, double sigma) {
        float[] g = new float[nx * ny * nz];
        for (int z = 0, i = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++, i++) {
                    double d2 = (x - cx) * (x - cx) + (y - cy) * (y - cy) + (z - cz) * (z - cz);
                    g[i] = (float) Math.exp(-0.5 * d2 / (sigma * sigma));
                }
            }
        }
        return g;
    }

    @Test
    void subVoxelShiftMovesABandLimitedGaussian() {
        try (Workers w = new Workers(2)) {
            int nx = 25;
            int ny = 21;
            int nz = 21;
            FourierShift shift = new FourierShift(nx, ny, nz, w);
            float[] in = gaussian(nx, ny, nz, 12, 10, 10, 1.6);
            float[] out = new float[in.length];
            shift.shift(in, out, 0.3, -0.45, 0.25);
            float[] expected = gaussian(nx, ny, nz, 12.3, 9.55, 10.25, 1.6);
            for (int i = 0; i < in.length; i++) {
                assertEquals(expected[i], out[i], 2e-5, "voxel " + i);
            }
        }
    }

    @Test
    void wholeVoxelShiftIsAPeriodicRoll() {
        try (Workers w = new Workers(1)) {
            int nx = 9;
            int ny = 7;
            int nz = 5;
            float[] in = new float[nx * ny * nz];
            java.util.SplittableRandom r = new java.util.SplittableRandom(5);
            for (int i = 0; i < in.length; i++) {
                in[i] = (float) r.nextDouble();
            }
            float[] out = new float[in.length];
            new FourierShift(nx, ny, nz, w).shift(in, out, 2, -1, 3);
            for (int z = 0; z < nz; z++) {
                for (int y = 0; y < ny; y++) {
                    for (int x = 0; x < nx; x++) {
                        int src = (Math.floorMod(z - 3, nz) * ny + Math.floorMod(y + 1, ny)) * nx + Math.floorMod(x - 2, nx);
                        assertEquals(in[src], out[(z * ny + y) * nx + x], 1e-5);
                    }
                }
            }
        }
    }
}
