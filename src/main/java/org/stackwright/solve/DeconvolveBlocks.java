package org.stackwright.solve;

import java.util.List;
import java.util.Map;

import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockPlan;
import org.stackwright.blocks.BlockProcessor;
import org.stackwright.blocks.BlockTotals;
import org.stackwright.blocks.Globals;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.fft.Convolution;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.volume.Volume;

/**
 * The block side of {@code deconvolve}: what the block mechanism asks of it (inputs and outputs cut into blocks, the
 * halo, the memory and FFT work of a block, which settings run in blocks) and the order of a run. Its parts:
 * {@link WholeStackValues} (the global step: every data-dependent value fixed once for the whole stack),
 * {@link BlockDeconvolver} (one block as a problem of its own on its read box, with the extended-object boundary,
 * so the halo's outer faces carry no wrap-around; only the core is kept), {@link KeptBlock} (the representative
 * block's result of the global step, used as its own block's output), {@link BlockPsf} (the PSF prepared once) and
 * {@link BlockRunRecord} (the record). Uncertainty (noise replicas, posterior sampling), depth-variant runs, the
 * run's own residuals and dark or flat frames need the whole volume in memory: they take the usual path, and are
 * refused when blocks are asked for ({@link #applies}).
 */
final class DeconvolveBlocks implements BlockOperation {

    /** Halo as a multiple of the PSF's size per axis. */
    private final double haloFactor;
    private final KeptBlock kept = new KeptBlock();
    private final BlockPsf psfs = new BlockPsf();

    /** The halo measured to keep blocks within 1e-3 of the maximum of a whole-volume run (DeconvolveBlocksTest). */
    DeconvolveBlocks() {
        this(Double.NaN);
    }

    /**
     * @param haloFactor halo = this times the PSF's size per axis (rounded up), or NaN for the default: 1.5 for
     *     accelerated Richardson-Lucy and Richardson-Lucy-TV (extrapolation carries the errors of a block's outer
     *     faces further inward), 1 otherwise
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

    @Override
    public int[] halo(Values v, PlaneSource main) {
        int[] p = BlockPsf.size(v, main);
        double f = Double.isNaN(haloFactor) ? (BlockDeconvolver.accelerated(DeconvolveOperation.settings(v)) ? 1.5 : 1.0) : haloFactor;
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
        int[] p = BlockPsf.size(v, main);
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
        Volume psf = psfs.prepare(v, data.width(), data.height(), data.depth(), data.voxel(), ctx);
        DeconvolveOperation.samplingCheck(v, Volume.zeros(1, 1, Math.min(2, data.depth()), data.voxel()), ctx);
        kept.keep(null, -1, null);
        WholeStackValues.Fixed fixed = WholeStackValues.find(s, in, plan, psf, ctx);
        kept.keep(fixed.globals(), fixed.keptIndex(), fixed.kept());
        return fixed.globals();
    }

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        return new BlockDeconvolver(resolved, g, psfs, kept, ctx);
    }

    @Override
    public int firstBlock(Globals g) {
        return kept.index(g);
    }

    @Override
    public Result finish(Values resolved, Globals g, BlockTotals totals, Map<String, PlaneSource> in,
            RunContext ctx) {
        PlaneSource data = in.get("input");
        Volume psf = psfs.prepare(resolved, data.width(), data.height(), data.depth(), data.voxel(), null);
        return BlockRunRecord.of(resolved, g, totals, data, psf);
    }
}
