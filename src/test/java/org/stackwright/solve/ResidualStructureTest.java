package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.Arrays;

import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * {@link ResidualStructure} on counts whose mean is known exactly (a one-voxel PSF, so H x = x): with the right model
 * the normalised residuals are independent, their mean square is 1 and the mean product of neighbours is 0 within
 * its standard error 1 / sqrt(pairs) (lag-one autocorrelation of white noise; Durbin &amp; Watson, Biometrika 37,
 * 1950); with a smooth misfit of variance s per pixel (in units of the Poisson variance) the product is about s.
 */
class ResidualStructureTest {

    private static final int W = 48;
    private static final int H = 40;
    private static final int D = 6;

    /** Mean square and neighbour product of data drawn with mean `truth`, judged against the flat model 100. */
    private static double[] measure(double amplitude) {
        Well19937c rng = new Well19937c(20261205L);
        float[] y = new float[W * H * D];
        for (int z = 0; z < D; z++) {
            for (int r = 0; r < H; r++) {
                for (int x = 0; x < W; x++) {
                    double mean = 100 * (1 + amplitude * Math.sin(2 * Math.PI * x / 32.0));
                    y[(z * H + r) * W + x] = new PoissonDistribution(rng, mean, 1e-12, 1000).sample();
                }
            }
        }
        Volume data = new Volume(W, H, D, y, VoxelSize.UNIT);
        Volume psf = new Volume(1, 1, 1, new float[] {1f}, VoxelSize.UNIT);
        try (Workers w = new Workers(1)) {
            DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(1, 0, 0), 0, w);
            float[] x = new float[p.gridLength()];
            Arrays.fill(x, 100f);
            return ResidualStructure.of(p, x);
        }
    }

    @Test
    void rightModelLeavesIndependentResiduals() {
        double[] s = measure(0);
        double pairs = 2.0 * W * H * D;
        assertEquals(1, s[0], 4 * Math.sqrt(2.0 / (W * H * D)), Arrays.toString(s));
        assertEquals(0, s[1], 4 / Math.sqrt(pairs), Arrays.toString(s));
    }

    @Test
    void smoothMisfitIsStructured() {
        // misfit 20 sin(2 pi x / 32) against a Poisson variance of about 100: variance 400 / 2 / 100 = 2 per pixel;
        // x-neighbours share 2 cos(2 pi / 32) of it, y-neighbours all of it: mean product 1.98
        double[] s = measure(0.2);
        assertEquals(3, s[0], 0.15, Arrays.toString(s));
        assertEquals(1.98, s[1], 0.1, Arrays.toString(s));
        assertTrue(s[1] >= AutoStop.STRUCTURED_SHARE * (s[0] - 1), Arrays.toString(s));
    }
}
