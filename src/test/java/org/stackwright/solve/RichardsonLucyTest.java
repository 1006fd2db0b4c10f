package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.volume.Volume;

/** Properties of Richardson-Lucy that follow from its derivation as an EM algorithm. */
class RichardsonLucyTest {

    /**
     * Shepp &amp; Vardi, "Maximum likelihood reconstruction for emission tomography", IEEE TMI 1(2), 1982: each EM
     * (RL) iteration never decreases the Poisson log-likelihood, and with H^T 1 = 1 and no background the total
     * of the estimate equals the total of the data after every iteration. Periodic boundary with a unit-sum PSF
     * gives H^T 1 = 1.
     */
    @Test
    void likelihoodNeverDecreasesAndFluxIsPreserved() {
        Simulation.Outcome sim = TestSpecimens.cells(40, 36, 12, 1, 0, Camera.photonCounting(), 11);
        try (Workers w = new Workers(2)) {
            DeconvolutionProblem p = new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null,
                    DeconvolutionProblem.Boundary.PERIODIC, Camera.photonCounting(), 0, w);
            double dataFlux = sim.data().sum();
            float[] x = new float[p.gridLength()];
            p.initialEstimate(x);
            double[] flux = new double[31];
            RichardsonLucy rl = new RichardsonLucy(Stopping.fixed(30), false);
            Solution s = rl.solve(p, x, RunContext.quiet(2), (k, max, obj, ch) -> {
                double f = 0;
                for (float v : x) {
                    f += v;
                }
                flux[k] = f;
            });
            double[] kl = s.objective();
            for (int k = 1; k < kl.length; k++) {
                // float rounding of a sum over 17280 pixels: allow 1e-6 relative
                assertTrue(kl[k] <= kl[k - 1] * (1 + 1e-6), "KL rose at iteration " + (k + 1) + ": " + kl[k - 1] + " -> " + kl[k]);
            }
            assertTrue(kl[kl.length - 1] < 0.8 * kl[0], "the fit improved");
            for (int k = 1; k <= 30; k++) {
                assertEquals(dataFlux, flux[k], 1e-5 * dataFlux, "flux after iteration " + k);
            }
        }
    }

    /** The forward model keeps camera data as they are: offset and background are part of H x + b. */
    @Test
    void cameraOffsetAndGainGiveTheSameEstimateAsPhotonCounts() {
        Simulation.Outcome sim = TestSpecimens.cells(32, 32, 10, 1, 5, Camera.photonCounting(), 12);
        Volume adu = sim.data().copy();
        float[] a = adu.data();
        for (int i = 0; i < a.length; i++) {
            a[i] = a[i] * 2.5f + 100f;
        }
        try (Workers w = new Workers(1)) {
            DeconvolutionProblem p1 = new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null,
                    DeconvolutionProblem.Boundary.EXTENDED, Camera.of(1, 0, 0), 5, w);
            DeconvolutionProblem p2 = new DeconvolutionProblem(adu, TestSpecimens.psf(), null,
                    DeconvolutionProblem.Boundary.EXTENDED, Camera.of(2.5, 100, 0), 12.5, w);
            Volume r1 = p1.toVolume(new RichardsonLucy(Stopping.fixed(10), false).solve(p1, RunContext.quiet(1), IterationListener.NONE).estimate());
            Volume r2 = p2.toVolume(new RichardsonLucy(Stopping.fixed(10), false).solve(p2, RunContext.quiet(1), IterationListener.NONE).estimate());
            float[] d1 = r1.data();
            float[] d2 = r2.data();
            for (int i = 0; i < d1.length; i++) {
                assertEquals(d1[i] * 2.5, d2[i], 1e-3 * (1 + Math.abs(d2[i])), "voxel " + i);
            }
        }
    }
}
