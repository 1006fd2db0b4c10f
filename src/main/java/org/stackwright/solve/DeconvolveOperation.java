package org.stackwright.solve;

import java.util.LinkedHashMap;
import java.util.List;
import java.util.Locale;
import java.util.Map;

import ij.ImagePlus;

import org.stackwright.fft.FftEngines;
import org.stackwright.op.FftChoice;
import org.stackwright.blocks.BlockOperation;
import org.stackwright.blocks.BlockRun;
import org.stackwright.blocks.BlockSettings;
import org.stackwright.blocks.Blockwise;
import org.stackwright.op.Limits;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.Operation;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.psf.PsfSettings;
import org.stackwright.psf.SamplingCheck;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * {@code deconvolve}: restores a z-stack (or 2D image) with a PSF by Richardson-Lucy (optionally accelerated),
 * Richardson-Lucy with total variation, primal-dual total variation or a Wiener filter. The result is an
 * estimate in ADU above the camera offset, with the background removed; the run record says what was done.
 * Thin door over {@link Deconvolution}.
 */
public final class DeconvolveOperation implements Operation, Blockwise {

    private final DeconvolveBlocks blocks = new DeconvolveBlocks();

    @Override
    public BlockOperation blocks() {
        return blocks;
    }

    @Override
    public String name() {
        return "deconvolve";
    }

    @Override
    public String summary() {
        return "deconvolve a z-stack with a PSF (Richardson-Lucy, RL with total variation, primal-dual TV, Wiener)";
    }

    @Override
    public List<Param> params() {
        List<Param> p = new java.util.ArrayList<>(List.of(
                Param.image("input", true, "camera data to deconvolve (raw ADU; do not subtract the offset or background)"),
                Param.image("psf", false, "the PSF (odd sizes, centre at n/2; resampled when its voxel size differs); "
                        + "required unless depth-variant is on"),
                Param.outputImage("output", true, "the deconvolved estimate, 32-bit, ADU above the offset"),
                Param.choice("method", "richardson-lucy", DeconvolutionSettings.METHODS, "deconvolution method"),
                Limits.iterations("iterations", 50, "maximum number of iterations (wiener: ignored)"),
                Param.choice("stop", "noise", List.of("fixed", "change", "noise"),
                        "fixed = all iterations; change = relative change below tolerance; noise = data fit reaches "
                                + "its expected value (discrepancy principle)"),
                Param.number("tolerance", 1e-3, 1e-12, 1, "", "tolerance of the change rule (total-variation: relative primal-dual gap)"),
                Param.number("offset", 0.0, -1e9, 1e9, "ADU", "camera offset (bias), part of the forward model"),
                Param.text("background", "auto", "background above the offset in ADU, or auto to estimate it"),
                Param.number("gain", 1.0, 1e-9, 1e9, "ADU/e-", "camera gain"),
                Param.number("read-noise", 0.0, 0, 1e9, "ADU", "camera read noise (standard deviation)"),
                Param.number("regularization", null, 0, 1e9, "", "lambda: richardson-lucy-tv default 0.002, "
                        + "total-variation 0.01, wiener 0.001; ignored by richardson-lucy"),
                Param.image("mask", false, "pixels to exclude from the data fit: nonzero = dead, saturated, seam"),
                Param.choice("boundary", "extended", List.of("extended", "periodic"),
                        "extended = object larger than the image, no wrap-around; periodic = wraps around (smaller, faster)"),
                Param.choice("acceleration", "on", List.of("on", "off"), "vector extrapolation for richardson-lucy"),
                Param.choice("likelihood", "poisson", List.of("poisson", "gaussian"), "data term of total-variation; with "
                        + "replicas also their noise (gaussian: additive, read-noise as standard deviation)").withAlias("noise"),
                Param.number("na", null, 0.01, 1.7, "", "numerical aperture, for the sampling check (optional)"),
                Param.number("wavelength", null, 200, 2000, "nm", "emission wavelength, for the sampling check (optional)"),
                Param.number("immersion-index", null, 1.0, 2.0, "", "immersion index, for the sampling check (optional)"),
                // depth-variant deconvolution (Gibson-Lanni PSFs at several depths): na, wavelength and
                // immersion-index above give its optics
                Param.choice("depth-variant", "off", List.of("off", "on"), "on = model Gibson-Lanni PSFs at several "
                        + "depths from the optics and interpolate between them (richardson-lucy only; needs na, "
                        + "wavelength, immersion-index, sample-index)"),
                Param.integer("strata", 4, DepthStrata.MIN_STRATA, DepthStrata.MAX_STRATA, "depth-variant: number of "
                        + "PSFs across the stack (time and memory grow with it)"),
                Param.number("sample-index", null, 1.0, 2.0, "", "depth-variant: refractive index of the sample medium"),
                Param.number("first-depth", 0.0, 0, 10_000, "um", "depth-variant: depth below the coverslip of the "
                        + "first plane's focus"),
                FftChoice.param(),
                BlockSettings.blockSize(),
                BlockSettings.memory(),
                Param.outputFile("record", "run record (JSON): method, iterations, stop reason, time, history")));
        p.addAll(p.indexOf(p.stream().filter(q -> q.key().equals("likelihood")).findFirst().orElseThrow()) + 1,
                UncertaintyStep.params());
        p.addAll(p.size() - 1, RunResiduals.params());
        return List.copyOf(p);
    }

