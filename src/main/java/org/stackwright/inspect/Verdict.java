package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;

/**
 * A verdict in words from the residual analysis: "fits the noise model", or the likely kinds of mismatch, ranked
 * by the chi^2 per voxel each explains.
 *
 * <p>Thresholds (n = number of voxels):
 * <ul>
 * <li>chi^2 per voxel: fits within [{@value #CHI2_LOW}, {@value #CHI2_HIGH}], widened to 1 +- 5 sqrt(2/n) for small
 *     images. For a correct model chi^2 per voxel has mean 1 and standard deviation about sqrt(2/n) (chi-square
 *     distribution with n degrees of freedom); the 10 % band is common practice for a "reduced chi-square near 1"
 *     and allows for the approximations of real camera models.</li>
 * <li>Low-frequency structure: spectrum ratio (see {@link ResidualSpectrum}) above 1 + max({@value #LOW_RATIO_MARGIN},
 *     6 / sqrt(m)), m = frequencies in the low band (each white-noise power is exponential with mean 1, so the band
 *     mean has relative standard deviation 1/sqrt(m)).</li>
 * <li>A model cause (background, PSF width, fading over z; see {@link MismatchFit}) counts when it explains at least
 *     max({@value #MIN_EXPLAINED}, 30 / n) of chi^2 per voxel (under a correct model, k fitted terms explain about
 *     k / n).</li>
 * <li>Regions: any listed region (see {@link ResidualRegions}).</li>
 * <li>Per-slice trend (stacks of at least 3 slices): the fading term of {@link MismatchFit} as above; failing
 *     that, a straight-line trend over z of the per-slice chi^2 of the residual left after the model causes with
 *     |t| >= {@value #TREND_T} and a change of at least {@value #TREND_CHI2_CHANGE} (drift), or of its per-slice
 *     mean with |t| >= {@value #TREND_T} and a change of at least {@value #TREND_MEAN_CHANGE} noise standard
 *     deviations.</li>
 * <li>Generic low-frequency structure is named only when no model cause explains it.</li>
 * <li>Causes are ranked by the chi^2 per voxel they explain; a secondary cause is named when it explains at least
 *     {@value #SECONDARY_SHARE} of the first one's.</li>
 * </ul>
 * These numbers are our own choices (common practice in spirit, not from a publication); the tests check that a
 * correct model passes and that each planted mismatch is named.
 *
 * @param code "fits" or the code of the leading cause
 * @param causes the causes found, leading first (empty when the data fit)
 * @param text one or more sentences for a person
 */
public record Verdict(String code, List<Cause> causes, String text) {

    public static final double CHI2_LOW = 0.9;
    public static final double CHI2_HIGH = 1.1;
    public static final double LOW_RATIO_MARGIN = 0.25;
    public static final double MIN_EXPLAINED = 0.02;
    public static final double TREND_T = 5;
    public static final double TREND_MEAN_CHANGE = 0.2;
    public static final double TREND_CHI2_CHANGE = 0.2;
    public static final double SECONDARY_SHARE = 0.25;

    /** The verdict code when the data fit. */
    public static final String FITS = "fits";

    /**
     * One likely cause.
     *
     * @param code short code for records, e.g. "psf-too-narrow"
     * @param share chi^2 per voxel it explains
     * @param sentence what it means, for a person
     */
    public record Cause(String code, double share, String sentence) {
    }

    /** @return true when the data fit the noise model */
    public boolean fits() {
        return FITS.equals(code);
    }

    /** Decides. */
    public static Verdict decide(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions, MismatchFit fit,
            SliceTrend meanTrend, SliceTrend chi2Trend) {
        return decide(maps, spectrum, regions, fit, meanTrend, chi2Trend, Double.NaN, null);
    }

