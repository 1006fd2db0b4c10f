package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.Volume;

/**
 * Damaged data: 1% of the pixels are dead (0) or saturated (a large value). Masked, they carry no likelihood and
 * the normalisation is H^T w (Bertero &amp; Boccacci 2005), so the result near them is about as good as elsewhere;
 * unmasked, the wrong values are deconvolved as if they were light. The 1.5x bound is the project's own.
 */
class MaskedDeconvolutionTest {

    @Test
    void maskedDefectsDoNotSpoilTheirNeighbourhood() {
        Simulation.Outcome sim = TestSpecimens.cells(48, 48, 16, 3, 10, Camera.photonCounting(), 31);
        Volume damaged = sim.data().copy();
        float[] d = damaged.data();
        byte[] mask = new byte[d.length];
        SplittableRandom r = new SplittableRandom(9);
        float saturated = 4 * sim.data().max();
        int planted = 0;
        while (planted < d.length / 100) {
            int i = r.nextInt(d.length);
            if (mask[i] == 0) {
                mask[i] = 1;
                d[i] = r.nextBoolean() ? 0f : saturated;
                planted++;
            }
        }
        boolean[] near = near(damaged, mask);
        try (Workers w = new Workers(2)) {
            double[] masked = errors(damaged, mask, near, sim.truth(), w);
            double[] unmasked = errors(damaged, null, near, sim.truth(), w);
            if (System.getenv("STACKWRIGHT_PRINT") != null) {
                System.out.println("masked near " + masked[0] + " elsewhere " + masked[1] + "; unmasked near " + unmasked[0] + " elsewhere " + unmasked[1]);
            }
            assertTrue(masked[0] <= 1.5 * masked[1], "masked: NRMSE near defects " + masked[0] + ", elsewhere " + masked[1]);
            assertTrue(unmasked[0] >= 2 * masked[0], "unmasked: NRMSE near defects " + unmasked[0]
                    + " should be clearly worse than masked " + masked[0]);
        }
    }

    /** Voxels within 2 pixels (x, y) and 1 plane of a defect, defects included. */
    private static boolean[] near(Volume v, byte[] mask) {
        boolean[] out = new boolean[mask.length];
        for (int z = 0; z < v.depth(); z++) {
            for (int y = 0; y < v.height(); y++) {
                for (int x = 0; x < v.width(); x++) {
                    if (mask[v.index(x, y, z)] == 0) {
                        continue;
                    }
                    for (int k = Math.max(0, z - 1); k <= Math.min(v.depth() - 1, z + 1); k++) {
                        for (int j = Math.max(0, y - 2); j <= Math.min(v.height() - 1, y + 2); j++) {
                            for (int i = Math.max(0, x - 2); i <= Math.min(v.width() - 1, x + 2); i++) {
                                out[v.index(i, j, k)] = true;
                            }
                        }
                    }
                }
            }
        }
        return out;
    }

    /** @return NRMSE near the defects and elsewhere, after 30 RL iterations */
    private static double[] errors(Volume data, byte[] mask, boolean[] near, Volume truth, Workers w) {
        DeconvolutionProblem p = new DeconvolutionProblem(data, TestSpecimens.psf(), mask,
                DeconvolutionProblem.Boundary.EXTENDED, Camera.of(1, 0, 0), 10, w);
        Solution s = new RichardsonLucy(Stopping.fixed(30), false).solve(p, RunContext.quiet(2), IterationListener.NONE);
        float[] x = p.toVolume(s.estimate()).data();
        float[] t = truth.data();
        double[] e = new double[2];
        double[] n = new double[2];
        for (int i = 0; i < x.length; i++) {
            int g = near[i] ? 0 : 1;
            e[g] += (x[i] - t[i]) * (double) (x[i] - t[i]);
            n[g] += t[i] * (double) t[i];
        }
        return new double[] {Math.sqrt(e[0] / n[0]), Math.sqrt(e[1] / n[1])};
    }
}
