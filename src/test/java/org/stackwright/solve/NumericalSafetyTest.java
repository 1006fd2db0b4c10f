package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

import org.junit.jupiter.api.Test;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.op.RunFailedException;
import org.stackwright.parallel.Workers;
import org.stackwright.testing.IndependentStacks;
import org.stackwright.volume.Volume;

/**
 * The numerical safety of the solvers: very bright sparse data (where the model is floored in the
 * Richardson-Lucy ratio) stay finite for every method, and a non-finite number anywhere stops the run through the
 * one {@link NumericalGuard} with a message instead of a NaN result with exit code 0.
 */
class NumericalSafetyTest {

    /** Beads on a dark field: the estimate goes to zero between them, where H x is FFT rounding noise. */
    static Volume[] brightBeads(double photons) {
        return IndependentStacks.generate(new IndependentStacks.Spec(77, 48, 40, 16, photons, true, 0, 100, 1, 2,
                1.2, 1.5, 13, 9));
    }

    @Test
    void brightSparseDataStayFiniteForEveryMethod() {
        // 5e4 photons per voxel turned the estimate to NaN (objective 1.3, then 4e22, then NaN) before the model floor
        for (double photons : new double[] {5e4, 1e6}) {
            Volume[] v = brightBeads(photons);
            for (String method : DeconvolutionSettings.METHODS) {
                DeconvolutionSettings s = new DeconvolutionSettings(method, new Stopping(StopRule.NOISE, 50, 1e-3),
                        100, 0, 1, 2, Double.NaN, "extended", true, "poisson");
                Deconvolution.Outcome o = Deconvolution.run(v[0], v[1], "beads", null, s, RunContext.quiet(2),
                        IterationListener.NONE);
                for (double obj : o.solution().objective()) {
                    assertTrue(Double.isFinite(obj), method + " at " + photons + ": objective " + obj);
                }
                float min = Float.MAX_VALUE;
                for (float f : o.result().data()) {
                    assertTrue(Float.isFinite(f), method + " at " + photons + ": a non-finite value");
                    min = Math.min(min, f);
                }
                if (!method.equals("wiener")) {
                    assertTrue(min >= 0, method + " at " + photons + ": negative value " + min);
                }
            }
        }
    }

    @Test
    void theModelFloorFollowsTheBrightestDatum() {
        Volume[] v = brightBeads(5e4);
        try (Workers w = new Workers(1)) {
            DeconvolutionProblem p = new DeconvolutionProblem(v[0], v[1], null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(1, 100, 2), 0, w);
            float brightest = 0;
            for (float y : p.dataWindow()) {
                brightest = Math.max(brightest, y);
            }
            assertEquals(1e-6 * (brightest + p.background()), p.modelFloor(), 1e-9 * brightest);
        }
    }

    @Test
    void aNonFiniteObjectiveStopsTheRunWithItsIteration() {
        IterationLog log = new IterationLog("richardson-lucy", new Stopping(StopRule.FIXED, 10, 1e-3),
                RunContext.quiet(1), IterationListener.NONE);
        log.before();
        log.after(1.3, 1.3, 0.5, 0.1, Double.NaN, null);
        log.before();
        RunFailedException e = assertThrows(RunFailedException.class, () -> log.after(Double.NaN, 4e22, 0.5, 0.2, Double.NaN, null));
        assertTrue(e.getMessage().startsWith("richardson-lucy: the computation left the range of numbers at"
                + " iteration 2"), e.getMessage());
        assertThrows(RunFailedException.class, () -> log.after(1, Double.POSITIVE_INFINITY, 0.5, 0.2, Double.NaN, null));
    }

    @Test
    void aDivergingObjectiveStopsTheRunWhileItsNumbersAreStillFinite() {
        IterationLog log = new IterationLog("richardson-lucy-tv", new Stopping(StopRule.FIXED, 10, 1e-3),
                RunContext.quiet(1), IterationListener.NONE);
        log.after(147, 147, 0.5, 0.1, Double.NaN, null);
        log.after(150, 150, 0.5, 0.1, Double.NaN, null); // a small rise (extrapolation, regularisation) is allowed
        RunFailedException e = assertThrows(RunFailedException.class, () -> log.after(1.66e8, 1.66e8, 0.5, 0.2, Double.NaN, null));
        assertTrue(e.getMessage().contains("diverged at iteration 3"), e.getMessage());
    }

    @Test
    void aNonFiniteResultIsNeverReturned() {
        float[] x = {1, 2, Float.NaN, 4};
        Solution s = new Solution(x, 3, "maximum", new double[] {1, 1, 1}, new double[] {0, 0, 0}, 0);
        RunFailedException e = assertThrows(RunFailedException.class, () -> NumericalGuard.estimate("wiener", s));
        assertTrue(e.getMessage().contains("1 of 4 values of the result are NaN or infinite"), e.getMessage());
        NumericalGuard.estimate("wiener", new Solution(new float[] {0, 1}, 1, "one step", new double[] {1},
                new double[] {Double.NaN}, 0));
    }
}
