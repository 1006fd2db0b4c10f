package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.fft.Convolution;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The primal-dual method of Chambolle &amp; Pock (J Math Imaging Vis 40, 2011) converges: the primal-dual gap (a
 * certificate: P(x) - P* &lt;= gap) falls to the tolerance, and the solution then matches a much longer run.
 */
class PrimalDualTvTest {

    @Test
    void gapFallsToTheToleranceAndTheSolutionMatchesALongRun() {
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = spheresProblem(w);
            double tol = 1e-5;
            Solution s = new PrimalDualTv(new Stopping(StopRule.CHANGE, 3000, tol), 0.1, PrimalDualTv.DataTerm.POISSON)
                    .solve(p, RunContext.quiet(2), IterationListener.NONE);
            assertTrue(s.stopReason().startsWith("change"), s.stopReason());
            double[] gap = s.change();
            assertTrue(gap[gap.length - 1] < tol);
            assertTrue(gap[9] > 100 * tol, "the gap starts well above the tolerance: " + gap[9]);
            // the gap is not monotone from one iteration to the next (Chambolle & Pock bound it on average), but it
            // decreases overall: the smallest gap of each quarter of the run is below that of the quarter before
            int q = gap.length / 4;
            for (int k = 1; k < 4; k++) {
                assertTrue(min(gap, k * q, (k + 1) * q) < min(gap, (k - 1) * q, k * q), "gap stalled in quarter " + (k + 1)
                        + " of " + gap.length + " iterations");
            }
            Solution longRun = new PrimalDualTv(Stopping.fixed(2 * s.iterations()), 0.1, PrimalDualTv.DataTerm.POISSON)
                    .solve(p, RunContext.quiet(2), IterationListener.NONE);
            double d = relativeDifference(p.toVolume(s.estimate()).data(), p.toVolume(longRun.estimate()).data());
            assertTrue(d <= 1e-3, "relative difference to a run of " + longRun.iterations() + " iterations: " + d);
        }
    }

    /**
     * The adapted steps (residual balancing, Goldstein, Li, Yuan, Esser &amp; Baraniuk, NIPS 2015) reach the same
     * solution as the constant steps: both runs are taken to a relative primal-dual gap of 1e-5 (a certificate of
     * optimality for the same problem, Chambolle &amp; Pock 2011) and must agree to the constant-step solver's own
     * run-to-run tolerance above (1e-3 against a run twice as long), and both stay non-negative.
     */
    @Test
    void adaptedStepsReachTheSameSolution() {
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = spheresProblem(w);
            double tol = 1e-5;
            Solution constant = new PrimalDualTv(new Stopping(StopRule.CHANGE, 3000, tol), 0.1,
                    PrimalDualTv.DataTerm.POISSON, false).solve(p, RunContext.quiet(2), IterationListener.NONE);
            Solution adapted = new PrimalDualTv(new Stopping(StopRule.CHANGE, 3000, tol), 0.1,
                    PrimalDualTv.DataTerm.POISSON, true).solve(p, RunContext.quiet(2), IterationListener.NONE);
            String line = "constant: " + constant.iterations() + " iterations, " + constant.stopReason() + "; adapted: "
                    + adapted.iterations() + " iterations, " + adapted.stopReason();
            System.out.println("primal-dual steps: " + line);
            assertTrue(constant.stopReason().startsWith("change"), line);
            assertTrue(adapted.stopReason().startsWith("change"), line);
            assertTrue(adapted.stopReason().contains("steps adapted"), line);
            double d = relativeDifference(p.toVolume(adapted.estimate()).data(), p.toVolume(constant.estimate()).data());
            assertTrue(d <= 1e-3, "relative difference of the adapted to the constant steps' solution: " + d + "; " + line);
            for (float v : adapted.estimate()) {
                assertTrue(v >= 0, "negative value " + v);
            }
        }
    }

    /** the small blurred, Poisson-noisy stack of spheres both tests solve */
    private static DeconvolutionProblem spheresProblem(Workers w) {
        Volume truth = SpecimenDeconvolutionTest.spheres(24, 24, 8, 3);
        Volume data = SpecimenDeconvolutionTest.poisson(Convolution.convolve(truth, TestSpecimens.psf(), w), 1, 4);
        return new DeconvolutionProblem(data, TestSpecimens.psf(), null, DeconvolutionProblem.Boundary.EXTENDED,
                Camera.of(1, 0, 0), 1, w);
    }

    private static double min(double[] a, int from, int to) {
        double m = Double.POSITIVE_INFINITY;
        for (int i = from; i < to; i++) {
            m = Math.min(m, a[i]);
        }
        return m;
    }

    static double relativeDifference(float[] a, float[] b) {
        double e = 0;
        double t = 0;
        for (int i = 0; i < a.length; i++) {
            e += (a[i] - b[i]) * (double) (a[i] - b[i]);
            t += b[i] * (double) b[i];
        }
        return Math.sqrt(e / t);
    }
}
