package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.SplittableRandom;

import org.junit.jupiter.api.Test;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/** Repeatability, convergence of chains started apart, and the diagnostics against known values. */
class PosteriorSamplerTest {

    /** A small 2D field from the coverage test's own generator (independent of the simulator). */
    static PosteriorSampling.Result run(int threads, int samples, int burnIn) {
        return run(threads, samples, burnIn, 5, 1);
    }

    static PosteriorSampling.Result run(int threads, int samples, int burnIn, int thinning, double brightness) {
        Volume truth = PosteriorCoverageTest.truth(32, 32, 1);
        float[] t = truth.data();
        for (int i = 0; i < t.length; i++) {
            t[i] *= (float) brightness;
        }
        Volume psf = PosteriorCoverageTest.psf(1);
        Volume data = PosteriorCoverageTest.data(truth, psf, 5, 4);
        DeconvolutionSettings s = new DeconvolutionSettings("total-variation", Stopping.fixed(100), 0, 5, 1, 0, 0.01,
                "extended", true, "poisson");
        PosteriorSampler.Settings ss = new PosteriorSampler.Settings(samples, 2, burnIn, thinning,
                PosteriorSampler.DEFAULT_STAGES, PosteriorSampler.DEFAULT_STEP_SCALE, PosteriorSampler.DEFAULT_PROX_STEPS, 3);
        return PosteriorSampling.run(data, psf, "psf", null, s, ss, 0.9, RunContext.quiet(threads));
    }

    @Test
    void sameSeedGivesTheSameStatesForAnyThreadCount() {
        PosteriorSampling.Result a = run(1, 8, 5);
        PosteriorSampling.Result b = run(2, 8, 5);
        PosteriorSampling.Result c = run(2, 8, 5);
        for (int k = 0; k < a.draws().states().length; k++) {
            assertArrayEquals(a.draws().states()[k], b.draws().states()[k], "state " + k + ", 1 vs 2 threads");
            assertArrayEquals(b.draws().states()[k], c.draws().states()[k], "state " + k + ", repeat");
        }
        assertArrayEquals(a.summary().lower().data(), c.summary().lower().data());
    }

    /**
     * The chain from the most likely image and the chain from a flat image reach the same distribution: split
     * R-hat below 1.1 (Gelman &amp; Rubin 1992; Gelman et al., Bayesian Data Analysis, 3rd ed., 2013, sec. 11.4)
     * at the 95th percentile over the tracked voxels, and the interval holds the posterior mean. The field is dim
     * (peak 42 photons): bright flat objects leave the posterior wide in directions the step, set by the dim
     * background's curvature, crosses slowly (at full brightness and thinning 20 the same check gave 1.065).
     */
    @Test
    void chainsStartedApartAgree() {
        PosteriorSampling.Result r = run(2, 200, 200, 10, 0.3);
        PosteriorSummary s = r.summary();
        System.out.printf("2D chains apart: split R-hat median %.3f, p95 %.3f, max %.3f; ESS median %.0f%n",
                s.rhatMedian(), s.rhatHigh(), s.rhatMaximum(), s.essMedian());
        assertTrue(s.rhatHigh() < 1.1, "split R-hat p95 " + s.rhatHigh());
        float[] lo = s.lower().data();
        float[] hi = s.upper().data();
        float[] mean = s.mean().data();
        for (int i = 0; i < mean.length; i++) {
            assertTrue(lo[i] <= mean[i] && mean[i] <= hi[i] && lo[i] >= 0, "voxel " + i);
        }
    }

    /**
     * An AR(1) chain x_t = phi x_(t-1) + e_t has integrated autocorrelation time (1 + phi) / (1 - phi), so the
     * effective sample size of n draws is n (1 - phi) / (1 + phi) (Geyer, "Practical Markov chain Monte Carlo",
     * Statistical Science 7(4), 1992). Chains with different means give R-hat well above 1.
     */
    @Test
    void diagnosticsMatchAnAutoregressiveChain() {
        double phi = 0.8;
        int n = 20_000;
        double[][] chains = new double[4][n];
        SplittableRandom rng = new SplittableRandom(1);
        for (double[] c : chains) {
            double x = 0;
            for (int t = 0; t < n; t++) {
                x = phi * x + rng.nextGaussian();
                c[t] = x;
            }
        }
        ChainDiagnostics.Scalar d = ChainDiagnostics.of(chains);
        double expected = 4.0 * n * (1 - phi) / (1 + phi);
        assertEquals(expected, d.ess(), 0.1 * expected, "ESS of AR(1) with phi 0.8");
        assertEquals(1.0, d.rhat(), 0.01);
        for (int t = 0; t < n; t++) {
            chains[1][t] += 3;
        }
        assertTrue(ChainDiagnostics.of(chains).rhat() > 1.2);
    }

    /** numpy.percentile([1, 2, 3, 4], 90) = 3.7 (numpy's default "linear" method, Hyndman and Fan definition 7). */
    @Test
    void quantilesAreHyndmanFanSeven() {
        assertEquals(3.7, PosteriorSummary.quantile(new double[] {1, 2, 3, 4}, 0.9), 1e-12);
        assertEquals(1.3, PosteriorSummary.quantile(new double[] {1, 2, 3, 4}, 0.1), 1e-12);
        assertEquals(2.5, PosteriorSummary.quantile(new double[] {1, 2, 3, 4}, 0.5), 1e-12);
    }

    @Test
    void badSettingsNameTheKey() {
        IllegalArgumentException e = assertThrows(IllegalArgumentException.class,
                () -> new PosteriorSampler.Settings(3, 2, 0, 1, 10, 20, 5, 1));
        assertTrue(e.getMessage().startsWith("samples = 3"), e.getMessage());
        e = assertThrows(IllegalArgumentException.class, () -> new PosteriorSampler.Settings(10, 2, 0, 1, 2, 20, 5, 1));
        assertTrue(e.getMessage().contains("stability limit"), e.getMessage());
    }
}
