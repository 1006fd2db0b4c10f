package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockOutput;
import org.stackwright.blocks.BlockPlan;
import org.stackwright.blocks.BlockProcessor;
import org.stackwright.blocks.BlockTotals;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.fft.Convolution;
import org.stackwright.fft.FftEngine;
import org.stackwright.op.FftChoice;
import org.stackwright.model.CameraEstimate;
import org.stackwright.model.CameraEstimate.Given;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.InputChecks;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The block side of {@code deconvolve}. Each block is deconvolved as a problem of its own on its read box (the core
 * plus a halo of the PSF's size by default), with the extended-object boundary, so the halo's outer faces carry no
 * wrap-around; only the core is kept.
 *
 * <p><b>Global step</b> ({@link #resolve}), once for the whole volume, streamed plane by plane: the background
 * (the same estimate as in memory, {@link BackgroundEstimate}), the start value of the iterations (the mean of the
 * data above the background over all trusted pixels, as a whole-volume run starts), and the iteration count. With
 * the fixed rule that is the given count; with the noise or change rule, the rule is run once on a representative
 * part, the block whose core holds the most signal above the background, and every block then runs that many
 * iterations (recorded as "iterations found on block ..."). Automatic values ({@link AutomaticSettings}) are found
 * once, never per block: camera values on the block with the most signal in ADU, the background over the whole stack
 * (with the camera's noise correction), lambda and the automatic stop's iteration count on the representative
 * block; every block gets them as fixed settings. Dark and flat frames are refused in blocks.
 * Uncertainty (noise replicas, posterior sampling) and depth-variant runs need the whole volume in memory: they
 * take the usual path, and are refused when blocks are asked for ({@link #applies}).
 */
final class DeconvolveBlocks implements BlockOperation {

    /** Halo as a multiple of the PSF's size per axis. */
    private final double haloFactor;
    /** the representative block's result of the last global step, until its block asks for it */
    private Volume kept;
    /** the global step's result that the kept block result belongs to, and the block's index */
    private final Map<Globals, Integer> keptFor = java.util.Collections.synchronizedMap(new java.util.IdentityHashMap<>());
    private ImagePlus cachedFor;
    private VoxelSize cachedVoxel;
    private Volume cachedPsf;

    /** The halo measured to keep blocks within 1e-3 of the maximum of a whole-volume run (DeconvolveBlocksTest). */
    DeconvolveBlocks() {
        this(Double.NaN);
    }

    /**
     * @param haloFactor halo = this times the PSF's size per axis (rounded up), or NaN for the default: 1.5 for
     *     accelerated Richardson-Lucy (extrapolation carries the errors of a block's outer faces further inward),
     *     1 otherwise
     */
    DeconvolveBlocks(double haloFactor) {
        this.haloFactor = haloFactor;
    }

    @Override
    public List<String> streamedInputs() {
        return List.of("input", "mask");
    }

    @Override
    public Map<String, Integer> streamedOutputs(Values v) {
        return Map.of("output", 32);
    }

    /** @return the PSF checked and prepared at the main input's voxel size (kept for repeated calls) */
    private synchronized Volume psf(Values v, int w, int h, int d, VoxelSize voxel, RunContext ctx) {
        ImagePlus imp = v.image("psf");
        if (imp == cachedFor && voxel.equals(cachedVoxel) && ctx == null) {
            return cachedPsf;
        }
        Volume psf = ImagePlusAdapter.toVolume(imp);
        RunContext c = ctx == null ? RunContext.quiet(1) : ctx;
        if (!ImagePlusAdapter.isCalibrated(imp)) {
            psf = psf.withVoxel(voxel);
            if (ctx != null) {
                ctx.warn("psf: '" + imp.getTitle() + "' has no calibration; taken to have the image's voxel size " + voxel);
            }
        }
        // a stand-in for the image: PsfChecks only looks at its size and voxel size; sizes beyond the PSF's reach
        // cannot change its verdict, so the stand-in stays small
        int reach = 2 * Math.max(psf.width(), Math.max(psf.height(), psf.depth()))
                * (int) Math.ceil(Math.max(psf.voxel().x() / voxel.x(), Math.max(psf.voxel().y() / voxel.y(),
                        psf.voxel().z() / voxel.z()))) + 3;
        Volume proxy = Volume.zeros(Math.min(w, reach), Math.min(h, reach), Math.min(d, reach), voxel);
        // the extended boundary allows a PSF larger than the image, as on the whole-stack path
        boolean extended = !DeconvolveOperation.settings(v).boundary().equals("periodic");
        Volume p = PsfChecks.prepare("psf", psf, proxy, extended, c).psf();
        cachedFor = imp;
        cachedVoxel = voxel;
        cachedPsf = p;
        return p;
    }

    /**
     * @return the PSF's size at the main input's voxel size, as {@link PsfChecks#prepare} will make it (without
     *     its checks: they run in the global step, so a stack that fits in memory sees the usual messages)
     */
    static int[] psfSize(Values v, PlaneSource main) {
        ImagePlus imp = v.image("psf");
        int[] n = {imp.getWidth(), imp.getHeight(), imp.getNSlices()};
        if (ImagePlusAdapter.isCalibrated(imp)) {
            VoxelSize pv = ImagePlusAdapter.voxelSize(imp);
            double[] r = {pv.x() / main.voxel().x(), pv.y() / main.voxel().y(), pv.z() / main.voxel().z()};
            for (int a = 0; a < 3; a++) {
                if (n[a] > 1 && Math.abs(r[a] - 1) > 1e-6) {
                    int m = (int) Math.round(n[a] * r[a]);
                    n[a] = Math.max(1, m % 2 == 0 ? m + 1 : m);
                }
            }
        }
        return n;
    }

    @Override
    public int[] halo(Values v, PlaneSource main) {
        int[] p = psfSize(v, main);
        double f = Double.isNaN(haloFactor) ? (accelerated(DeconvolveOperation.settings(v)) ? 1.5 : 1.0) : haloFactor;
        return new int[] {(int) Math.ceil(f * p[0]), (int) Math.ceil(f * p[1]), (int) Math.ceil(f * p[2])};
    }

    /**
     * Uncertainty, depth-variant runs and the run's own residuals need the whole stack at once: they take the usual path (whose memory check
     * refuses a stack too large); with a block size given they are refused, naming the setting. Without a PSF the
     * usual path runs too, to say so.
     */
    @Override
    public boolean applies(Values v) {
        String whole = wholeStackOnly(v);
        if (whole != null && org.stackwright.blocks.BlockSettings.given(v)) {
            throw new IllegalArgumentException(whole);
        }
        // without a PSF the usual path says that it is missing
        return whole == null && (v.images().get("psf") != null || v.given("psf"));
    }

    /** @return why these settings need the whole stack at once, or null when they can run in blocks */
    private static String wholeStackOnly(Values v) {
        String mode = UncertaintyStep.mode(v);
        if (mode.equals("replicas")) {
            return "replicas: noise replicas need the whole stack in memory and cannot run in blocks; give replicas 0"
                    + " (or a smaller stack, or more memory with block-size auto)";
        }
        if (!mode.equals("none")) {
            return "uncertainty = " + mode + " needs the whole stack in memory and cannot run in blocks; give"
                    + " uncertainty none (or a smaller stack, or more memory with block-size auto)";
        }
        if (RunResiduals.wanted(v)) {
            return "residuals and residuals-summary compare the whole stack with the run's own prediction and cannot"
                    + " be made in blocks; leave them out and run the residuals operation on the result (or give"
                    + " block-size auto and enough memory for the whole stack)";
        }
        for (String key : List.of("dark", "flat")) {
            if (v.images().get(key) != null || v.given(key)) {
                return key + ": calibration frames are not used in blocks (the camera values are found once for the"
                        + " whole stack); give gain, offset and read-noise as numbers instead (e.g. from a run of"
                        + " deconvolve on a smaller stack with " + key + "), or give block-size auto and enough memory"
                        + " for the whole stack";
            }
        }
        if (v.choice("depth-variant").equals("on")) {
            return "depth-variant = on models the PSF over the whole depth and cannot run in blocks; give block-size"
                    + " auto and enough memory for the whole stack";
        }
        return null;
    }

    /** The work of a block is the voxels of its FFT grid: its read box, the PSF's padding, a fast size. */
    @Override
    public long blockWork(Values v, PlaneSource main, int w, int h, int d) {
        DeconvolutionSettings s = DeconvolveOperation.settings(v);
        int[] p = psfSize(v, main);
        return s.boundary().equals("periodic") ? (long) w * h * d
                : (long) Convolution.paddedSize(w, Math.min(p[0], w)) * Convolution.paddedSize(h, Math.min(p[1], h))
                        * Convolution.paddedSize(d, Math.min(p[2], d));
    }

    @Override
    public long blockBytes(Values v, PlaneSource main, int w, int h, int d) {
        DeconvolutionSettings s = DeconvolveOperation.settings(v);
        long grid = blockWork(v, main, w, h, d);
        long voxels = (long) w * h * d;
        // the mask (one byte per voxel) and the input as read, besides the problem and the solver
        return Deconvolution.memoryEstimate(grid, s.solver().gridArrays(), voxels) + 5 * voxels;
    }

    @Override
    public Globals resolve(Values v, Map<String, PlaneSource> in, BlockPlan plan, RunContext ctx) {
        DeconvolutionSettings s = DeconvolveOperation.settings(v);
        String whole = wholeStackOnly(v);
        if (whole != null) {
            throw new IllegalArgumentException(whole);
        }
        UncertaintyStep.check(v, "none");
        if (s.method().equals("wiener") && plan.blocks().size() > 1) {
            throw new IllegalArgumentException("method = wiener is one filter over the whole stack (its inverse reaches"
                    + " far beyond the PSF) and would leave seams between blocks; choose richardson-lucy or another"
                    + " iterative method, or give Java more memory so the stack fits in one block");
        }
        PlaneSource data = in.get("input");
        PlaneSource mask = in.get("mask");
        Volume psf = psf(v, data.width(), data.height(), data.depth(), data.voxel(), ctx);
        DeconvolveOperation.samplingCheck(v, Volume.zeros(1, 1, Math.min(2, data.depth()), data.voxel()), ctx);
        // automatic values are found once for the whole stack, never per block: the camera values on the block
        // with the most signal in ADU, then the background over the whole stack, then lambda and the stop's
        // iteration count on the block with the most signal above the background
        DeconvolutionSettings asked = s;
        Given given = new Given(s.gain(), s.offset(), s.readNoise(), null, null);
        CameraEstimate camera;
        String cameraFrom = "given";
        if (given.complete()) {
            camera = CameraEstimate.of(null, null, given, "dark", "flat");
        } else {
            Block rep = plan.blocks().get(brightestInAdu(data, mask, plan, ctx));
            ctx.progress(0, "global settings: camera values on block " + (rep.index() + 1));
            Part part = Part.of(data, mask, rep);
            camera = AutomaticSettings.camera(part.data(), part.mask(), s, null, null, ctx);
            cameraFrom = "block " + (rep.index() + 1) + " (core " + rep.core() + ", the most signal in ADU)";
        }
        s = s.withCamera(camera.offset().value(), s.background(), camera.gain().value(), camera.readNoise().value());
        Scan scan = new Scan(s, plan, data.width(), data.height());
        ctx.progress(0, "global settings: reading the stack");
        double bg = s.background();
        boolean estimated = Double.isNaN(bg);
        if (estimated) {
            bg = BackgroundEstimate.estimate(data, mask, s.offset(), s.camera(), scan::visit);
        } else {
            for (int z = 0; z < data.depth(); z++) {
                ctx.checkCancelled();
                float[] px = data.read(new Box(0, 0, z, data.width(), data.height(), 1)).data();
                scan.visit(z, px, maskPlane(mask, z, data));
            }
        }
        scan.warnings(ctx);
        s = s.withCamera(s.offset(), bg, s.gain(), s.readNoise());
        Map<String, Object> found = new LinkedHashMap<>(camera.record());
        found.put("camera_values_from", cameraFrom);
        found.put("background_adu", bg);
        found.put("background_estimated", estimated);
        String autoHow = null;
        if (!s.resolved()) {
            Block rep = plan.blocks().get(scan.brightest());
            ctx.progress(0, "global settings: automatic lambda and stop on block " + (rep.index() + 1));
            Part part = Part.of(data, mask, rep);
            AutomaticSettings.Resolved auto = AutomaticSettings.resolve(part.data(), psf, part.mask(), s, null, null,
                    ctx);
            s = auto.settings();
            Map<String, Object> ar = auto.record();
            for (String key : List.of("regularization_choice", "stop_trial")) {
                if (ar.containsKey(key)) {
                    found.put(key, ar.get(key));
                }
            }
            if (auto.stop() != null) {
                autoHow = "found by the auto rule (a trial on held-out pixels) on block " + (rep.index() + 1)
                        + " (core " + rep.core() + ", the most signal above the background): " + auto.stop().reason();
            }
            found.put("lambda_and_stop_from", "block " + (rep.index() + 1) + " (core " + rep.core()
                    + ", the most signal above the background); every block uses them");
        }
        double b = bg / s.gain() + s.camera().readNoiseShift();
        double start = Math.max((scan.sumY - scan.trusted * (double) (float) b) / scan.trusted, 1e-3);
        Map<String, String> set = new LinkedHashMap<>();
        Map<String, Double> numbers = new LinkedHashMap<>();
        Map<String, Object> rec = new LinkedHashMap<>();
        set.put("background", Double.toString(bg));
        set.put("offset", Double.toString(s.offset()));
        set.put("gain", Double.toString(s.gain()));
        set.put("read-noise", Double.toString(s.readNoise()));
        if (s.regularized()) {
            set.put("regularization", Double.toString(s.lambda()));
        }
        // one block is the whole volume: it starts as a whole-volume run does, to the last bit
        numbers.put("start", plan.blocks().size() == 1 ? Double.NaN : start);
        numbers.put("width", (double) data.width());
        numbers.put("height", (double) data.height());
        numbers.put("depth", (double) data.depth());
        numbers.put("voxel_x", data.voxel().x());
        numbers.put("voxel_y", data.voxel().y());
        numbers.put("voxel_z", data.voxel().z());
        rec.put("background_adu", bg);
        rec.put("background_estimated", estimated);
        rec.put("background_from", estimated ? "1st percentile of the 5x5x3 mean over the whole stack" : "given");
        rec.put("start_photoelectrons", start);
        rec.put("trusted_pixels", scan.trusted);
        int iterations = s.stopping().maxIterations();
        String how = autoHow != null ? autoHow : "given (" + s.stopping().rule().word() + " rule)";
        int repIndex = -1;
        kept = null;
        if (s.method().equals("total-variation") && plan.blocks().size() > 1) {
            double mean = meanSignal(data, mask, s, (float) b) / scan.trusted;
            numbers.put(MEAN_SIGNAL, mean);
            rec.put("mean_signal_photoelectrons", mean);
        }
        boolean steps = accelerated(s) && plan.blocks().size() > 1;
        if (!s.method().equals("wiener") && plan.blocks().size() > 1 && (s.stopping().rule() != StopRule.FIXED || steps)) {
            Block rep = plan.blocks().get(scan.brightest());
            ctx.progress(0, "global settings: " + (s.stopping().rule() == StopRule.FIXED ? "extrapolation steps"
                    : s.stopping().rule().word() + " rule") + " on block " + (rep.index() + 1));
            Map<String, Volume> part = new LinkedHashMap<>();
            part.put("input", data.read(rep.read()));
            if (mask != null) {
                part.put("mask", mask.read(rep.read()));
            }
            // the representative block runs as every block will (the whole volume's start, background and
            // step balance), so its result is kept and used as its own block's output
            Solver solver = accelerated(s) ? new RichardsonLucy(s.stopping(), true)
                    : blockSolver(s, new Globals(Map.of(), numbers, Map.of()));
            Solution sol = solveBlock(solver, s, bg, start, psf, part, ctx);
            if (sol != null && s.stopping().rule() != StopRule.FIXED) {
                iterations = sol.iterations();
                how = "found by the " + s.stopping().rule().word() + " rule on block " + (rep.index() + 1) + " (core "
                        + rep.core() + ", the most signal above the background): " + sol.stopReason();
            }
            if (steps && solver instanceof RichardsonLucy rl) {
                double[] a = rl.steps();
                for (int k = 0; k < a.length; k++) {
                    numbers.put(STEP + (k + 1), a[k]);
                }
                rec.put("extrapolation_steps", a);
                rec.put("extrapolation_steps_from", "block " + (rep.index() + 1) + " (every block uses them)");
            }
            rec.put("representative_block", Map.of("index", rep.index() + 1, "core", rep.core().toString(),
                    "read", rep.read().toString()));
            repIndex = rep.index();
        }
        if (!s.method().equals("wiener")) {
            set.put("stop", "fixed");
            set.put("iterations", Integer.toString(iterations));
        }
        rec.put("iterations", iterations);
        rec.put("iterations_from", how);
        rec.put("regularization", s.method().equals("richardson-lucy") ? 0.0 : s.lambda());
        rec.put(SETTINGS, Deconvolution.settingsRecord(asked, s, found, ctx.threads()));
        Globals g = new Globals(set, numbers, rec);
        if (repIndex >= 0 && kept != null) {
            keptFor.clear();
            keptFor.put(g, repIndex);
        } else {
            kept = null;
        }
        return g;
    }

    /** Global record entry: the run record's settings (as a whole-stack run records them). */
    private static final String SETTINGS = "settings";

    /** One block's read box in memory: its pixels (non-finite ones masked) and mask, for the automatic values. */
    private record Part(Volume data, byte[] mask) {
        static Part of(PlaneSource data, PlaneSource mask, Block block) {
            Volume d = data.read(block.read());
            byte[] m = mask == null ? null : expand(mask.read(block.read()), d);
            InputChecks.Scan scan = InputChecks.scan(d);
            return new Part(InputChecks.finiteCopy(d, scan), org.stackwright.op.MaskChecks.union(m, scan.nonFiniteMask()));
        }
    }

    /** @return one plane of the mask (1 = untrusted), or null without a mask */
    private static byte[] maskPlane(PlaneSource mask, int z, PlaneSource data) {
        if (mask == null) {
            return null;
        }
        float[] mm = mask.read(new Box(0, 0, mask.depth() == 1 ? 0 : z, data.width(), data.height(), 1)).data();
        byte[] m = new byte[mm.length];
        for (int i = 0; i < mm.length; i++) {
            m[i] = (byte) (mm[i] != 0 ? 1 : 0);
        }
        return m;
    }

    /** @return the index of the block whose core has the highest mean of trusted finite pixels in ADU */
    private static int brightestInAdu(PlaneSource data, PlaneSource mask, BlockPlan plan, RunContext ctx) {
        double[] sum = new double[plan.blocks().size()];
        long[] count = new long[sum.length];
        int w = data.width();
        for (int z = 0; z < data.depth(); z++) {
            ctx.checkCancelled();
            float[] px = data.read(new Box(0, 0, z, w, data.height(), 1)).data();
            byte[] m = maskPlane(mask, z, data);
            for (Block b : plan.blocks()) {
                Box c = b.core();
                if (!c.holdsPlane(z)) {
                    continue;
                }
                for (int y = c.y(); y < c.y() + c.h(); y++) {
                    for (int x = c.x(); x < c.x() + c.w(); x++) {
                        int i = y * w + x;
                        if (Float.isFinite(px[i]) && (m == null || m[i] == 0)) {
                            sum[b.index()] += px[i];
                            count[b.index()]++;
                        }
                    }
                }
            }
        }
        int best = 0;
        for (int i = 1; i < sum.length; i++) {
            if (count[i] > 0 && (count[best] == 0 || sum[i] / count[i] > sum[best] / count[best])) {
                best = i;
            }
        }
        return best;
    }

    /** Whole-volume statistics gathered plane by plane in the global step. */
    private static final class Scan {
        private final DeconvolutionSettings s;
        private final BlockPlan plan;
        private final int w;
        private final double shift;
        private final double[] signal;
        private long trusted;
        private double sumY;
        private long nonFinite;
        private long negative;
        private long masked;
        private long total;

        Scan(DeconvolutionSettings s, BlockPlan plan, int w, int h) {
            this.s = s;
            this.plan = plan;
            this.w = w;
            this.shift = s.camera().readNoiseShift();
            this.signal = new double[plan.blocks().size()];
        }

        void visit(int z, float[] px, byte[] m) {
            double[] row = new double[px.length];
            for (int i = 0; i < px.length; i++) {
                float f = px[i];
                total++;
                if (!Float.isFinite(f)) {
                    nonFinite++;
                    continue;
                }
                if (f < 0) {
                    negative++;
                }
                if (m != null && m[i] != 0) {
                    masked++;
                    continue;
                }
                // photo-electrons exactly as DeconvolutionProblem computes them
                float y = (float) Math.max(0, (f - s.offset()) / s.gain() + shift);
                trusted++;
                sumY += y;
                row[i] = y;
            }
            for (Block b : plan.blocks()) {
                Box c = b.core();
                if (!c.holdsPlane(z)) {
                    continue;
                }
                double t = 0;
                for (int y = c.y(); y < c.y() + c.h(); y++) {
                    for (int x = c.x(); x < c.x() + c.w(); x++) {
                        t += row[y * w + x];
                    }
                }
                signal[b.index()] += t;
            }
        }

        int brightest() {
            int best = 0;
            for (int i = 1; i < signal.length; i++) {
                double per = signal[i] / plan.blocks().get(i).core().voxels();
                if (per > signal[best] / plan.blocks().get(best).core().voxels()) {
                    best = i;
                }
            }
            return best;
        }

        void warnings(RunContext ctx) {
            if (trusted == 0) {
                throw new IllegalArgumentException("input: no trusted pixel (every pixel is masked, NaN or infinite);"
                        + " nothing is left to deconvolve");
            }
            if (nonFinite > 0) {
                ctx.warn(String.format(Locale.ROOT, "input: %d NaN or infinite pixels are treated as untrusted", nonFinite));
            }
            if (negative > 0) {
                ctx.warn(String.format(Locale.ROOT, "input: %d negative pixels (%.3g %%); camera data are counts of 0 or"
                        + " more: check the offset or a subtracted background", negative, 100.0 * negative / total));
            }
        }
    }

    /** Global number: the whole volume's mean signal, which sets the primal-dual step sizes. */
    private static final String MEAN_SIGNAL = "mean_signal";

    /** @return the sum over trusted pixels of max(y - b, 0) in photo-electrons, as {@link PrimalDualTv} sums it */
    private static double meanSignal(PlaneSource data, PlaneSource mask, DeconvolutionSettings s, float b) {
        double shift = s.camera().readNoiseShift();
        double sum = 0;
        for (int z = 0; z < data.depth(); z++) {
            float[] px = data.read(new Box(0, 0, z, data.width(), data.height(), 1)).data();
            float[] m = mask == null ? null
                    : mask.read(new Box(0, 0, mask.depth() == 1 ? 0 : z, data.width(), data.height(), 1)).data();
            for (int i = 0; i < px.length; i++) {
                if (Float.isFinite(px[i]) && (m == null || m[i] == 0)) {
                    float y = (float) Math.max(0, (px[i] - s.offset()) / s.gain() + shift);
                    sum += Math.max(y - b, 0);
                }
            }
        }
        return sum;
    }

    /** Prefix of the global numbers that hold the extrapolation step of each iteration. */
    private static final String STEP = "step.";

    private static boolean accelerated(DeconvolutionSettings s) {
        return s.method().equals("richardson-lucy") && s.accelerated();
    }

    /** @return the solver of every block: accelerated Richardson-Lucy takes the representative block's steps */
    private static Solver blockSolver(DeconvolutionSettings s, Globals g) {
        if (s.method().equals("total-variation") && g.numbers().containsKey(MEAN_SIGNAL)) {
            return new PrimalDualTv(s.stopping(), s.lambda(), s.likelihood().equals("poisson")
                    ? PrimalDualTv.DataTerm.POISSON : PrimalDualTv.DataTerm.GAUSSIAN, g.number(MEAN_SIGNAL));
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
        return new RichardsonLucy(s.stopping(), a);
    }

    /** Deconvolves one block's read box with fixed background and start (the global step's representative run). */
    private Solution solveBlock(Solver solver, DeconvolutionSettings s, double bg, double start, Volume psf,
            Map<String, Volume> in, RunContext ctx) {
        try (Workers workers = new Workers(ctx.threads())) {
            DeconvolutionProblem problem = problem(s, bg, start, psf, in, workers, ctx.fft());
            if (problem == null) {
                return null;
            }
            Solution sol = solver.solve(problem, ctx, IterationListener.NONE);
            kept = problem.toVolume(sol.estimate());
            return sol;
        }
    }

    /** @return the problem of one block, or null when the block has no trusted pixel */
    private static DeconvolutionProblem problem(DeconvolutionSettings s, double bg, double start, Volume psf,
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

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        DeconvolutionSettings s = DeconvolveOperation.settings(resolved);
        VoxelSize voxel = new VoxelSize(g.number("voxel_x"), g.number("voxel_y"), g.number("voxel_z"));
        Volume psf = psf(resolved, (int) g.number("width"), (int) g.number("height"), (int) g.number("depth"), voxel,
                null);
        double start = g.number("start");
        // the engine of the settings (auto, native, java), the same on every node and on one machine
        FftEngine fft = FftChoice.choose(resolved).engine();
        Workers workers = new Workers(ctx.threads());
        return new BlockProcessor() {
            @Override
            public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
                Volume data = in.get("input");
                Volume done = takeKept(g, block.index());
                if (done != null) {
                    return BlockOutput.of(Map.of("output", done));
                }
                DeconvolutionProblem problem = problem(s, s.background(), start, psf, in, workers, fft);
                if (problem == null) {
                    c.warn("a block without trusted pixels (all masked or NaN) is given 0");
                    return BlockOutput.of(Map.of("output", Volume.zeros(data.width(), data.height(), data.depth(),
                            data.voxel())));
                }
                Solution sol = blockSolver(s, g).solve(problem, c, IterationListener.NONE);
                return BlockOutput.of(Map.of("output", problem.toVolume(sol.estimate())));
            }

            @Override
            public void close() {
                workers.close();
            }
        };
    }

    /** @return the representative block's result when this block is it (once; it is then forgotten), or null */
    private synchronized Volume takeKept(Globals g, int index) {
        Integer i = keptFor.get(g);
        if (i == null || i != index || kept == null) {
            return null;
        }
        Volume v = kept;
        kept = null;
        keptFor.clear();
        return v;
    }

    @Override
    public int firstBlock(Globals g) {
        Integer i = keptFor.get(g);
        return i == null ? -1 : i;
    }

    @Override
    public Result finish(Values resolved, Globals g, BlockTotals totals, Map<String, PlaneSource> in,
            RunContext ctx) {
        DeconvolutionSettings s = DeconvolveOperation.settings(resolved);
        PlaneSource data = in.get("input");
        Volume psf = psf(resolved, data.width(), data.height(), data.depth(), data.voxel(), null);
        ImagePlus psfImp = resolved.images().get("psf");
        Result r = new Result();
        int iterations = s.method().equals("wiener") ? 0 : s.stopping().maxIterations();
        String reason = s.method().equals("wiener") ? "direct method" : "fixed: " + iterations + " iterations in every"
                + " block, " + g.record().get("iterations_from");
        r.record("operation", "deconvolve");
        r.record("method", s.method());
        r.record("iterations", iterations);
        r.record("stop_reason", reason);
        r.record("seconds", totals.seconds());
        r.record("settings", g.record().get(SETTINGS));
        Map<String, Object> psfInfo = new LinkedHashMap<>();
        psfInfo.put("source", psfImp == null ? "" : psfImp.getTitle());
        psfInfo.put("shape_used", psf.shape());
        r.record("psf", psfInfo);
        r.record("image_shape", data.width() + "x" + data.height() + "x" + data.depth());
        r.record("voxel_um", List.of(data.voxel().x(), data.voxel().y(), data.voxel().z()));
        r.record("result_units", "ADU above the camera offset (background removed)");
        r.line(String.format(Locale.ROOT, "deconvolved %dx%dx%d with %s in %d blocks: %d iteration(s) each, %.2f s; %s",
                data.width(), data.height(), data.depth(), s.method(), totals.blocks(), iterations, totals.seconds(),
                reason));
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("method", s.method());
        row.put("iterations", iterations);
        row.put("stop_reason", reason);
        row.put("seconds", totals.seconds());
        row.put("final_objective", Double.NaN);
        r.row(row);
        return r;
    }
}
