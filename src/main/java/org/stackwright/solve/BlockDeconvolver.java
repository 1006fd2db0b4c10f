package org.stackwright.solve;

import java.util.Map;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.BlockOutput;
import org.stackwright.blocks.BlockProcessor;
import org.stackwright.blocks.Globals;
import org.stackwright.fft.FftEngine;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.FftChoice;
import org.stackwright.op.InputChecks;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * Deconvolves single blocks, each as a problem of its own on its read box with the extended-object boundary (the
 * halo's outer faces carry no wrap-around), with the values the global step fixed for the whole stack
 * ({@link WholeStackValues}): background, start value, camera values, iteration count, lambda, and for accelerated
 * Richardson-Lucy the representative block's extrapolation steps. Built once per machine (a cluster node rebuilds
 * it from the same {@link Globals}); only the core of each result is kept by the caller.
 */
final class BlockDeconvolver implements BlockProcessor {

    private final DeconvolutionSettings s;
    private final Globals g;
    private final Volume psf;
    private final double start;
    private final FftEngine fft;
    private final Workers workers;
    private final KeptBlock kept;

    /**
     * @param resolved the settings with the global choices put in
     * @param kept the representative block's result, handed over when its block comes
     */
    BlockDeconvolver(Values resolved, Globals g, BlockPsf psfs, KeptBlock kept, RunContext ctx) {
        this.s = DeconvolveOperation.settings(resolved);
        this.g = g;
        this.kept = kept;
        VoxelSize voxel = new VoxelSize(g.number("voxel_x"), g.number("voxel_y"), g.number("voxel_z"));
        this.psf = psfs.prepare(resolved, (int) g.number("width"), (int) g.number("height"), (int) g.number("depth"),
                voxel, null);
        this.start = g.number("start");
        // the engine of the settings (auto, native, java), the same on every node and on one machine
        this.fft = FftChoice.choose(resolved).engine();
        this.workers = new Workers(ctx.threads());
    }

    @Override
    public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
        Volume data = in.get("input");
        Volume done = kept.take(g, block.index());
        if (done != null) {
            return BlockOutput.of(Map.of("output", done));
        }
        DeconvolutionProblem problem = problem(s, s.background(), start, psf, in, workers, fft);
        if (problem == null) {
            c.warn("a block without trusted pixels (all masked or NaN) is given 0");
            return BlockOutput.of(Map.of("output", Volume.zeros(data.width(), data.height(), data.depth(),
                    data.voxel())));
        }
        Solution sol = blockSolver(s, this.g).solve(problem, c, IterationListener.NONE);
        return BlockOutput.of(Map.of("output", problem.toVolume(sol.estimate())));
    }

    @Override
    public void close() {
        workers.close();
    }

    /** Prefix of the global numbers that hold the extrapolation step of each iteration. */
    static final String STEP = "step.";

    static boolean accelerated(DeconvolutionSettings s) {
        return s.extrapolated();
    }

    /** @return the solver of every block: accelerated Richardson-Lucy takes the representative block's steps */
    static Solver blockSolver(DeconvolutionSettings s, Globals g) {
        if (s.method().equals("total-variation") && g.numbers().containsKey(WholeStackValues.MEAN_SIGNAL)) {
            return new PrimalDualTv(s.stopping(), s.lambda(), s.likelihood().equals("poisson")
                    ? PrimalDualTv.DataTerm.POISSON : PrimalDualTv.DataTerm.GAUSSIAN, g.number(WholeStackValues.MEAN_SIGNAL),
                    false);
        }
        if (!accelerated(s) || !g.numbers().containsKey(STEP + 1)) {
            return s.solver();
        }
        int n = 0;
        while (g.numbers().containsKey(STEP + (n + 1))) {
            n++;
        }
        double[] a = new double[n];
        for (int k = 0; k < n; k++) {
            a[k] = g.number(STEP + (k + 1));
        }
        return s.method().equals("richardson-lucy-tv") ? new RichardsonLucyTv(s.stopping(), s.lambda(), a)
                : new RichardsonLucy(s.stopping(), a);
    }

    /**
     * Deconvolves one block's read box with fixed background and start (the global step's representative run).
     *
     * @return the solution and the block's result over its read box, or null when the block has no trusted pixel
     */
    static Solved solve(Solver solver, DeconvolutionSettings s, double bg, double start, Volume psf,
            Map<String, Volume> in, RunContext ctx) {
        try (Workers workers = new Workers(ctx.threads())) {
            DeconvolutionProblem problem = problem(s, bg, start, psf, in, workers, ctx.fft());
            if (problem == null) {
                return null;
            }
            Solution sol = solver.solve(problem, ctx, IterationListener.NONE);
            return new Solved(sol, problem.toVolume(sol.estimate()));
        }
    }

    /** A block deconvolved: the solver's solution and the result over the block's read box. */
    record Solved(Solution solution, Volume result) {
    }

    /** @return the problem of one block, or null when the block has no trusted pixel */
    static DeconvolutionProblem problem(DeconvolutionSettings s, double bg, double start, Volume psf,
            Map<String, Volume> in, Workers workers, FftEngine fft) {
        Volume data = in.get("input");
        byte[] mask = expand(in.get("mask"), data);
        InputChecks.Scan scan = InputChecks.scan(data);
        mask = org.stackwright.op.MaskChecks.union(mask, scan.nonFiniteMask());
        if (scan.nonFinite() == data.size()) {
            return null;
        }
        data = InputChecks.finiteCopy(data, scan);
        if (mask != null) {
            boolean any = false;
            for (byte b : mask) {
                if (b == 0) {
                    any = true;
                    break;
                }
            }
            if (!any) {
                return null;
            }
        }
        DeconvolutionProblem.Boundary boundary = s.boundary().equals("periodic")
                ? DeconvolutionProblem.Boundary.PERIODIC : DeconvolutionProblem.Boundary.EXTENDED;
        return new DeconvolutionProblem(data, psf, mask, boundary, s.camera(), bg, workers, fft, (float) start);
    }

    /** @return one byte per data voxel (1 = untrusted) from a mask block of the same depth or one plane; or null */
    static byte[] expand(Volume mask, Volume data) {
        if (mask == null) {
            return null;
        }
        int plane = data.width() * data.height();
        byte[] out = new byte[data.size()];
        float[] m = mask.data();
        for (int z = 0; z < data.depth(); z++) {
            int src = mask.depth() == 1 ? 0 : z * plane;
            for (int i = 0; i < plane; i++) {
                out[z * plane + i] = (byte) (m[src + i] != 0 ? 1 : 0);
            }
        }
        return out;
    }
}
