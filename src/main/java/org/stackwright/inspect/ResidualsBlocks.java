package org.stackwright.inspect;

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
import org.stackwright.fft.FftEngine;
import org.stackwright.model.NoiseModel;
import org.stackwright.op.FftChoice;
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
 * The block side of {@code residuals}. The forward model H x of a voxel needs the estimate within the PSF's
 * half-width, so that is the halo; at the stack's faces the estimate is mirrored as in memory ({@link ForwardBlur}),
 * so the normalised residual stack equals the whole-stack one up to float rounding of the FFT. Chi^2 per voxel and
 * per slice are added up over the blocks. The verdict, spectrum, cause fit and regions look at the whole view at
 * once; in blocks they are taken on a representative part, a central crop of up to {@value #CROP} x {@value #CROP}
 * x {@value #CROP_DEPTH} voxels (recorded as "verdict_from").
 */
final class ResidualsBlocks implements BlockOperation {

    static final int CROP = 192;
    static final int CROP_DEPTH = 64;

    @Override
    public List<String> streamedInputs() {
        return List.of("input", "estimate");
    }

    @Override
    public Map<String, Integer> streamedOutputs(Values v) {
        return Map.of("output", 32);
    }

    @Override
    public int[] halo(Values v, PlaneSource main) {
        ImagePlus psf = v.image("psf");
        return new int[] {psf.getWidth() / 2, psf.getHeight() / 2, main.depth() == 1 ? 0 : psf.getNSlices() / 2};
    }

    @Override
    public long blockBytes(Values v, PlaneSource main, int w, int h, int d) {
        ImagePlus psf = v.image("psf");
        long voxels = (long) w * h * d;
        long grid = (long) (w + psf.getWidth()) * (h + psf.getHeight()) * (d + psf.getNSlices());
        return 4 * (14 * voxels + 3 * grid);
    }

    private static Volume psf(Values v, VoxelSize voxel, int depth, RunContext ctx) {
        ImagePlus imp = v.image("psf");
        Volume psf = InputChecks.oneVolume("psf", imp);
        if (!ImagePlusAdapter.isCalibrated(imp) && !psf.voxel().sameAs(voxel)) {
            ctx.warn("the PSF carries no calibration; taking the input's voxel size " + voxel);
            psf = psf.withVoxel(voxel);
        }
        if (depth == 1 && psf.depth() > 1) {
            psf = ForwardBlur.centrePlane(psf);
        }
        Volume proxy = Volume.zeros(Math.min(4 * psf.width() + 3, 1 << 20), Math.min(4 * psf.height() + 3, 1 << 20),
                depth == 1 ? 1 : Math.max(depth, 1) > 4 * psf.depth() + 3 ? 4 * psf.depth() + 3 : depth, voxel);
        return PsfChecks.prepare("psf", psf, proxy, ctx).withVoxel(voxel);
    }

    private static ResidualModel model(Values v) {
        NoiseModel noise = ResidualModel.noiseModel(v.choice("likelihood"), v.number("gain"), v.number("read-noise"));
        return new ResidualModel(v.number("offset"), v.number("background"), noise);
    }

    @Override
    public Globals resolve(Values v, Map<String, PlaneSource> in, BlockPlan plan, RunContext ctx) {
        PlaneSource data = in.get("input");
        PlaneSource est = in.get("estimate");
        if (est == null) {
            throw new IllegalArgumentException("image 'estimate' is required for residuals: the estimate, same size as"
                    + " the input");
        }
        if (est.depth() != data.depth()) {
            throw new IllegalArgumentException("estimate is " + est.width() + "x" + est.height() + "x" + est.depth()
                    + " but input is " + data.width() + "x" + data.height() + "x" + data.depth() + "; give the estimate"
                    + " made from this input (same size)");
        }
        psf(v, data.voxel(), data.depth(), ctx);
        model(v);
        return new Globals(Map.of(), Map.of("voxel_x", data.voxel().x(), "voxel_y", data.voxel().y(), "voxel_z",
                data.voxel().z(), "depth", (double) data.depth()), Map.of());
    }

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        VoxelSize voxel = new VoxelSize(g.number("voxel_x"), g.number("voxel_y"), g.number("voxel_z"));
        int depth = (int) g.number("depth");
        Volume psf = psf(resolved, voxel, depth, RunContext.quiet(1));
        ResidualModel model = model(resolved);
        FftEngine fft = FftChoice.choose(resolved).engine();
        Workers workers = new Workers(ctx.threads());
        return new BlockProcessor() {
            @Override
            public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
                Volume data = in.get("input");
                Volume est = in.get("estimate").withVoxel(data.voxel());
                InputChecks.requireFinite("estimate", est);
                InputChecks.Scan scan = InputChecks.scan(data);
                if (scan.nonFinite() > 0) {
                    data = ResidualsOperation.predictionWhereUntrusted(data, est, psf, model, scan.nonFiniteMask(), workers,
                            fft);
                    c.warn("input: untrusted (NaN or infinite) pixels are given the prediction (residual 0)");
                }
                ResidualMaps maps = ResidualMaps.compute(data, est, psf, model, workers, fft);
                float[] r = maps.normalised().data();
                Box core = block.core();
                int[] off = block.coreOffset();
                double[] chi2 = new double[depth];
                for (int z = 0; z < core.d(); z++) {
                    double s = 0;
                    for (int y = 0; y < core.h(); y++) {
                        int row = ((z + off[2]) * data.height() + y + off[1]) * data.width() + off[0];
                        for (int x = 0; x < core.w(); x++) {
                            s += (double) r[row + x] * r[row + x];
                        }
                    }
                    chi2[core.z() + z] = s;
                }
                return new BlockOutput(Map.of("output", maps.normalised()), Map.of(), Map.of("chi2", chi2));
            }

            @Override
            public void close() {
                workers.close();
            }
        };
    }

    @Override
    public Result finish(Values resolved, Globals g, BlockTotals totals, Map<String, PlaneSource> in,
            RunContext ctx) {
        PlaneSource data = in.get("input");
        PlaneSource est = in.get("estimate");
        double[] chi2 = totals.sums().get("chi2");
        long plane = (long) data.width() * data.height();
        double total = 0;
        double[] perSlice = new double[chi2.length];
        for (int z = 0; z < chi2.length; z++) {
            total += chi2[z];
            perSlice[z] = chi2[z] / plane;
        }
        double perVoxel = total / (plane * data.depth());
        int cw = Math.min(CROP, data.width());
        int ch = Math.min(CROP, data.height());
        int cd = Math.min(CROP_DEPTH, data.depth());
        Box crop = new Box((data.width() - cw) / 2, (data.height() - ch) / 2, (data.depth() - cd) / 2, cw, ch, cd);
        Volume y = data.read(crop);
        Volume x = est.read(crop).withVoxel(y.voxel());
        Volume psf = psf(resolved, data.voxel(), data.depth(), RunContext.quiet(1));
        ResidualModel model = model(resolved);
        FftEngine fft = FftChoice.choose(resolved).engine();
        ResidualReport report;
        try (Workers w = new Workers(ctx.threads())) {
            InputChecks.Scan scan = InputChecks.scan(y);
            if (scan.nonFinite() > 0) {
                y = ResidualsOperation.predictionWhereUntrusted(y, x, psf, model, scan.nonFiniteMask(), w, fft);
            }
            report = ResidualReport.analyse(y, x, psf, model, w, fft);
        }
        Result r = new Result();
        ResidualRecord.fill(r, report, resolved.effective());
        r.record("chi2_per_voxel", perVoxel);
        r.record("chi2_per_slice", perSlice);
        r.record("verdict_from", "central crop " + crop + " (the whole stack was processed in blocks)");
        if (resolved.given("summary")) {
            r.image("summary", SummaryPicture.render(data.title() + " (central crop)", y, x, report));
        }
        r.line(String.format(Locale.ROOT, "chi^2 per pixel: %.4f (about 1 when the data fit the noise model)", perVoxel));
        r.line("verdict (from the central crop " + crop + "): " + report.verdict().code());
        r.line(report.verdict().text());
        return r;
    }
}
