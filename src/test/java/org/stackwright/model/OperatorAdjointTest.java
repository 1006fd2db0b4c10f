package org.stackwright.model;

import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The adjoint test <A x, y> = <x, A^T y> (the definition of the adjoint; e.g. Claerbout, "Earth Soundings
 * Analysis: Processing versus Inversion", 1992, "dot product test") for every operator, on awkward sizes.
 */
class OperatorAdjointTest {

    private static float[] random(int n, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] a = new float[n];
        for (int i = 0; i < n; i++) {
            a[i] = (float) (r.nextDouble() * 2 - 1);
        }
        return a;
    }

    private static double dot(float[] a, float[] b) {
        double s = 0;
        for (int i = 0; i < a.length; i++) {
            s += (double) a[i] * b[i];
        }
        return s;
    }

    private static void check(LinearOperator a, String what) {
        float[] x = random(a.domainLength(), 1);
        float[] y = random(a.rangeLength(), 2);
        float[] ax = new float[a.rangeLength()];
        float[] aty = new float[a.domainLength()];
        a.apply(x, ax);
        a.applyAdjoint(y, aty);
        double l = dot(ax, y);
        double r = dot(x, aty);
        // float arithmetic over ~1e4 terms: agreement to 1e-5 of the scale is what rounding allows
        double scale = Math.sqrt(dot(ax, ax) * dot(y, y));
        assertEquals(l, r, 1e-5 * scale, what);
    }

    @Test
    void blurMaskAndCompositionPassTheAdjointTest() {
        try (Workers w = new Workers(2)) {
            Volume psf = GaussianPsf.sampled(0.2, 0.4, new VoxelSize(0.1, 0.1, 0.2), 7, 5, 5);
            // asymmetric kernel: the adjoint must be the correlation, not the convolution again
            psf.set(0, 0, 0, 0.05f);
            BlurOperator blur = new BlurOperator(psf, 17, 13, 7, w);
            check(blur, "blur 17x13x7");
            float[] weights = random(17 * 13 * 7, 3);
            for (int i = 0; i < weights.length; i++) {
                weights[i] = weights[i] > 0 ? 1 : 0;
            }
            MaskOperator mask = new MaskOperator(weights);
            check(mask, "mask");
            check(blur.then(mask), "mask after blur");
            check(mask.then(blur), "blur after mask");
        }
    }

    /** Depth-variant blur (Preza &amp; Conchello 2004): K PSFs, interpolation weights, padding planes, odd grid. */
    @Test
    void depthVariantBlurPassesTheAdjointTest() {
        try (Workers w = new Workers(2)) {
            VoxelSize v = new VoxelSize(0.1, 0.1, 0.2);
            java.util.List<Volume> psfs = java.util.List.of(GaussianPsf.sampled(0.15, 0.3, v, 7, 5, 5),
                    GaussianPsf.sampled(0.2, 0.45, v, 7, 5, 5), GaussianPsf.sampled(0.3, 0.6, v, 7, 5, 5));
            check(new DepthVariantBlur(psfs, new double[] {0, 4.5, 9}, 10, 17, 13, 15, w), "depth-variant 17x13x15");
            check(new DepthVariantBlur(psfs.subList(0, 2), new double[] {0, 6}, 7, 9, 8, 7, w), "depth-variant, no padding");
        }
    }

    @Test
    void totalVariationGradientAndAdjointPassTheAdjointTest() {
        try (Workers w = new Workers(2)) {
            for (int[] s : new int[][] {{9, 7, 5}, {1, 6, 4}, {11, 1, 1}, {8, 8, 1}}) {
                int n = s[0] * s[1] * s[2];
                TotalVariation tv = new TotalVariation(s[0], s[1], s[2], 0.4, w);
                LinearOperator d = new LinearOperator() {
                    private final float[] gx = new float[n];
                    private final float[] gy = new float[n];
                    private final float[] gz = new float[n];

                    @Override
                    public int domainLength() {
                        return n;
                    }

                    @Override
                    public int rangeLength() {
                        return 3 * n;
                    }

                    @Override
                    public void apply(float[] in, float[] out) {
                        tv.gradient(in, gx, gy, gz);
                        System.arraycopy(gx, 0, out, 0, n);
                        System.arraycopy(gy, 0, out, n, n);
                        System.arraycopy(gz, 0, out, 2 * n, n);
                    }

                    @Override
                    public void applyAdjoint(float[] in, float[] out) {
                        System.arraycopy(in, 0, gx, 0, n);
                        System.arraycopy(in, n, gy, 0, n);
                        System.arraycopy(in, 2 * n, gz, 0, n);
                        tv.adjoint(gx, gy, gz, out);
                    }
                };
                check(d, "TV gradient " + s[0] + "x" + s[1] + "x" + s[2]);
            }
        }
    }

    @Test
    void curvatureIsMinusTheAdjointOfTheNormalisedGradient() {
        try (Workers w = new Workers(1)) {
            int nx = 6;
            int ny = 5;
            int nz = 4;
            int n = nx * ny * nz;
            TotalVariation tv = new TotalVariation(nx, ny, nz, 0.5, w);
            float[] x = random(n, 7);
            float[] gx = new float[n];
            float[] gy = new float[n];
            float[] gz = new float[n];
            tv.gradient(x, gx, gy, gz);
            double eps = 0.01;
            for (int i = 0; i < n; i++) {
                double len = Math.sqrt(gx[i] * gx[i] + gy[i] * gy[i] + gz[i] * gz[i] + eps * eps);
                gx[i] /= len;
                gy[i] /= len;
                gz[i] /= len;
            }
            float[] expected = new float[n];
            tv.adjoint(gx, gy, gz, expected);
            float[] curv = new float[n];
            tv.curvature(x, eps, curv);
            for (int i = 0; i < n; i++) {
                assertEquals(-expected[i], curv[i], 1e-4, "voxel " + i);
            }
        }
    }
}
