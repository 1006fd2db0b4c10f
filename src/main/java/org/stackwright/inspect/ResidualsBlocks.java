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
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;
import org.stackwright.volume.VoxelSize;

/**
 * The block side of {@code residuals}. The forward model H x of a voxel needs the estimate within the PSF's
 * half-width, so that is the halo; at the stack's faces the estimate is continued as in memory (mirror, or zeros for
 * {@code --boundary zero}; {@link ForwardBlur}), so the normalised residual stack equals the whole-stack one up to
 * float rounding of the FFT. The trusted region ({@link TrustedRegion}: with the default {@code exclude} the voxels
 * further than the PSF's reach from the stack's faces, less NaN pixels) is the whole stack's: chi^2 over it, over
 * the whole image, over the border band and per slice are added up over the blocks. The verdict, spectrum, cause
 * fit and regions look at the whole view at once; in blocks they are taken on a representative part, a central crop
 * of up to {@value #CROP} x {@value #CROP} x {@value #CROP_DEPTH} voxels (recorded as "verdict_from"), predicted
 * from the estimate around it, whose band is left out only where it touches the stack's faces.
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
        // the offset against the data, as in memory, judged on the verdict's central crop
        InputChecks.checkOffset("input", data.read(centralCrop(data)), v.number("offset"), v.number("read-noise"), ctx);
        return new Globals(Map.of(), Map.of("voxel_x", data.voxel().x(), "voxel_y", data.voxel().y(), "voxel_z",
                data.voxel().z(), "depth", (double) data.depth(), "width", (double) data.width(), "height",
                (double) data.height()), Map.of());
    }

    /** @return the whole stack's trusted region (no untrusted voxels: those are found block by block) */
    private static TrustedRegion region(Values v, Volume psf, int w, int h, int d) {
        int[] band = TrustedRegion.bandOf(psf);
        String boundary = v.choice("boundary");
        return new TrustedRegion(w, h, d, band, boundary.equals("exclude"), boundary, null);
    }

    private static Padding.Mode continuation(Values v) {
        return v.choice("boundary").equals("zero") ? Padding.Mode.ZERO : Padding.Mode.MIRROR;
    }

    /** @return true per voxel where the data are NaN or infinite; null for none */
    private static boolean[] untrusted(Volume data) {
        InputChecks.Scan scan = InputChecks.scan(data);
        if (scan.nonFinite() == 0) {
            return null;
        }
        byte[] m = scan.nonFiniteMask();
        boolean[] u = new boolean[m.length];
        for (int i = 0; i < u.length; i++) {
            u[i] = m[i] != 0;
        }
        return u;
    }

    @Override
    public BlockProcessor processor(Values resolved, Globals g, RunContext ctx) {
        VoxelSize voxel = new VoxelSize(g.number("voxel_x"), g.number("voxel_y"), g.number("voxel_z"));
        int depth = (int) g.number("depth");
        Volume psf = ResidualMaps.normalise(psf(resolved, voxel, depth, RunContext.quiet(1)));
        TrustedRegion region = region(resolved, psf, (int) g.number("width"), (int) g.number("height"), depth);
        int[] box = region.analysisBox();
        Padding.Mode continuation = continuation(resolved);
        ResidualModel model = model(resolved);
        FftEngine fft = FftChoice.choose(resolved).engine();
        Workers workers = new Workers(ctx.threads());
        return new BlockProcessor() {
            @Override
            public BlockOutput process(Block block, Map<String, Volume> in, RunContext c) {
                Volume data = in.get("input");
                Volume est = in.get("estimate").withVoxel(data.voxel());
                InputChecks.requireFinite("estimate", est);
                boolean[] untrusted = untrusted(data);
                if (untrusted != null) {
                    c.warn("input: the NaN or infinite pixels carry no data; they are left out of chi^2, the histogram"
                            + " and the verdict, and get residual 0");
                }
                ResidualMaps maps = ResidualMaps.of(data, ForwardBlur.blur(est, psf, continuation, workers, fft), model,
                        untrusted, workers);
                float[] r = maps.normalised().data();
                Box core = block.core();
                int[] off = block.coreOffset();
                // per slice: sum of r^2 and count over the box's lateral extent, over all voxels, over the band
                double[][] sums = new double[6][depth];
                for (int z = 0; z < core.d(); z++) {
                    int gz = core.z() + z;
                    for (int y = 0; y < core.h(); y++) {
                        int gy = core.y() + y;
                        int row = ((z + off[2]) * data.height() + y + off[1]) * data.width() + off[0];
                        for (int x = 0; x < core.w(); x++) {
                            if (!maps.isTrusted(row + x)) {
                                continue;
                            }
                            int gx = core.x() + x;
                            double q = (double) r[row + x] * r[row + x];
                            sums[2][gz] += q;
                            sums[3][gz]++;
                            if (gx >= box[0] && gx < box[0] + box[3] && gy >= box[1] && gy < box[1] + box[4]) {
                                sums[0][gz] += q;
                                sums[1][gz]++;
                            }
                            if (region.inBand(gx, gy, gz)) {
                                sums[4][gz] += q;
                                sums[5][gz]++;
                            }
                        }
                    }
                }
                Map<String, double[]> totals = new LinkedHashMap<>();
                for (int k = 0; k < SUMS.length; k++) {
                    totals.put(SUMS[k], sums[k]);
                }
                return new BlockOutput(Map.of("output", maps.normalised()), Map.of(), totals);
            }

            @Override
            public void close() {
                workers.close();
            }
        };
    }

    /** The per-slice sums each block adds to. */
    private static final String[] SUMS = {"chi2_box", "n_box", "chi2_all", "n_all", "chi2_band", "n_band"};

    @Override
    public Result finish(Values resolved, Globals g, BlockTotals totals, Map<String, PlaneSource> in,
            RunContext ctx) {
        PlaneSource data = in.get("input");
        PlaneSource est = in.get("estimate");
        Volume psf = ResidualMaps.normalise(psf(resolved, data.voxel(), data.depth(), RunContext.quiet(1)));
        TrustedRegion region = region(resolved, psf, data.width(), data.height(), data.depth());
        int[] box = region.analysisBox();
        double[][] s = new double[SUMS.length][];
        for (int k = 0; k < SUMS.length; k++) {
            s[k] = totals.sums().get(SUMS[k]);
        }
        double[] perSlice = new double[data.depth()];
        double boxSum = 0;
        double boxN = 0;
        for (int z = 0; z < data.depth(); z++) {
            perSlice[z] = s[1][z] > 0 ? s[0][z] / s[1][z] : Double.NaN;
            if (z >= box[2] && z < box[2] + box[5]) {
                boxSum += s[0][z];
                boxN += s[1][z];
            }
        }
        double trusted = boxN > 0 ? boxSum / boxN : Double.NaN;
        double whole = ratio(s[2], s[3]);
        double band = ratio(s[4], s[5]);
        // the verdict's part: a central crop, predicted from the estimate around it (a halo of the PSF's reach)
        Box crop = centralCrop(data);
        int cw = crop.w();
        int ch = crop.h();
        int cd = crop.d();
        int[] reach = {psf.width() / 2, psf.height() / 2, psf.depth() / 2};
        int x0 = Math.max(0, crop.x() - reach[0]);
        int y0 = Math.max(0, crop.y() - reach[1]);
        int z0 = Math.max(0, crop.z() - reach[2]);
        Box around = new Box(x0, y0, z0, Math.min(data.width(), crop.x() + cw + reach[0]) - x0,
                Math.min(data.height(), crop.y() + ch + reach[1]) - y0,
                Math.min(data.depth(), crop.z() + cd + reach[2]) - z0);
        Volume y = data.read(crop);
        Volume x = est.read(crop).withVoxel(y.voxel());
        ResidualModel model = model(resolved);
        FftEngine fft = FftChoice.choose(resolved).engine();
        // the band is left out (or reported) only on the sides where the crop reaches a face of the stack
        int[] cropBand = new int[3];
        int[] margin = {Math.min(crop.x(), data.width() - crop.x() - cw), Math.min(crop.y(), data.height() - crop.y()
                - ch), Math.min(crop.z(), data.depth() - crop.z() - cd)};
        for (int a = 0; a < 3; a++) {
            cropBand[a] = Math.max(0, region.band()[a] - margin[a]);
        }
        TrustedRegion cropRegion = new TrustedRegion(cw, ch, cd, cropBand, region.bandExcluded(), region.boundary(),
                untrusted(y));
        ResidualReport report;
        try (Workers w = new Workers(ctx.threads())) {
            Volume blurredAround = ForwardBlur.blur(est.read(around).withVoxel(y.voxel()), psf, continuation(resolved),
                    w, fft);
            Volume blurred = Padding.crop(blurredAround, crop.x() - x0, crop.y() - y0, crop.z() - z0, cw, ch, cd);
            report = ResidualReport.analyse(y, blurred, model, cropRegion, psf, w, fft);
        }
        if (report.verdict().code().equals(Verdict.NOT_COMPUTED)) {
            throw new org.stackwright.op.RunFailedException("residuals: " + report.verdict().text() + " No output is"
                    + " written; check that the estimate, offset and background are in the data's units (ADU)");
        }
        Result r = new Result();
        ResidualRecord.fill(r, report, resolved.effective());
        r.record("chi2_per_pixel", trusted);
        r.record("chi2_per_pixel_whole_image", whole);
        r.record("chi2_per_pixel_border_band", band);
        r.record("chi2_per_slice", perSlice);
        r.record("trusted_region", region.describe());
        r.record("trusted_box_xyzwhd", region.box());
        r.record("trusted_voxels", (long) boxN);
        r.record("verdict_from", "central crop " + crop + " (the whole stack was processed in blocks)");
        if (resolved.wants("summary")) {
            r.image("summary", SummaryPicture.render(data.title() + " (central crop)", y, x, report));
        }
        r.line(String.format(Locale.ROOT, "chi^2 per voxel: %.4f over %s (about 1 when the data fit the noise"
                + " model)", trusted, region.describe()));
        r.line("verdict (from the central crop " + crop + "): " + report.verdict().code());
        r.line(report.verdict().text());
        return r;
    }

    /** @return the central part of up to CROP x CROP x CROP_DEPTH voxels the verdict is taken on */
    private static Box centralCrop(PlaneSource data) {
        int cw = Math.min(CROP, data.width());
        int ch = Math.min(CROP, data.height());
        int cd = Math.min(CROP_DEPTH, data.depth());
        return new Box((data.width() - cw) / 2, (data.height() - ch) / 2, (data.depth() - cd) / 2, cw, ch, cd);
    }

    private static double ratio(double[] sum, double[] n) {
        double a = 0;
        double b = 0;
        for (int z = 0; z < sum.length; z++) {
            a += sum[z];
            b += n[z];
        }
        return b > 0 ? a / b : Double.NaN;
    }
}
