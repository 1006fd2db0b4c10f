package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.apache.commons.math3.distribution.PoissonDistribution;
import org.apache.commons.math3.random.Well19937c;
import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolution;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.Volume;

/**
 * Deconvolution of an invented 3D specimen (48 x 48 x 16, cell-like field drawn larger than the view, Gaussian
 * PSF, Poisson noise and a uniform background) whose truth is known. The thresholds are the ones the project set
 * itself (issue 4); the error measure is NRMSE = ||x - truth|| / ||truth|| (common practice).
 */
class SpecimenDeconvolutionTest {

    private static final double BACKGROUND = 10;

    static DeconvolutionProblem problem(Simulation.Outcome sim, DeconvolutionProblem.Boundary b, Workers w) {
        return new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null, b,
                Camera.of(1, 0, 0), BACKGROUND, w);
    }

    /** NRMSE of the estimate x (on the problem grid) against the truth. */
    static double nrmse(DeconvolutionProblem p, float[] x, Volume truth) {
        return Nrmse.of(p.toVolume(x).data(), truth.data());
    }

    @Test
    void richardsonLucyImprovesNrmseByAtLeastThirtyPercent() {
        Simulation.Outcome sim = TestSpecimens.cells(48, 48, 16, 1, BACKGROUND, Camera.photonCounting(), 21);
        double before = Nrmse.of(sim.data().data(), sim.truth().data(), BACKGROUND);
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = problem(sim, DeconvolutionProblem.Boundary.EXTENDED, w);
            Solution s = new RichardsonLucy(new Stopping(StopRule.NOISE, 300, 1e-3), false)
                    .solve(p, RunContext.quiet(2), IterationListener.NONE);
            double after = nrmse(p, s.estimate(), sim.truth());
            assertTrue(s.stopReason().startsWith("noise"), s.stopReason());
            assertTrue(after <= 0.7 * before, "NRMSE data " + before + ", RL " + after + " after " + s.iterations());
        }
    }

    /**
     * Extended object domain with weights (Bertero &amp; Boccacci 2005) against the periodic boundary: error in a
     * border band as wide as the PSF half-width (5 voxels in x and y, 4 planes in z), 100 iterations each. A bright
     * specimen (10x the photons) is used so that the systematic boundary error is not hidden by noise; at the
     * standard brightness the ratio is smaller (about 1.6 at 100 iterations, 1.3 at 40; measured, see the report).
     */
    @Test
    void extendedBoundaryHasAtLeastHalfTheBorderErrorOfPeriodic() {
        Simulation.Outcome sim = TestSpecimens.cells(48, 48, 16, 10, BACKGROUND, Camera.photonCounting(), 22);
        try (Workers w = new Workers(2)) {
            double[] band = new double[2];
            DeconvolutionProblem.Boundary[] modes = {DeconvolutionProblem.Boundary.EXTENDED, DeconvolutionProblem.Boundary.PERIODIC};
            for (int m = 0; m < 2; m++) {
                DeconvolutionProblem p = problem(sim, modes[m], w);
                Solution s = new RichardsonLucy(Stopping.fixed(100), false).solve(p, RunContext.quiet(2), IterationListener.NONE);
                band[m] = borderError(p.toVolume(s.estimate()), sim.truth(), 5, 5, 4);
            }
            assertTrue(2 * band[0] <= band[1], "border band NRMSE extended " + band[0] + ", periodic " + band[1]);
        }
    }

    static double borderError(Volume x, Volume truth, int bx, int by, int bz) {
        double e = 0;
        double t = 0;
        for (int z = 0; z < x.depth(); z++) {
            for (int y = 0; y < x.height(); y++) {
                for (int i = 0; i < x.width(); i++) {
                    boolean border = i < bx || i >= x.width() - bx || y < by || y >= x.height() - by || z < bz
                            || z >= x.depth() - bz;
                    if (border) {
                        double d = x.get(i, y, z) - truth.get(i, y, z);
                        e += d * d;
                        t += truth.get(i, y, z) * (double) truth.get(i, y, z);
                    }
                }
            }
        }
        return Math.sqrt(e / t);
    }

    /**
     * Biggs &amp; Andrews 1997 report that vector extrapolation reaches a given likelihood in far fewer iterations;
     * the project's requirement: the plain RL log-likelihood at iteration 100 within 40 accelerated iterations.
     */
    @Test
    void acceleratedReachesTheHundredthPlainLikelihoodWithinFortyIterations() {
        Simulation.Outcome sim = TestSpecimens.cells(48, 48, 16, 1, BACKGROUND, Camera.photonCounting(), 23);
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = problem(sim, DeconvolutionProblem.Boundary.EXTENDED, w);
            float[] work = new float[p.gridLength()];
            Solution plain = new RichardsonLucy(Stopping.fixed(100), false).solve(p, RunContext.quiet(2), IterationListener.NONE);
            double target = p.meanFit(plain.estimate(), work);
            Solution fast = new RichardsonLucy(Stopping.fixed(40), true).solve(p, RunContext.quiet(2), IterationListener.NONE);
            double reached = p.meanFit(fast.estimate(), work);
            assertTrue(reached <= target, "mean KL plain@100 " + target + ", accelerated@40 " + reached);
        }
    }

    /**
     * On a noisy case, TV-regularised deconvolution with the Poisson data term (primal-dual, Chambolle &amp; Pock
     * 2011) at its best lambda beats Richardson-Lucy at its best iteration count (Dey et al. 2006 make the same
     * comparison). The specimen is piecewise constant (solid spheres of 3 to 12 photons per voxel on a background
     * of 1), the kind of object TV models; on the cell-like field with point beads and thin filaments, TV did not
     * win (best NRMSE 0.547 against 0.518 for RL; measured, see the report).
     */
    @Test
    void totalVariationAtBestLambdaBeatsRichardsonLucyAtBestIteration() {
        Volume truth = spheres(48, 48, 16, 5);
        try (Workers w = new Workers(2)) {
            Volume data = poisson(Convolution.convolve(truth, TestSpecimens.psf(), w), 1, 7);
            DeconvolutionProblem p = new DeconvolutionProblem(data, TestSpecimens.psf(), null,
                    DeconvolutionProblem.Boundary.EXTENDED, Camera.of(1, 0, 0), 1, w);
            float[] x = new float[p.gridLength()];
            p.initialEstimate(x);
            double[] bestRl = {Double.POSITIVE_INFINITY};
            new RichardsonLucy(Stopping.fixed(60), false).solve(p, x, RunContext.quiet(2),
                    (k, max, obj, ch) -> bestRl[0] = Math.min(bestRl[0], nrmse(p, x, truth)));
            double bestTv = Double.POSITIVE_INFINITY;
            for (double lambda : new double[] {0.03, 0.1, 0.3}) {
                Solution s = new PrimalDualTv(new Stopping(StopRule.CHANGE, 600, 1e-4), lambda, PrimalDualTv.DataTerm.POISSON)
                        .solve(p, RunContext.quiet(2), IterationListener.NONE);
                bestTv = Math.min(bestTv, nrmse(p, s.estimate(), truth));
            }
            assertTrue(bestTv < bestRl[0], "best NRMSE: TV " + bestTv + ", RL " + bestRl[0]);
        }
    }

    /** Ten solid spheres (axially scaled for the 0.25 um planes), 3 to 12 photons per voxel. */
    static Volume spheres(int nx, int ny, int nz, long seed) {
        Volume truth = Volume.zeros(nx, ny, nz, TestSpecimens.VOXEL);
        SplittableRandom r = new SplittableRandom(seed);
        for (int k = 0; k < 10; k++) {
            double cx = r.nextDouble(4, nx - 4);
            double cy = r.nextDouble(4, ny - 4);
            double cz = r.nextDouble(3, nz - 3);
            double rad = r.nextDouble(2.5, 6);
            double v = r.nextDouble(3, 12);
            for (int z = 0; z < nz; z++) {
                for (int y = 0; y < ny; y++) {
                    for (int x = 0; x < nx; x++) {
                        double dz = (z - cz) * 2.5;
                        if ((x - cx) * (x - cx) + (y - cy) * (y - cy) + dz * dz <= rad * rad) {
                            truth.set(x, y, z, (float) v);
                        }
                    }
                }
            }
        }
        return truth;
    }

    /** Poisson counts of (blurred + background), seeded. */
    static Volume poisson(Volume blurred, double background, long seed) {
        Volume data = blurred.copy();
        Well19937c rng = new Well19937c(seed);
        float[] d = data.data();
        for (int i = 0; i < d.length; i++) {
            double m = Math.max(d[i], 0) + background;
            d[i] = new PoissonDistribution(rng, m, 1e-12, 10000).sample();
        }
        return data;
    }
}
