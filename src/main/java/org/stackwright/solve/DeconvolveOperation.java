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
import org.stackwright.model.CalibrationFrames;
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

    /** The word for a value the run finds itself. */
    static final String AUTO = "auto";
    /**
     * Default maximum of iterations: the automatic stop ends well before it on the test conditions (bright data
     * needed up to about 300 in the trial); reaching it is reported as a failure of the rule.
     */
    static final int DEFAULT_MAX_ITERATIONS = 2000;

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
                Limits.iterations("iterations", DEFAULT_MAX_ITERATIONS, "maximum number of iterations: reaching it is"
                        + " reported as a failure of the stop rule (wiener: ignored)"),
                Param.choice("stop", StopRule.AUTO.word(), StopRule.words(),
                        "auto = where the fit to held-out pixels is best (trial on half the pixels, then the full "
                                + "run); fixed = all iterations; change = relative change below tolerance; noise = "
                                + "data fit reaches its expected value (discrepancy principle)"),
                Param.number("tolerance", 1e-3, 1e-12, 1, "", "tolerance of the change rule (total-variation: relative primal-dual gap)"),
                Param.number("offset", null, -1e9, 1e9, "ADU", "camera offset (bias), part of the forward model; not "
                        + "given: from the dark frames, or together with the read noise from the image"),
                Param.text("background", "auto", "background above the offset in ADU, or auto to estimate it"),
                // automatic camera values and regularisation (issue: settle on data it was not made with)
                Param.text("gain", AUTO, "camera gain in ADU per photo-electron, or auto: from the flat frames or the"
                        + " image (photon transfer)"),
                Param.text("read-noise", AUTO, "camera read noise in ADU (standard deviation), or auto: from the dark"
                        + " frames or the image"),
                Param.image("dark", false, "dark frames (no light, several planes): offset and read noise"),
                Param.image("flat", false, "flat frames (even light, runs of 2 or more frames per level): gain"),
                Param.text("regularization", AUTO, "lambda of richardson-lucy-tv and total-variation, or auto: chosen "
                        + "from the data; wiener: default 0.001; ignored by richardson-lucy"),
                Param.image("mask", false, "pixels to exclude from the data fit: nonzero = dead, saturated, seam"),
                Param.choice("boundary", "extended", List.of("extended", "periodic"),
                        "extended = object larger than the image, no wrap-around; periodic = wraps around (smaller, faster)"),
                Param.choice("acceleration", "on", List.of("on", "off"), "vector extrapolation for richardson-lucy and richardson-lucy-tv, adaptive steps for total-variation"),
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
        Volume dark = frames(v, "dark", data);
        Volume flat = frames(v, "flat", data);
        Result r = new Result();
        Deconvolution.Outcome out;
        if (depthVariant) {
            String mode = UncertaintyStep.mode(v);
            if (!mode.equals("none")) {
                throw new IllegalArgumentException("uncertainty = " + mode + " needs one PSF; give uncertainty none "
                        + "with depth-variant on");
            }
            UncertaintyStep.check(v, mode);
            out = Deconvolution.runDepthVariant(data, mask, s, depthVariant(v, data), dark, flat, ctx,
                    IterationListener.NONE);
            out.record().forEach(r::record);
            r.record("uncertainty", mode);
        } else {
            out = UncertaintyStep.run(v, data, psf, psfImp.getTitle(), mask, s, dark, flat, in.getTitle(), residuals,
                    ctx, r);
        }
        r.image("output", ImagePlusAdapter.toImagePlus(out.result(), in.getTitle() + "-deconvolve"));
        FftChoice.note(r, fft);
        double[] hist = out.solution().objective();
        r.line(valuesUsed(out));
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
        double lambda = numberOrAuto(v, "regularization", 0, "a number (0 or more)");
        if (!Double.isNaN(lambda) && lambda <= 0 && (method.equals("wiener") || method.equals("total-variation"))) {
            throw new IllegalArgumentException("regularization = " + lambda + " is not allowed for " + method + "; give a positive number or auto");
        }
        Stopping stopping = new Stopping(StopRule.of(v.choice("stop")), v.integer("iterations"), v.number("tolerance"));
        double offset = v.given("offset") ? v.number("offset") : Double.NaN;
        double gain = numberOrAuto(v, "gain", Double.MIN_VALUE, "a positive number of ADU per photo-electron");
        double readNoise = numberOrAuto(v, "read-noise", 0, "a number of ADU (0 or more)");
        return new DeconvolutionSettings(method, stopping, offset, bg, gain, readNoise,
                lambda, v.choice("boundary"), v.choice("acceleration").equals("on"), v.choice("likelihood"));
    }

    /** @return one line of the camera values and lambda the run used, each with how it was found */
    @SuppressWarnings("unchecked")
    static String valuesUsed(Deconvolution.Outcome out) {
        DeconvolutionSettings u = out.settings();
        Map<String, Object> set = (Map<String, Object>) out.record().get("settings");
        Map<String, Object> source = (Map<String, Object>) set.getOrDefault("camera_source", Map.of());
        Map<String, Object> error = (Map<String, Object>) set.getOrDefault("camera_standard_error", Map.of());
        StringBuilder b = new StringBuilder("values used: ");
        b.append(found("gain", u.gain(), "ADU/e-", source.get("gain"), error.get("gain"))).append(", ");
        b.append(found("read noise", u.readNoise(), "ADU", source.get("read_noise_adu"), error.get("read_noise_adu")));
        b.append(", ").append(found("offset", u.offset(), "ADU", source.get("offset_adu"), error.get("offset_adu")));
        if (u.regularized()) {
            b.append(String.format(Locale.ROOT, ", lambda %.3g (%s)", u.lambda(),
                    set.containsKey("regularization_choice") ? "chosen from the data" : "given"));
        }
        return b.toString();
    }

    private static String found(String what, double value, String unit, Object source, Object error) {
        String se = error instanceof Number n ? String.format(Locale.ROOT, " +- %.2g", n.doubleValue()) : "";
        return String.format(Locale.ROOT, "%s %.4g%s %s (%s)", what, value, se, unit, source == null ? "given" : source);
    }

    /**
     * @return the number given for key, or NaN for auto (or nothing given)
     * @throws IllegalArgumentException naming the key for text that is neither auto nor a number of at least min
     */
    static double numberOrAuto(Values v, String key, double min, String what) {
        String t = v.text(key);
        if (t == null || t.trim().equalsIgnoreCase(AUTO)) {
            return Double.NaN;
        }
        double d;
        try {
            d = Double.parseDouble(t.trim());
        } catch (NumberFormatException e) {
            throw new IllegalArgumentException(key + " = '" + t + "' is not allowed; give " + what + " or auto");
        }
        if (!(d >= min) || Double.isInfinite(d)) {
            throw new IllegalArgumentException(key + " = '" + t + "' is not allowed; give " + what + " or auto");
        }
        return d;
    }

    /** Reads calibration frames (the first channel), with the image's plane size. */
    private static Volume frames(Values v, String key, Volume data) {
        ImagePlus imp = v.image(key);
        return imp == null ? null : CalibrationFrames.requireSamePlanes(key, ImagePlusAdapter.toVolume(imp), data);
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
