package org.stackwright.repair;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Locale;
import java.util.SplittableRandom;

import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Multigrid-preconditioned fills against the reference: the same systems solved by conjugate gradients with a
 * diagonal preconditioner (Saad 2003, Algorithm 9.1) to a tight tolerance. Goal of the issue: agreement within 1e-4
 * of the data range. Both solve one symmetric positive definite system, so any difference is solver error
 * (Briggs, Henson & McCormick, "A Multigrid Tutorial", 2nd ed., SIAM 2000, ch. 3 and 5).
 */
class MultigridTest {

    /** A smooth invented image with noise and texture: sines, a few Gaussian blobs, uniform noise. */
    static Volume image(int w, int h, int d, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        double[][] blobs = new double[12][4];
        for (double[] b : blobs) {
            b[0] = w * r.nextDouble();
            b[1] = h * r.nextDouble();
            b[2] = 3 + 12 * r.nextDouble();
            b[3] = 50 + 300 * r.nextDouble();
        }
        float[] v = new float[w * h * d];
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    double s = 200 + 60 * Math.sin(0.05 * x + 0.3 * z) * Math.cos(0.037 * y);
                    for (double[] b : blobs) {
                        double dx = x - b[0];
                        double dy = y - b[1];
                        s += b[3] * Math.exp(-(dx * dx + dy * dy) / (2 * b[2] * b[2]));
                    }
                    v[i] = (float) (s + 10 * r.nextDouble());
                }
            }
        }
        return new Volume(w, h, d, v, new VoxelSize(0.1, 0.1, 0.25));
    }

    /** A square hole of side s at (x0, y0), a one-pixel seam at row sy and scattered single pixels. */
    static Volume mask(int w, int h, int d, int x0, int y0, int s, int sy, long seed) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] m = new float[w * h * d];
        for (int z = 0, i = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++, i++) {
                    boolean hole = x >= x0 && x < x0 + s && y >= y0 && y < y0 + s;
                    m[i] = hole || y == sy || r.nextDouble() < 0.005 ? 255 : 0;
                }
            }
        }
        return new Volume(w, h, d, m, VoxelSize.UNIT);
    }

    @ParameterizedTest
    @EnumSource(value = Inpainting.Method.class, names = {"HARMONIC", "BIHARMONIC"})
    void multigridAgreesWithConjugateGradients(Inpainting.Method method) {
        check(method, Inpainting.Mode.SLICES, image(150, 130, 1, 3), mask(150, 130, 1, 40, 30, 72, 110, 4));
        // a hole at the image border (reflecting boundary) and an odd size
        check(method, Inpainting.Mode.SLICES, image(97, 83, 1, 5), mask(97, 83, 1, 0, 20, 50, 3, 6));
    }

    @ParameterizedTest
    @EnumSource(value = Inpainting.Method.class, names = {"HARMONIC", "BIHARMONIC"})
    void multigridAgreesInAVolume(Inpainting.Method method) {
        check(method, Inpainting.Mode.VOLUME, image(70, 66, 6, 7), mask(70, 66, 6, 15, 12, 40, 60, 8));
    }

    static void check(Inpainting.Method method, Inpainting.Mode mode, Volume img, Volume mask) {
        try (Workers w = new Workers(2)) {
            Inpainting.Outcome ref = Inpainting.run(img, mask, new Inpainting.Settings(method, mode, 1e-11, 200_000,
                    Inpainting.Solver.CONJUGATE_GRADIENT), w);
            Inpainting.Settings dflt = Inpainting.Settings.of(method, mode);
            Inpainting.Outcome mg = Inpainting.run(img, mask, new Inpainting.Settings(method, mode, dflt.tolerance(),
                    dflt.maxIterations(), Inpainting.Solver.MULTIGRID), w);
            Inpainting.Outcome cg = Inpainting.run(img, mask, new Inpainting.Settings(method, mode, dflt.tolerance(),
                    dflt.maxIterations(), Inpainting.Solver.CONJUGATE_GRADIENT), w);
            double range = img.max() - min(img);
            double errMg = maxDiff(ref.filled(), mg.filled()) / range;
            double errCg = maxDiff(ref.filled(), cg.filled()) / range;
            System.out.printf(Locale.ROOT, "%s %s %s: multigrid %d iterations, max diff %.2e of range; diagonal CG "
                    + "%d iterations, %.2e; reference %d iterations%n", method, mode, img.shape(), mg.iterations(),
                    errMg, cg.iterations(), errCg, ref.iterations());
            assertTrue(mg.converged() && ref.converged());
            assertTrue(errMg <= 1e-4, "multigrid differs by " + errMg + " of the range");
        }
    }

    static double min(Volume v) {
        double m = Double.POSITIVE_INFINITY;
        for (float f : v.data()) {
            m = Math.min(m, f);
        }
        return m;
    }

    static double maxDiff(Volume a, Volume b) {
        double m = 0;
        for (int i = 0; i < a.size(); i++) {
            m = Math.max(m, Math.abs(a.data()[i] - b.data()[i]));
        }
        return m;
    }
}