    @Override
    public Result run(Values v, RunContext door) {
        DeconvolutionSettings s = settings(v);
        FftEngines.Choice fft = FftChoice.choose(v);
        RunContext ctx = FftChoice.context(door, fft);
        if (BlockRun.wanted(blocks, v)) {
            return BlockRun.inMemory(this, blocks, v, ctx);
        }
        ImagePlus in = v.image("input");
        ImagePlus psfImp = v.image("psf");
        if (in.getNChannels() > 1 || in.getNFrames() > 1) {
            throw new IllegalArgumentException("input '" + in.getTitle() + "' has " + in.getNChannels() + " channels and "
                    + in.getNFrames() + " time points; give one channel and one time point (each channel needs its own "
                    + "PSF: split the hyperstack first)");
        }
        Volume data = ImagePlusAdapter.toVolume(in);
        boolean depthVariant = v.choice("depth-variant").equals("on");
        if (psfImp == null && !depthVariant) {
            throw new IllegalArgumentException("image 'psf' is required for deconvolve: give the PSF, or depth-variant on "
                    + "with the optics to model it");
        }
        Volume psf = null;
        if (psfImp != null && depthVariant) {
            ctx.warn("psf: '" + psfImp.getTitle() + "' is not used: depth-variant on models the PSFs from the optics");
        } else if (psfImp != null) {
            psf = ImagePlusAdapter.toVolume(psfImp);
        }
        String dataNote = ImagePlusAdapter.calibrationNote(in);
        if (!ImagePlusAdapter.isCalibrated(in)) {
            if (psf != null && ImagePlusAdapter.isCalibrated(psfImp)) {
                data = data.withVoxel(psf.voxel());
                ctx.warn("input: " + dataNote + "; taken to have the PSF's voxel size " + psf.voxel() + ", so the PSF"
                        + " is used as it is. If that is wrong, set the image's voxel size (a calibrated TIFF, or"
                        + " Image>Properties in ImageJ)");
            } else if (psf != null) {
                ctx.warn("input: " + dataNote + ", nor has the PSF: both are taken as 1 um voxels and the PSF is"
                        + " used as it is (same voxel size assumed); the z weight of total variation assumes cubic"
                        + " voxels");
            } else {
                ctx.warn("input: " + dataNote + "; taken as 1 um voxels, and the PSFs are modelled for that size. Set"
                        + " the image's voxel size (a calibrated TIFF, or Image>Properties in ImageJ)");
            }
        } else if (dataNote != null) {
            ctx.warn("input: " + dataNote);
        }
        if (psf != null && !ImagePlusAdapter.isCalibrated(psfImp)) {
            psf = psf.withVoxel(data.voxel());
            ctx.warn("psf: '" + psfImp.getTitle() + "' has no calibration; taken to have the image's voxel size " + data.voxel());
        } else if (psf != null && ImagePlusAdapter.calibrationNote(psfImp) != null) {
            ctx.warn("psf: " + ImagePlusAdapter.calibrationNote(psfImp));
        }
        samplingCheck(v, data, ctx);
        byte[] mask = null;
        ImagePlus m = v.image("mask");
        if (m != null) {
            mask = MaskChecks.check("mask", ImagePlusAdapter.toVolume(m), data, ctx);
        }
        boolean residuals = RunResiduals.wanted(v);
        if (residuals) {
            RunResiduals.check(s, depthVariant, UncertaintyStep.mode(v));
        }
        Result r = new Result();
        Deconvolution.Outcome out;
        if (depthVariant) {
            String mode = UncertaintyStep.mode(v);
            if (!mode.equals("none")) {
                throw new IllegalArgumentException("uncertainty = " + mode + " needs one PSF; give uncertainty none "
                        + "with depth-variant on");
            }
            UncertaintyStep.check(v, mode);
            out = Deconvolution.runDepthVariant(data, mask, s, depthVariant(v, data), ctx, IterationListener.NONE);
            out.record().forEach(r::record);
            r.record("uncertainty", mode);
        } else {
            out = UncertaintyStep.run(v, data, psf, psfImp.getTitle(), mask, s, in.getTitle(), residuals, ctx, r);
        }
        r.image("output", ImagePlusAdapter.toImagePlus(out.result(), in.getTitle() + "-deconvolve"));
        FftChoice.note(r, fft);
        double[] hist = out.solution().objective();
        r.line(String.format(Locale.ROOT, "deconvolved %s with %s: %d iteration(s), %.2f s; stopped by %s",
                data.shape(), s.method(), out.solution().iterations(), out.solution().seconds(), out.solution().stopReason()));
        Map<?, ?> used = (Map<?, ?>) out.record().get("settings");
        r.line(String.format(Locale.ROOT, "background: %.4g ADU above the offset (%s)", used.get("background_adu"),
                Boolean.TRUE.equals(used.get("background_estimated")) ? "estimated: background auto" : "given"));
        Map<String, Object> row = new LinkedHashMap<>();
        row.put("method", s.method());
        row.put("iterations", out.solution().iterations());
        row.put("stop_reason", out.solution().stopReason());
        row.put("seconds", out.solution().seconds());
        row.put("final_objective", hist.length > 0 ? hist[hist.length - 1] : Double.NaN);
        r.row(row);
        if (residuals) {
            RunResiduals.attach(r, v, data, psf, mask, s, out, in.getTitle(), ctx);
        }
        return r;
    }

