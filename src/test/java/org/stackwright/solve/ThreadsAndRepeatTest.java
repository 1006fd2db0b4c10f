package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.util.List;
import java.util.function.Supplier;

import org.junit.jupiter.api.Test;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.model.Camera;
import org.stackwright.simulate.Simulation;
import org.stackwright.testing.VolumeAssert;

/**
 * Every solver gives the same result on 1 and 2 threads (within 1e-6 relative; by design bit-identical, since
 * reductions use fixed blocks) and repeat runs are bit-identical (the project's determinism rule).
 */
class ThreadsAndRepeatTest {

    @Test
    void everySolverAgreesAcrossThreadCountsAndRepeats() {
        Simulation.Outcome sim = TestSpecimens.cells(30, 26, 9, 1, 10, new Camera(2, 100, 3, 65535), 41);
        List<Supplier<Solver>> solvers = List.of(
                () -> new RichardsonLucy(Stopping.fixed(8), false),
                () -> new RichardsonLucy(Stopping.fixed(8), true),
                () -> new RichardsonLucyTv(Stopping.fixed(8), 0.002),
                () -> new RichardsonLucyTv(Stopping.fixed(8), 0.002, true),
                () -> new PrimalDualTv(Stopping.fixed(8), 0.05, PrimalDualTv.DataTerm.POISSON),
                () -> new PrimalDualTv(Stopping.fixed(8), 0.05, PrimalDualTv.DataTerm.GAUSSIAN),
                () -> new WienerFilter(0.01));
        for (Supplier<Solver> make : solvers) {
            float[] one = run(make.get(), sim, 1);
            float[] two = run(make.get(), sim, 2);
            float[] again = run(make.get(), sim, 2);
            String name = make.get().method();
            double rel = VolumeAssert.maxRelativeError(one, two);
            assertTrue(rel <= 1e-6, name + ": 1 vs 2 threads differ by " + rel);
            assertArrayEquals(two, again, name + ": repeat run differs");
        }
    }

    private static float[] run(Solver s, Simulation.Outcome sim, int threads) {
        try (Workers w = new Workers(threads)) {
            DeconvolutionProblem p = new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null,
                    DeconvolutionProblem.Boundary.EXTENDED, Camera.of(2, 100, 3), 20, w);
            return s.solve(p, RunContext.quiet(threads), IterationListener.NONE).estimate();
        }
    }
}