    /**
     * Decides on the interior of a stack and, when the interior fits, adds a sentence about the border band if
     * that fits worse.
     *
     * @param maps the interior maps
     * @param chi2Band chi^2 per voxel in the border band, NaN when there is none
     * @param box the interior box (x0, y0, z0, w, h, d) in the whole stack, for positions; null for none
     */
    public static Verdict decide(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions, MismatchFit fit,
            SliceTrend meanTrend, SliceTrend chi2Trend, double chi2Band, int[] box) {
        Verdict v = decideInterior(maps, spectrum, regions, fit, meanTrend, chi2Trend, box);
        // only when the interior fits: otherwise the band may just show the interior's mismatch more strongly
        if (v.fits() && Double.isFinite(chi2Band) && chi2Band > Math.max(CHI2_HIGH, maps.chi2PerVoxel() + 0.1)
                && box != null) {
            String note = String.format(Locale.ROOT, " The border band (%d, %d, %d voxels from the faces in x, y, z)"
                    + " fits worse (chi^2 per voxel %.3f): light from objects outside the field of view, which an"
                    + " estimate on the data grid cannot hold; it is left out of the verdict.", box[0], box[1], box[2],
                    chi2Band);
            return new Verdict(v.code(), v.causes(), v.text() + note);
        }
        return v;
    }

