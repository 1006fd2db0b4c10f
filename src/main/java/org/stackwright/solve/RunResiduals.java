package org.stackwright.solve;

import java.util.List;
import java.util.Locale;
import java.util.Map;

import org.stackwright.inspect.ResidualModel;
import org.stackwright.inspect.ResidualRecord;
import org.stackwright.inspect.ResidualReport;
import org.stackwright.inspect.SummaryPicture;
import org.stackwright.inspect.TrustedRegion;
import org.stackwright.model.GaussianNoise;
import org.stackwright.model.NoiseModel;
import org.stackwright.model.PoissonGaussianNoise;
import org.stackwright.op.InputChecks;
import org.stackwright.op.MaskChecks;
import org.stackwright.op.MemoryCheck;
import org.stackwright.op.Param;
import org.stackwright.op.Result;
import org.stackwright.op.RunContext;
import org.stackwright.op.Values;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.PsfChecks;
import org.stackwright.volume.ImagePlusAdapter;
import org.stackwright.volume.Volume;

/**
 * The deconvolution's own residuals ({@code deconvolve --residuals}): the data against what the run's own
 * estimate predicts, gain (H x) + background, with H x taken from the extended-grid estimate the solver made
 * ({@link org.stackwright.model.DeconvolutionProblem#predictedAboveOffset}), the background and the camera values
 * the run used (read from its run record, so values a run estimated itself are the ones judged). So there is no
 * guess at the border: the whole image is judged, the border band only reported apart. The analysis is the
 * residual view's ({@link ResidualReport}); works for every method.
 *
 * <p>Noise model: the camera (Poisson-Gaussian with the run's gain and read noise) for {@code likelihood
 * poisson}; a constant Gaussian with the read noise as standard deviation for {@code likelihood gaussian}, as the
 * noise replicas use.
 */
public final class RunResiduals {

    /** Key of the residual stack output. */
    public static final String RESIDUALS = "residuals";
    /** Key of the summary picture output. */
    public static final String SUMMARY = "residuals-summary";

    private RunResiduals() {
    }

    /** @return the two output parameters, in dialog order (the stack first: its key is contained in the other) */
    static List<Param> params() {
        return List.of(
                Param.outputImage(RESIDUALS, false, "the normalised residual stack of the run's own prediction"
                        + " (32-bit; the whole image: the extended-grid estimate needs no guess at the border)"),
                Param.outputPicture(SUMMARY, "a one-page summary picture of those residuals (PNG)"));
    }

    /** @return true when either output is asked for */
    static boolean wanted(Values v) {
        return v.wants(RESIDUALS) || v.wants(SUMMARY);
    }

    /**
     * Checks before the run that the residuals can be made: one PSF (not depth-variant) and a fitted estimate (not
     * the posterior mean of sampling).
     */
    static void check(DeconvolutionSettings s, boolean depthVariant, String uncertainty) {
        if (depthVariant) {
            throw new IllegalArgumentException(RESIDUALS + " is not made with depth-variant on (its prediction needs"
                    + " one PSF); leave out residuals and residuals-summary, or give depth-variant off");
        }
        if (uncertainty.equals("sampling")) {
            throw new IllegalArgumentException(RESIDUALS + " is not made with uncertainty = sampling (the posterior mean"
                    + " is not the fitted estimate); give uncertainty none or replicas, or check the posterior mean"
                    + " with the residuals operation");
        }
        check(s);
    }

    /** Checks before the run that the residuals can be normalised. */
    static void check(DeconvolutionSettings s) {
        // NaN = auto: the read noise is found from the data before the run (checked again in analyse)
        if (s.likelihood().equals("gaussian") && !Double.isNaN(s.readNoise()) && !(s.readNoise() > 0)) {
            throw new IllegalArgumentException("read-noise = " + s.readNoise() + " is not allowed with likelihood"
                    + " gaussian and residuals: the residuals are normalised by the read noise as the noise standard"
                    + " deviation; give a positive read-noise");
        }
    }

    /**
     * Deconvolves and keeps the fitted forward model, for {@link #analyse}. Same as {@link Deconvolution#run}
     * otherwise.
     */
    public static Deconvolution.Outcome deconvolve(Volume data, Volume psf, String psfName, byte[] mask,
            DeconvolutionSettings s, RunContext ctx, IterationListener listener) {
        check(s);
        return Deconvolution.run(data, psf, psfName, mask, s, null, null, ctx, listener, true);
    }

