package org.stackwright.model;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Paths;
import java.util.Locale;
import java.util.SplittableRandom;

import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The ratio + data-fit pass of a Richardson-Lucy iteration alone (not a test): {@link DeconvolutionProblem#ratioAndFit}
 * on 256x256x64 data with a 31^3 PSF (grid 288x288x96), one thread, best of 12 in CPU seconds of the thread; and in the same
 * run the pass's arithmetic y ln(y / m) - y + m over the same values with {@link Math#log} and with {@link FastLog},
 * to give their ratio. Run from the repository root after {@code mvn -q -DskipTests package test-compile}:
 * {@code tools/benchmark.sh org.stackwright.model.FitPassBenchmark}.
 */
public final class FitPassBenchmark {

    private static final int REPS = 12;

    private FitPassBenchmark() {
    }

    public static void main(String[] args) throws Exception {
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.2);
        Volume psf = GaussianPsf.sampled(0.2, 0.5, voxel, 31, 31, 31);
        Volume data = Volume.zeros(256, 256, 64, voxel);
        SplittableRandom r = new SplittableRandom(1);
        float[] d = data.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (50 + 100 * r.nextDouble());
        }
        try (Workers w = new Workers(1)) {
            DeconvolutionProblem p = new DeconvolutionProblem(data, psf, null, DeconvolutionProblem.Boundary.EXTENDED,
                    Camera.of(1, 0, 0), 10, w);
            float[] model = new float[p.gridLength()];
            for (int i = 0; i < model.length; i++) {
                model[i] = (float) (40 + 100 * r.nextDouble());
            }
            float[] mu = new float[model.length];
            double best = Double.POSITIVE_INFINITY;
            double fit = 0;
            for (int k = 0; k < REPS; k++) {
                System.arraycopy(model, 0, mu, 0, mu.length);
                long c0 = threadCpu();
                fit = p.ratioAndFit(mu);
                best = Math.min(best, (threadCpu() - c0) * 1e-9);
            }
            System.out.printf(Locale.ROOT, "grid %dx%dx%d, 1 thread: ratio+fit pass %.3f s CPU (best of %d; fit %.6e)%n",
                    p.gridWidth(), p.gridHeight(), p.gridDepth(), best, REPS, fit);
            float[] m = new float[d.length];
            double slow = Double.POSITIVE_INFINITY;
            double fast = Double.POSITIVE_INFINITY;
            double[] sums = new double[2];
            for (int k = 0; k < REPS; k++) {
                System.arraycopy(model, 0, m, 0, m.length);
                long c0 = threadCpu();
                sums[0] = kernel(d, m, false);
                long c1 = threadCpu();
                System.arraycopy(model, 0, m, 0, m.length);
                long c1b = threadCpu();
                sums[1] = kernel(d, m, true);
                long c2 = threadCpu();
                slow = Math.min(slow, (c1 - c0) * 1e-9);
                fast = Math.min(fast, (c2 - c1b) * 1e-9);
            }
            System.out.printf(Locale.ROOT, "the pass's loop on plain arrays, %d values: Math.log %.3f s, FastLog %.3f s CPU, "
                    + "ratio %.2f (sums %.17g and %.17g)%n", d.length, slow, fast, slow / fast, sums[0], sums[1]);
        }
        System.out.println("load average: " + Files.readString(Paths.get("/proc/loadavg")).trim());
    }

    /**
     * The pass's loop body on plain arrays (background 10, ratio written back), with {@link FastLog} or
     * {@link Math#log}; the choice is loop-invariant, so the compiler moves it out of the loop.
     */
    private static double kernel(float[] y, float[] mu, boolean table) {
        double kl = 0;
        for (int i = 0; i < y.length; i++) {
            float yi = y[i];
            double m = Math.max(mu[i] + 10f, 1e-12);
            double q = yi / m;
            mu[i] = (float) q;
            kl += yi > 0 ? yi * (table ? FastLog.log(q) : Math.log(q)) - yi + m : m;
        }
        return kl;
    }

    /** CPU time of this thread (one worker runs its loops in the caller's thread), in ns */
    private static long threadCpu() {
        return java.lang.management.ManagementFactory.getThreadMXBean().getCurrentThreadCpuTime();
    }
}
