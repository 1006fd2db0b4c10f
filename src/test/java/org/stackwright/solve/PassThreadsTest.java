package org.stackwright.solve;

import static org.junit.jupiter.api.Assertions.assertArrayEquals;
import static org.junit.jupiter.api.Assertions.assertEquals;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import java.util.function.Supplier;

import org.junit.jupiter.api.Test;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.fft.WorkGrid;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.simulate.Simulation;

/**
 * The element-wise passes of the Richardson-Lucy variants run on the run's threads and give bit-identical results
 * for 1, 2 and 3 threads (the project's determinism rule: fixed blocks, per-block sums combined in block order,
 * whichever thread ran a block). Checked on the Java engine for whole runs (its transforms do not depend on the
 * thread count), and on every engine for the ratio pass and the update in the engine's own work space (FFTW's plans
 * are made per thread count and may round differently, so whole runs on it are compared within a bound by
 * {@link ThreadsAndRepeatTest}). The image's planes fill only part of the padded grid, so the blocks cost unequal
 * amounts: the pass must not depend on which thread took which.
 */
class PassThreadsTest {

    private static final int[] THREADS = {1, 2, 3};

    @Test
    void wholeRunsOnTheJavaEngineAreBitIdenticalForAnyThreadCount() {
        Simulation.Outcome sim = TestSpecimens.cells(30, 26, 9, 1, 10, new Camera(2, 100, 3, 65535), 41);
        List<Supplier<Solver>> solvers = List.of(
                () -> new RichardsonLucy(Stopping.fixed(6), false),
                () -> new RichardsonLucy(Stopping.fixed(6), true),
                () -> new RichardsonLucyTv(Stopping.fixed(6), 0.002));
        for (Supplier<Solver> make : solvers) {
            float[] first = null;
            for (int t : THREADS) {
                try (Workers w = new Workers(t)) {
                    DeconvolutionProblem p = new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null,
                            DeconvolutionProblem.Boundary.EXTENDED, Camera.of(2, 100, 3), 20, w, FftEngines.java());
                    float[] x = make.get().solve(p, RunContext.quiet(t).withFft(FftEngines.java()),
                            IterationListener.NONE).estimate();
                    if (first == null) {
                        first = x;
                    } else {
                        assertArrayEquals(first, x, make.get().method() + ": " + t + " threads differ from 1");
                    }
                }
            }
        }
    }

    @Test
    void ratioAndUpdatePassesInEachEnginesWorkSpaceAreBitIdenticalForAnyThreadCount() {
        Simulation.Outcome sim = TestSpecimens.cells(30, 26, 9, 1, 10, new Camera(2, 100, 3, 65535), 7);
        for (FftEngine engine : engines()) {
            double[] fits = new double[THREADS.length];
            float[][] ratios = new float[THREADS.length][];
            float[][] updated = new float[THREADS.length][];
            double[] changes = new double[THREADS.length];
            for (int k = 0; k < THREADS.length; k++) {
                try (Workers w = new Workers(THREADS[k])) {
                    DeconvolutionProblem p = new DeconvolutionProblem(sim.data(), TestSpecimens.psf(), null,
                            DeconvolutionProblem.Boundary.EXTENDED, Camera.of(2, 100, 3), 20, w, engine);
                    int n = p.gridLength();
                    float[] model = values(n, 11, 5, 80);
                    CorrectionStep step = new CorrectionStep(p);
                    WorkGrid g = step.grid();
                    g.load(model, 0, n);
                    fits[k] = p.ratioAndFit(g);
                    ratios[k] = new float[n];
                    g.store(ratios[k], 0, n);
                    float[] x = values(n, 12, 1, 50);
                    changes[k] = step.update(x, null, 0f);
                    updated[k] = x;
                }
            }
            for (int k = 1; k < THREADS.length; k++) {
                String what = engine.name() + " engine, " + THREADS[k] + " threads against 1: ";
                assertEquals(Double.doubleToRawLongBits(fits[0]), Double.doubleToRawLongBits(fits[k]), what + "fit");
                assertArrayEquals(ratios[0], ratios[k], what + "ratio");
                assertArrayEquals(updated[0], updated[k], what + "update");
                assertEquals(Double.doubleToRawLongBits(changes[0]), Double.doubleToRawLongBits(changes[k]),
                        what + "change");
            }
        }
    }

    private static float[] values(int n, long seed, double low, double high) {
        SplittableRandom r = new SplittableRandom(seed);
        float[] a = new float[n];
        for (int i = 0; i < n; i++) {
            a[i] = (float) (low + (high - low) * r.nextDouble());
        }
        return a;
    }

    private static List<FftEngine> engines() {
        List<FftEngine> e = new ArrayList<>(List.of(FftEngines.java()));
        if (!FftEngines.standard().name().equals(FftEngines.JAVA_NAME)) {
            e.add(FftEngines.standard());
        }
        return e;
    }
}
