package org.stackwright.solve;

import java.util.Locale;
import java.util.SplittableRandom;

import org.stackwright.fft.Convolution;
import org.stackwright.fft.FastSizes;
import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.model.Camera;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.RunContext;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.GaussianPsf;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Measurement (not a test): does a smaller extended grid give the same deconvolution? Today the grid is image + PSF
 * - 1 along each axis, rounded up to a fast FFT size. Here the padding is the PSF's support at an energy share s
 * instead: along each axis the radius r whose centred slab of the PSF's marginal profile holds 1 - (1 - s) / 3 of its
 * light (so the box misses at most 1 - s of it), grid = image + 2 r rounded up to a fast size; the full PSF is still
 * used (its faint outer part wraps around the smaller grid). For each stack, accelerated and plain Richardson-Lucy
 * run a fixed number of iterations on both grids; printed: grid sizes, the voxel saving, and the largest difference
 * on the image window over the largest value of the full-padding result (the measure of
 * {@code DeconvolveBlocksTest}, whose tolerance for a block against the whole stack is 1e-2).
 *
 * <p>Stacks: three from the independent generator of {@code ConditionStacks} (base, bright, dim; its own pupil PSF)
 * and one invented here (beads and a Gaussian PSF, Poisson noise by the normal approximation). Run: {@code tools/benchmark.sh
 * org.stackwright.solve.GridPaddingBenchmark [ITERATIONS]} (default 30).
 */
public final class GridPaddingBenchmark {

    private static final double[] SHARES = {0.999, 0.99};

    private GridPaddingBenchmark() {
    }

    public static void main(String[] args) {
        int iterations = args.length > 0 ? Integer.parseInt(args[0]) : 30;
        FftEngine engine = FftEngines.choose("auto").engine();
        System.out.printf(Locale.ROOT, "%d iterations, %s engine%n", iterations, engine.name());
        for (String name : new String[] {"base", "bright", "dim"}) {
            Volume data = ConditionStacks.read(name);
            Volume psf = PsfChecks.prepare("psf", ConditionStacks.read("psf-true"), data, true, RunContext.quiet(2)).psf();
            double[] cam = ConditionStacks.truth(name);
            compare("independent generator, " + name, data, psf, Camera.of(cam[0], cam[2], cam[1]), cam[3] * cam[0],
                    engine, iterations);
        }
        VoxelSize voxel = new VoxelSize(0.1, 0.1, 0.25);
        Volume psf = GaussianPsf.sampled(0.15, 0.45, voxel, 31, 31, 31);
        Volume data = beads(96, 96, 32, voxel, psf, engine);
        compare("invented beads, Gaussian PSF 31^3", data, psf, Camera.of(1, 0, 0), 10, engine, iterations);
    }

    private static void compare(String what, Volume data, Volume psf, Camera camera, double bg, FftEngine engine,
            int iterations) {
        int[] full = {Convolution.paddedSize(data.width(), psf.width()), Convolution.paddedSize(data.height(), psf.height()),
            Convolution.paddedSize(data.depth(), psf.depth())};
        System.out.printf(Locale.ROOT, "%s: image %s, PSF %dx%dx%d, full grid %dx%dx%d%n", what, data.shape(),
                psf.width(), psf.height(), psf.depth(), full[0], full[1], full[2]);
        try (Workers w = new Workers(2)) {
            for (boolean accelerated : new boolean[] {true, false}) {
                float[] ref = run(data, psf, camera, bg, engine, w, full, accelerated, iterations);
                for (double share : SHARES) {
                    int[] r = radii(psf, share);
                    int[] grid = {FastSizes.atLeast(data.width() + 2 * r[0]), FastSizes.atLeast(data.height() + 2 * r[1]),
                        FastSizes.atLeast(data.depth() + 2 * r[2])};
                    for (int a = 0; a < 3; a++) {
                        grid[a] = Math.min(grid[a], full[a]);
                    }
                    float[] x = run(data, psf, camera, bg, engine, w, grid, accelerated, iterations);
                    double max = 0;
                    double diff = 0;
                    for (int i = 0; i < ref.length; i++) {
                        max = Math.max(max, Math.abs(ref[i]));
                        diff = Math.max(diff, Math.abs(ref[i] - x[i]));
                    }
                    double saving = 1 - (double) grid[0] * grid[1] * grid[2] / ((double) full[0] * full[1] * full[2]);
                    System.out.printf(Locale.ROOT, "  %s, share %.3f: radii %d,%d,%d, grid %dx%dx%d (%.0f%% fewer voxels),"
                            + " largest difference %.2e of the maximum, NRMSE between them %.2e%n",
                            accelerated ? "accelerated" : "plain", share, r[0], r[1], r[2], grid[0], grid[1], grid[2],
                            100 * saving, diff / max, ConditionStacks.error(x, ref));
                }
            }
        }
    }

    private static float[] run(Volume data, Volume psf, Camera camera, double bg, FftEngine engine, Workers w,
            int[] grid, boolean accelerated, int iterations) {
        DeconvolutionProblem p = DeconvolutionProblem.onGrid(data, psf, camera, bg, w, engine, grid);
        Solution s = new RichardsonLucy(Stopping.fixed(iterations), accelerated).solve(p,
                RunContext.quiet(w.threads()).withFft(engine), IterationListener.NONE);
        return p.toVolume(s.estimate()).data();
    }

    /** Per axis, the radius of the centred slab of the marginal profile holding 1 - (1 - share) / 3 of the light. */
    static int[] radii(Volume psf, double share) {
        int[] n = {psf.width(), psf.height(), psf.depth()};
        double[][] marginal = {new double[n[0]], new double[n[1]], new double[n[2]]};
        float[] d = psf.data();
        double total = 0;
        for (int z = 0; z < n[2]; z++) {
            for (int y = 0; y < n[1]; y++) {
                for (int x = 0; x < n[0]; x++) {
                    double v = Math.max(0, d[(z * n[1] + y) * n[0] + x]);
                    marginal[0][x] += v;
                    marginal[1][y] += v;
                    marginal[2][z] += v;
                    total += v;
                }
            }
        }
        double want = 1 - (1 - share) / 3;
        int[] r = new int[3];
        for (int a = 0; a < 3; a++) {
            int c = n[a] / 2;
            int k = 0;
            double in = marginal[a][c];
            while (in < want * total && k < c) {
                k++;
                in += marginal[a][c - k] + (c + k < n[a] ? marginal[a][c + k] : 0);
            }
            r[a] = k;
        }
        return r;
    }

    private static double gaussian(SplittableRandom r) {
        return Math.sqrt(-2 * Math.log(1 - r.nextDouble())) * Math.cos(2 * Math.PI * r.nextDouble());
    }

    /** Beads of random brightness, some near and across the edges, blurred on the full grid, Poisson noise. */
    private static Volume beads(int w, int h, int d, VoxelSize voxel, Volume psf, FftEngine engine) {
        Volume truth = Volume.zeros(w, h, d, voxel);
        SplittableRandom r = new SplittableRandom(7);
        float[] t = truth.data();
        for (int k = 0; k < 300; k++) {
            t[r.nextInt(t.length)] += (float) (200 + 2000 * r.nextDouble());
        }
        Volume blurred = Convolution.convolve(truth, psf, new Workers(1));
        float[] b = blurred.data();
        for (int i = 0; i < b.length; i++) {
            double mean = Math.max(0, b[i]) + 10;
            // Poisson counts by the normal approximation (mean >= 10 here; common practice, no source)
            b[i] = (float) Math.max(0, Math.rint(mean + Math.sqrt(mean) * gaussian(r)));
        }
        return blurred;
    }
}