    /** Reads and checks the optics of a depth-variant run: na, wavelength, immersion-index, sample-index. */
    static Deconvolution.DepthVariant depthVariant(Values v, Volume data) {
        for (String key : List.of("na", "wavelength", "immersion-index", "sample-index")) {
            if (!v.given(key)) {
                throw new IllegalArgumentException(key + " is required with depth-variant on: give na, wavelength, "
                        + "immersion-index and sample-index (the Gibson-Lanni optics of the PSFs)");
            }
        }
        double ni = v.number("immersion-index");
        PsfSettings optics = new PsfSettings(v.number("na"), v.number("wavelength"), 0, ni, v.number("sample-index"), ni,
                PsfSettings.STANDARD_COVERSLIP_UM, PsfSettings.STANDARD_COVERSLIP_UM, v.number("first-depth"), 1,
                data.voxel(), 1, 1, 1);
        optics.check("gibson-lanni");
        return new Deconvolution.DepthVariant(optics, v.integer("strata"));
    }

    /** Reads and checks the settings. */
    static DeconvolutionSettings settings(Values v) {
        String bgText = v.text("background");
        double bg;
        if (bgText == null || bgText.equals("auto")) {
            bg = Double.NaN;
        } else {
            try {
                bg = Double.parseDouble(bgText);
            } catch (NumberFormatException e) {
                throw new IllegalArgumentException("background = '" + bgText + "' is not allowed; give a number of ADU (0 or more) or auto");
            }
            if (!(bg >= 0) || Double.isInfinite(bg)) {
                throw new IllegalArgumentException("background = '" + bgText + "' is not allowed; give a number of ADU (0 or more) or auto");
            }
        }
        String method = v.choice("method");
        double lambda = v.given("regularization") ? v.number("regularization") : Double.NaN;
        if (!Double.isNaN(lambda) && lambda <= 0 && (method.equals("wiener") || method.equals("total-variation"))) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed for " + method + "; give a positive number");
        }
        Stopping stopping = new Stopping(StopRule.of(v.choice("stop")), v.integer("iterations"), v.number("tolerance"));
        return new DeconvolutionSettings(method, stopping, v.number("offset"), bg, v.number("gain"), v.number("read-noise"),
                lambda, v.choice("boundary"), v.choice("acceleration").equals("on"), v.choice("likelihood"));
    }

    /**
     * Compares the image's voxel size with the Nyquist limits of the optics when na, wavelength and
     * immersion-index are all given (no defaults: the optics are the user's to state). The widefield limits are
     * used, the loosest of the models, so a warning means undersampled for any of them.
     */
    static void samplingCheck(Values v, Volume data, RunContext ctx) {
        boolean na = v.given("na");
        boolean wl = v.given("wavelength");
        boolean n = v.given("immersion-index");
        if (na && wl && n) {
            PsfSettings optics = PsfSettings.matched(v.number("na"), v.number("wavelength"),
                    v.number("immersion-index"), data.voxel(), 1, 1, 1);
            optics.check("widefield");
            SamplingCheck.warnings(data.voxel(), optics, "widefield", data.depth() > 1).forEach(ctx::warn);
        } else if (na || wl || n) {
            ctx.warn("sampling not checked: give na, wavelength and immersion-index together to compare the voxel size"
                    + " with the Nyquist limit");
        }
    }
}