    /**
     * @param data the data the run saw, not modified
     * @param psf the PSF as given to the run, not modified
     * @param mask the mask given to the run, or null
     * @param s the settings of the run
     * @param run its outcome, with the forward model
     * @param ctx threads (warnings of the PSF preparation are not repeated)
     */
    public static ResidualReport analyse(Volume data, Volume psf, byte[] mask, DeconvolutionSettings s,
            Deconvolution.Outcome run, RunContext ctx) {
        if (run.model() == null) {
            throw new IllegalStateException("the run has no forward model; deconvolve with RunResiduals.deconvolve");
        }
        MemoryCheck.require("residuals of " + data.shape(), MemoryCheck.floats(data.size(),
                ResidualReport.IMAGE_ARRAYS));
        Map<?, ?> used = (Map<?, ?>) run.record().get("settings");
        double offset = number(used, "offset_adu", s.offset());
        double gain = number(used, "gain", s.gain());
        double readNoise = number(used, "read_noise_adu", s.readNoise());
        double background = number(used, "background_adu", s.background());
        if (s.likelihood().equals("gaussian") && !(readNoise > 0)) {
            throw new IllegalArgumentException("read-noise: the run found no read noise (" + readNoise + " ADU), and"
                    + " with likelihood gaussian the residuals are normalised by it; give a positive read-noise");
        }
        NoiseModel noise = s.likelihood().equals("gaussian") ? new GaussianNoise(readNoise)
                : new PoissonGaussianNoise(gain, readNoise);
        ResidualModel model = new ResidualModel(offset, background, noise);
        Volume blurred = run.model().copy();
        float[] b = blurred.data();
        for (int i = 0; i < b.length; i++) {
            b[i] = (float) (b[i] - background);
        }
        boolean[] untrusted = untrusted(data, mask);
        RunContext quiet = new RunContext(ctx.threads(), null, null, ctx::isCancelled);
        Volume p = PsfChecks.prepare("psf", psf, data, quiet);
        TrustedRegion region = TrustedRegion.wholeImage(data, TrustedRegion.bandOf(p), "extended-grid", untrusted);
        try (Workers w = new Workers(ctx.threads())) {
            return ResidualReport.analyse(data, blurred, model, region, p, w, ctx.fft());
        }
    }

    /**
     * The door's part: analyses, and adds the residual stack, the summary picture, the record entry
     * {@code residuals} and a line to the result.
     */
    static void attach(Result r, Values v, Volume data, Volume psf, byte[] mask, DeconvolutionSettings s,
            Deconvolution.Outcome run, String title, RunContext ctx) {
        ctx.progress(1, "residuals of the run's own prediction");
        // the values the run used (camera values and background found from the data when they were auto)
        ResidualReport report = analyse(data, psf, mask, run.settings() != null ? run.settings() : s, run, ctx);
        if (v.wants(RESIDUALS)) {
            r.image(RESIDUALS, ImagePlusAdapter.toImagePlus(report.maps().normalised(), title + "-" + RESIDUALS));
        }
        if (v.wants(SUMMARY)) {
            r.image(SUMMARY, SummaryPicture.render(title, data, run.result(), report));
        }
        r.record(RESIDUALS, ResidualRecord.brief(report));
        r.line(String.format(Locale.ROOT, "residuals of the run's own prediction: chi^2 per pixel %.4f over the"
                + " whole image (border band %.4f); verdict: %s", report.chi2Trusted(), report.chi2Band(),
                report.verdict().code()));
        r.line(report.verdict().text());
    }

    /** @return per voxel: masked by the user or not a finite number */
    private static boolean[] untrusted(Volume data, byte[] mask) {
        InputChecks.Scan scan = InputChecks.scan(data);
        byte[] all = MaskChecks.union(mask, scan.nonFiniteMask());
        if (all == null) {
            return null;
        }
        boolean[] u = new boolean[all.length];
        boolean any = false;
        for (int i = 0; i < u.length; i++) {
            u[i] = all[i] != 0;
            any |= u[i];
        }
        return any ? u : null;
    }

    private static double number(Map<?, ?> settings, String key, double fallback) {
        Object o = settings == null ? null : settings.get(key);
        return o instanceof Number n && Double.isFinite(n.doubleValue()) ? n.doubleValue() : fallback;
    }
}