    private static Verdict decideInterior(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions,
            MismatchFit fit, SliceTrend meanTrend, SliceTrend chi2Trend, int[] box) {
        int ox = box == null ? 0 : box[0];
        int oy = box == null ? 0 : box[1];
        int oz = box == null ? 0 : box[2];
        String where = box == null || (box[0] == 0 && box[1] == 0 && box[2] == 0) ? "" : " in the interior";
        long n = maps.normalised().size();
        double chi2 = maps.chi2PerVoxel();
        double width = 5 * Math.sqrt(2.0 / n);
        double high = Math.max(CHI2_HIGH, 1 + width);
        double low = Math.min(CHI2_LOW, 1 - width);
        double minExplained = Math.max(MIN_EXPLAINED, 30.0 / n);
        double ratioLimit = 1 + Math.max(LOW_RATIO_MARGIN, 6 / Math.sqrt(Math.max(1, spectrum.lowModes())));
        boolean lowFrequency = spectrum.lowFrequencyRatio() > ratioLimit;
        List<Cause> causes = new ArrayList<>();

        if (regions.listedCount() > 0) {
            ResidualRegions.Region big = regions.listed().get(0);
            causes.add(new Cause("isolated-regions", regions.chi2Share(maps.normalised()), String.format(Locale.ROOT,
                    "%d isolated region%s with |r| > 4%s (largest %d voxels at x %.0f, y %.0f, z %.0f, data %s the"
                    + " prediction): saturation, hot or dead pixels or other defects; mask them before measuring.",
                    regions.listedCount(), regions.listedCount() == 1 ? "" : "s", where, big.voxels(), big.x() + ox,
                    big.y() + oy, big.z() + oz, big.peak() < 0 ? "below" : "above")));
        }
        boolean bg = fit.explainedByBackground() >= minExplained;
        boolean psf = fit.explainedByPsf() >= minExplained;
        if (bg) {
            boolean tooLow = fit.offsetShift() > 0;
            causes.add(new Cause(tooLow ? "background-too-low" : "background-too-high", fit.explainedByBackground(),
                    String.format(Locale.ROOT, "The data lie about %.3g ADU %s the prediction everywhere: the"
                            + " background or offset is set too %s.", Math.abs(fit.offsetShift()),
                            tooLow ? "above" : "below", tooLow ? "low" : "high")));
        }
        if (psf) {
            double dxy = fit.extraVarianceXy();
            double dz = fit.extraVarianceZ();
            boolean lateralLeads = Math.abs(dxy) >= Math.abs(dz);
            double lead = lateralLeads ? dxy : dz;
            boolean narrow = lead > 0;
            causes.add(new Cause(narrow ? "psf-too-narrow" : "psf-too-wide", fit.explainedByPsf(), String.format(
                    Locale.ROOT, "Structure is left where the image curves: the data are %s blurred than the"
                            + " prediction (extra blur variance %.2g voxel^2 laterally, %.2g axially), so the PSF is"
                            + " likely too %s; check numerical aperture, wavelength, refractive indices and voxel size.",
                    narrow ? "more" : "less", dxy, dz, narrow ? "narrow" : "wide")));
        }
        boolean fading = fit.explainedByFading() >= minExplained;
        if (fading) {
            causes.add(new Cause("slice-trend", fit.explainedByFading(), String.format(Locale.ROOT,
                    "The signal changes over z (by %+.0f %% from the first to the last slice relative to the"
                            + " estimate): bleaching or a changing illumination during the acquisition.",
                    100 * fit.fading())));
        } else if (chi2Trend != null && Math.abs(chi2Trend.t()) >= TREND_T
                && Math.abs(chi2Trend.change()) >= TREND_CHI2_CHANGE) {
            causes.add(new Cause("slice-trend", Math.abs(chi2Trend.change()) / 2, String.format(Locale.ROOT,
                    "The misfit changes over z (chi^2 per voxel %.2f at the first slice, %.2f at the last): drift,"
                            + " focus change or bleaching during the acquisition.", chi2Trend.first(), chi2Trend.last())));
        } else if (meanTrend != null && Math.abs(meanTrend.t()) >= TREND_T
                && Math.abs(meanTrend.change()) >= TREND_MEAN_CHANGE) {
            causes.add(new Cause("slice-trend", (meanTrend.first() * meanTrend.first()
                    + meanTrend.first() * meanTrend.last() + meanTrend.last() * meanTrend.last()) / 3, String.format(
                    Locale.ROOT, "The residual drifts over z (mean %.2f at the first slice, %.2f at the last):"
                            + " bleaching or drift during the acquisition.", meanTrend.first(), meanTrend.last())));
        }
        if (lowFrequency && !bg && !psf && !fading) {
            causes.add(new Cause("low-frequency-structure", Math.max(0, spectrum.lowExcess()), String.format(
                    Locale.ROOT, "Structure is left at low spatial frequency (power %.2f times the high-frequency"
                            + " level): the PSF may have the wrong width or shape, the background may be wrong, or the"
                            + " specimen moved.",
                    spectrum.lowFrequencyRatio())));
        }
        if (causes.isEmpty() && chi2 > high) {
            causes.add(new Cause("noise-understated", chi2 - 1, String.format(Locale.ROOT, "chi^2 per voxel is %.3f"
                    + " with no structure found: the noise model understates the variance; check gain, read noise"
                    + " and offset.", chi2)));
        }
        if (chi2 < low) {
            causes.add(new Cause("noise-overstated-or-overfit", 1 - chi2, String.format(Locale.ROOT, "chi^2 per"
                    + " voxel is %.3f, below 1: the noise model overstates the variance (gain or read noise too high)"
                    + " or the estimate fits the noise (too many iterations, too little regularisation).", chi2)));
        }
        causes.sort(Comparator.comparingDouble(Cause::share).reversed());
        if (causes.isEmpty()) {
            return new Verdict(FITS, List.of(), String.format(Locale.ROOT, "Fits the noise model: chi^2 per voxel"
                    + " %.3f%s, no excess residual power at low frequencies (low/high frequency power %.2f), no"
                    + " isolated regions.", chi2,
                    where, spectrum.lowFrequencyRatio()));
        }
        List<Cause> named = new ArrayList<>();
        double first = causes.get(0).share();
        for (Cause c : causes) {
            if (named.isEmpty() || c.share() >= SECONDARY_SHARE * first) {
                named.add(c);
            }
        }
        StringBuilder sb = new StringBuilder(String.format(Locale.ROOT,
                "Does not fit the noise model (chi^2 per voxel %.3f%s).", chi2, where));
        for (Cause c : named) {
            sb.append(' ').append(c.sentence());
        }
        return new Verdict(named.get(0).code(), List.copyOf(named), sb.toString());
    }
}
