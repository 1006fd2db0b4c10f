package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.blocks.Block;
import org.stackwright.blocks.BlockPlan;
import org.stackwright.blocks.Box;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.model.CameraEstimate;
import org.stackwright.model.CameraEstimate.Given;
import org.stackwright.model.DeconvolutionProblem;
import org.stackwright.op.InputChecks;
import org.stackwright.op.RunContext;
import org.stackwright.volume.Volume;

/**
 * The global step of {@code deconvolve} in blocks: every value that depends on the data, fixed once for the whole
 * stack before any block runs, so neighbouring blocks agree. Streamed plane by plane: the camera values (given, or
 * estimated on the block whose core holds the most signal in ADU), the background (the same estimate as in memory,
 * {@link BackgroundEstimate}), the start value of the iterations (the mean of the data above the background over all
 * trusted pixels, as a whole-stack run starts), lambda and the automatic stop's iteration count
 * ({@link AutomaticSettings}) on the block whose core holds the most signal above the background (the representative
 * block), the iteration count of the noise and change rules and the extrapolation steps of accelerated
 * Richardson-Lucy from a run of that block, and the mean signal that sets the primal-dual step sizes. The
 * representative block's run is kept and used as its own block's output.
 */
final class WholeStackValues {

    /** What the global step fixed, and the representative block's result when it ran as every block will. */
    record Fixed(Globals globals, Volume kept, int keptIndex) {
    }

    private WholeStackValues() {
    }

    /**
     * @param s the settings as given
     * @param in the streamed inputs (main input and mask), not modified
     * @param psf the PSF prepared at the input's voxel size
     */
    static Fixed find(DeconvolutionSettings s, Map<String, PlaneSource> in, BlockPlan plan, Volume psf,
            RunContext ctx) {
        PlaneSource data = in.get("input");
        PlaneSource mask = in.get("mask");
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
        Volume kept = null;
        if (s.method().equals("total-variation") && plan.blocks().size() > 1) {
            double mean = meanSignal(data, mask, s, (float) b) / scan.trusted;
            numbers.put(MEAN_SIGNAL, mean);
            rec.put("mean_signal_photoelectrons", mean);
        }
        boolean steps = BlockDeconvolver.accelerated(s) && plan.blocks().size() > 1;
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
            Solver solver = BlockDeconvolver.accelerated(s) ? s.solver()
                    : BlockDeconvolver.blockSolver(s, new Globals(Map.of(), numbers, Map.of()));
            BlockDeconvolver.Solved solved = BlockDeconvolver.solve(solver, s, bg, start, psf, part, ctx);
            Solution sol = solved == null ? null : solved.solution();
            kept = solved == null ? null : solved.result();
            if (sol != null && s.stopping().rule() != StopRule.FIXED) {
                iterations = sol.iterations();
                how = "found by the " + s.stopping().rule().word() + " rule on block " + (rep.index() + 1) + " (core "
                        + rep.core() + ", the most signal above the background): " + sol.stopReason();
            }
            double[] a = solver instanceof RichardsonLucy rl ? rl.steps()
                    : solver instanceof RichardsonLucyTv tv ? tv.steps() : null;
            if (steps && a != null) {
                for (int k = 0; k < a.length; k++) {
                    numbers.put(BlockDeconvolver.STEP + (k + 1), a[k]);
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
        return new Fixed(g, repIndex >= 0 ? kept : null, repIndex);
    }

    /** Global record entry: the run record's settings (as a whole-stack run records them). */
    static final String SETTINGS = "settings";

    /** One block's read box in memory: its pixels (non-finite ones masked) and mask, for the automatic values. */
    private record Part(Volume data, byte[] mask) {
        static Part of(PlaneSource data, PlaneSource mask, Block block) {
            Volume d = data.read(block.read());
            byte[] m = mask == null ? null : BlockDeconvolver.expand(mask.read(block.read()), d);
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
    static final String MEAN_SIGNAL = "mean_signal";

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
}
