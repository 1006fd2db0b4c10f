package org.stackwright.solve;

import java.util.ArrayList;
import java.util.LinkedHashMap;
import java.util.List;
import java.util.Map;

import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.InputChecks;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.RunContext;
import org.stackwright.psf.PsfChecks;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Runs one deconvolution from camera data, a PSF and settings: checks the pixels ({@link InputChecks}: NaN and
 * infinite pixels are masked with a warning, joined to the caller's mask), prepares the PSF ({@link PsfChecks}),
 * checks memory ({@link MemoryCheck}), resolves automatic values ({@link AutomaticSettings}: camera, background,
 * lambda, stop), builds the {@link DeconvolutionProblem}, runs the solver and writes the run record. Used by the {@code deconvolve}
 * operation, the demo and the benchmark; no ImageJ needed.
 */
public final class Deconvolution {

    /**
     * @param result the estimate on the image grid, ADU above the offset
     * @param solution the solver's output (history, stop reason)
     * @param record the run record (JSON-ready map)
     * @param model the fitted forward model A x + background on the image, ADU above the offset, or null when not
     *     asked for (see {@link NoiseReplicas}, {@link RunResiduals}; from
     *     {@link DeconvolutionProblem#predictedAboveOffset})
     * @param settings the settings the run used, nothing automatic left (camera values, background, lambda, a fixed
     *     iteration count when the stop was auto): repeat the run, or run parts of a volume, with these
     */
    public record Outcome(Volume result, Solution solution, Map<String, Object> record, Volume model,
            DeconvolutionSettings settings) {
    }

    private Deconvolution() {
    }

    /**
     * @param data camera data, not modified
     * @param psf the PSF as read (any voxel size; checked and prepared by {@link PsfChecks#prepare}), not modified
     * @param psfName where the PSF came from, for the record
     * @param mask untrusted pixels (nonzero), one per data voxel, or null (checked by {@link MaskChecks#check}
     *     when it comes from the user)
     * @param s settings; automatic values are resolved first ({@link AutomaticSettings})
     * @param ctx threads, progress, cancel, warnings
     * @param listener told about each iteration
     */
    public static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            RunContext ctx, IterationListener listener) {
        return run(data, psf, psfName, mask, s, null, null, ctx, listener, false);
    }

    /** As above, with dark and/or flat frames for the camera values (each may be null). */
    public static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            Volume dark, Volume flat, RunContext ctx, IterationListener listener) {
        return run(data, psf, psfName, mask, s, dark, flat, ctx, listener, false);
    }

    /** As above; with {@code withModel} the outcome also holds the fitted forward model (one more blur). */
    static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s, Volume dark,
            Volume flat, RunContext ctx, IterationListener listener, boolean withModel) {
        return run(data, psf, psfName, mask, s, dark, flat, ctx, listener, withModel, null, null);
    }

    /**
     * Depth-variant deconvolution: as {@link #run(Volume, Volume, String, byte[], DeconvolutionSettings,
     * RunContext, IterationListener)} with the PSF modelled at {@code depthVariant.strata()} depths
     * ({@link DepthStrata}) instead of one given PSF; Richardson-Lucy (plain or accelerated) only.
     *
     * @param depthVariant optics at the first plane and the number of strata
     */
    public static Outcome runDepthVariant(Volume data, byte[] mask, DeconvolutionSettings s, DepthVariant depthVariant,
            RunContext ctx, IterationListener listener) {
        return runDepthVariant(data, mask, s, depthVariant, null, null, ctx, listener);
    }

    /** As above, with dark and/or flat frames for the camera values (each may be null). */
    public static Outcome runDepthVariant(Volume data, byte[] mask, DeconvolutionSettings s, DepthVariant depthVariant,
            Volume dark, Volume flat, RunContext ctx, IterationListener listener) {
        if (!s.method().equals("richardson-lucy")) {
            throw new IllegalArgumentException("depth-variant on works with method richardson-lucy only (given "
                    + s.method() + "); choose method richardson-lucy (acceleration on or off)");
        }
        return run(data, null, "modelled: gibson-lanni at " + depthVariant.strata() + " depths", mask, s, dark, flat,
                ctx, listener, false, depthVariant, null);
    }

    /**
     * The settings of a depth-variant deconvolution.
     *
     * @param optics Gibson-Lanni optics, depth = depth below the coverslip of the emitters in focus at the first
     *     plane (grid sizes unused)
     * @param strata number of PSFs
     */
    public record DepthVariant(org.stackwright.psf.PsfSettings optics, int strata) {
    }

    /** Work that needs the problem and the solver's grid estimate, done before the problem's threads stop. */
    interface AfterSolve {
        /**
         * @param problem the problem the solver ran on (its threads still running)
         * @param solution the solver's output (grid estimate), not to be modified
         */
        void run(DeconvolutionProblem problem, Solution solution);
    }

    /** As {@link #run(Volume, Volume, String, byte[], DeconvolutionSettings, RunContext, IterationListener)}; with
     * {@code withModel} the outcome also holds the fitted forward model (one more blur). */
    static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            RunContext ctx, IterationListener listener, boolean withModel) {
        return run(data, psf, psfName, mask, s, null, null, ctx, listener, withModel);
    }

    /** As above; {@code after} (or null) runs on the problem and the solution before the problem's threads stop. */
    static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            RunContext ctx, IterationListener listener, boolean withModel, AfterSolve after) {
        return run(data, psf, psfName, mask, s, null, null, ctx, listener, withModel, null, after);
    }

    private static Outcome run(Volume data, Volume psf, String psfName, byte[] mask, DeconvolutionSettings s,
            Volume dark, Volume flat, RunContext ctx, IterationListener listener, boolean withModel, DepthVariant dv,
            AfterSolve after) {
        InputChecks.Scan scan = InputChecks.check("input", data, ctx);
        InputChecks.checkOffset("input", data, s.offset(), s.readNoise(), ctx);
        mask = MaskChecks.union(mask, scan.nonFiniteMask());
        data = InputChecks.finiteCopy(data, scan);
        DeconvolutionProblem.Boundary boundary = AutomaticSettings.boundary(s);
        int warned = ctx.warnings().size();
        // one PSF as given, or (depth-variant) an empty volume of the modelled PSFs' size for the grid
        PsfChecks.Prepared prepared = dv == null
                ? PsfChecks.prepare("psf", psf, data, boundary == DeconvolutionProblem.Boundary.EXTENDED, ctx)
                : new PsfChecks.Prepared(emptyOfSize(DepthStrata.psfSize(dv.optics(), data), data), 0);
        Volume p = prepared.psf();
        List<String> notes = new ArrayList<>(ctx.warnings().subList(warned, ctx.warnings().size()));
        Solver planned = s.solver();
        long grid = gridVoxels(data, p, boundary);
        // a depth-variant blur holds K transfer functions, two spectra and a buffer instead of one blur's two
        long need = memoryEstimate(grid, planned.gridArrays() + (dv == null ? 0 : dv.strata() + 1), data.size());
        MemoryCheck.require("deconvolve of " + data.shape() + " (grid " + gridShape(data, p, boundary)
                + (boundary == DeconvolutionProblem.Boundary.EXTENDED ? "; --boundary periodic needs a smaller grid" : "")
                + (dv == null ? "" : "; " + dv.strata() + " strata: fewer strata need less") + ")", need);
        DepthStrata strata = null;
        if (dv != null) {
            ctx.progress(0, "modelling " + dv.strata() + " PSFs across the depth");
            try (Workers workers = new Workers(ctx.threads())) {
                strata = DepthStrata.build(dv.optics(), data, dv.strata(), workers);
            }
        }
        // automatic values from the data; a depth-variant run finds its stop with the PSF of the middle stratum
        Volume trialPsf = strata == null ? p : strata.psfs().get(strata.psfs().size() / 2);
        AutomaticSettings.Resolved resolved = AutomaticSettings.resolve(data, trialPsf, mask, s, dark, flat, ctx);
        DeconvolutionSettings used = resolved.settings();
        double bg = used.background();
        Solver solver = used.solver();
        ctx.progress(0, "preparing " + used.method());
        Solution sol;
        DeconvolutionProblem problem;
        Volume model;
        double[] fit;
        try (Workers workers = new Workers(ctx.threads())) {
            if (strata == null) {
                problem = new DeconvolutionProblem(data, p, mask, boundary, used.camera(), bg, workers, ctx.fft());
            } else {
                problem = DeconvolutionProblem.depthVariant(data, strata.psfs(), strata.planes(), mask, boundary,
                        used.camera(), bg, workers, ctx.fft());
            }
            sol = solver.solve(problem, ctx, listener);
            NumericalGuard.estimate(s.method(), sol);
            fit = problem.fitOfEstimate(sol.estimate());
            model = withModel ? problem.predictedAboveOffset(sol.estimate()) : null;
            if (after != null) {
                after.run(problem, sol);
            }
        }
        boolean early = (resolved.stop() != null ? resolved.stop().met() : used.stopping().rule() == StopRule.FIXED)
                || used.regularized();
        String reason = (resolved.stop() != null ? resolved.stop().reason() : sol.stopReason()) + "; "
                + FitStatus.describe(fit[0], fit[1], early);
        sol = new Solution(sol.estimate(), sol.iterations(), reason, sol.objective(), sol.change(), sol.seconds());
        Volume result = problem.toVolume(sol.estimate());
        Map<String, Object> r = new LinkedHashMap<>();
        r.put("operation", "deconvolve");
        r.put("method", used.method());
        r.put("iterations", sol.iterations());
        r.put("stop_reason", sol.stopReason());
        r.put("seconds", sol.seconds());
        r.put("objective", solver.objectiveName());
        r.put("history", sol.objective());
        r.put("change_history", sol.change());
        r.put("fit_per_pixel", fit[0]);
        r.put("fit_expected_from_noise", fit[1]);
        r.put("settings", settingsRecord(s, used, resolved.record(), ctx.threads()));
        Map<String, Object> psfInfo = new LinkedHashMap<>();
        psfInfo.put("source", psfName);
        if (psf != null) {
            psfInfo.put("shape_as_read", psf.shape());
            psfInfo.put("voxel_um_as_read", List.of(psf.voxel().x(), psf.voxel().y(), psf.voxel().z()));
            psfInfo.put("sum_as_read", psf.sum());
        }
        psfInfo.put("shape_used", p.shape());
        psfInfo.put("energy_share_dropped", prepared.droppedShare());
        psfInfo.put("changes", notes);
        r.put("psf", psfInfo);
        if (strata != null) {
            r.put("depth_variant", strata.record());
        }
        r.put("image_shape", data.shape());
        r.put("voxel_um", List.of(data.voxel().x(), data.voxel().y(), data.voxel().z()));
        r.put("grid_shape", problem.gridWidth() + "x" + problem.gridHeight() + "x" + problem.gridDepth());
        r.put("trusted_pixels", problem.trustedPixels());
        r.put("fft_engine", problem.fftEngine());
        r.put("fft_planning", problem.fftPlanning());
        r.put("peak_memory_estimate_bytes", need);
        r.put("result_units", "ADU above the camera offset (background removed)");
        return new Outcome(result, sol, r, model, used);
    }

    /**
     * @return the "settings" entry of a run record: the rule asked for, how the automatic values were found
     *     ({@link AutomaticSettings.Resolved#record}) and the values used; the same for a whole-stack run and a run
     *     in blocks
     * @param asked the settings as given (the stop rule and its limits are recorded as asked)
     * @param used the settings used, nothing automatic left
     * @param found how the automatic values were found
     */
    static Map<String, Object> settingsRecord(DeconvolutionSettings asked, DeconvolutionSettings used,
            Map<String, Object> found, int threads) {
        Map<String, Object> set = new LinkedHashMap<>();
        set.put("stop", asked.stopping().rule().word());
        set.put("max_iterations", asked.stopping().maxIterations());
        set.put("tolerance", asked.stopping().tolerance());
        set.putAll(found);
        set.put("regularization", used.regularized() ? used.lambda() : 0.0);
        set.put("boundary", used.boundary());
        set.put("acceleration", used.extrapolated());
        set.put("likelihood", used.likelihood());
        set.put("threads", threads);
        return set;
    }

    private static Volume emptyOfSize(int[] size, Volume data) {
        return Volume.zeros(size[0], size[1], size[2], data.voxel());
    }

    /**
     * Grid-sized float arrays every run holds besides the solver's own: the normalisation (1), the transfer
     * function and the FFT work spectrum (2 x (nx/2+1)/nx, about 2). Image-sized arrays (input, data in
     * photo-electrons, output) are counted separately.
     */
    static final double PROBLEM_ARRAYS = 3;

    /**
     * @param gridVoxels voxels of the padded grid
     * @param solverArrays grid-sized float arrays the solver allocates
     * @param imageVoxels voxels of the image (input and output copies)
     * @return estimated peak bytes of a run
     */
    static long memoryEstimate(long gridVoxels, double solverArrays, long imageVoxels) {
        double floats = gridVoxels * (PROBLEM_ARRAYS + solverArrays) + 3.0 * imageVoxels;
        return (long) (floats * Float.BYTES);
    }

    private static int[] gridDims(Volume data, Volume p, DeconvolutionProblem.Boundary b) {
        if (b == DeconvolutionProblem.Boundary.PERIODIC) {
            return new int[] {data.width(), data.height(), data.depth()};
        }
        return new int[] {org.stackwright.fft.Convolution.paddedSize(data.width(), p.width()),
            org.stackwright.fft.Convolution.paddedSize(data.height(), p.height()),
            org.stackwright.fft.Convolution.paddedSize(data.depth(), p.depth())};
    }

    private static long gridVoxels(Volume data, Volume p, DeconvolutionProblem.Boundary b) {
        int[] g = gridDims(data, p, b);
        return (long) g[0] * g[1] * g[2];
    }

    private static String gridShape(Volume data, Volume p, DeconvolutionProblem.Boundary b) {
        int[] g = gridDims(data, p, b);
        return g[0] + "x" + g[1] + "x" + g[2];
    }
}
