package org.stackwright.inspect;

import java.util.ArrayList;
import java.util.Comparator;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.Volume;

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
 * <li>A model cause (background, PSF width, fading over z; see {@link MismatchFit}) counts when the chi^2 it
 *     explains, summed over the n judged voxels, reaches {@value #CAUSE_CHI2_ONE} for a one-term cause (background,
 *     fading) or {@value #CAUSE_CHI2_TWO} for the two-term PSF width (one term in 2D), and its share per voxel
 *     reaches {@value #MIN_EXPLAINED}. Under a correct model a fitted k-term cause explains a chi-squared amount
 *     with k degrees of freedom (the drop in a weighted sum of squares from k extra linear terms; any
 *     regression text), so each limit is passed with probability about 5e-4 (1 term) or 9e-4 (2 terms); the
 *     simulated table of true-model cases (README, "How the verdict was calibrated") never reached 7. The small
 *     share per voxel keeps effects too small to matter out of huge images. For a deconvolution's own residuals
 *     the causes are looked for only when the run left more misfit than the noise allows, chi^2 per voxel above
 *     1 + 5 sqrt(2/n) (a fitted estimate can do no worse than the true object, whose chi^2 per voxel has mean 1
 *     and standard deviation about sqrt(2/n)), and the share must reach {@value #OWN_MIN_EXPLAINED}: that estimate
 *     was fitted to these very data with as many unknowns as voxels, so a run stopped by the noise rule always
 *     leaves some smooth structure and a little light in dark regions (measured with the exact PSF and camera:
 *     up to 0.05 chi^2 per voxel for the width term and 0.017 for the background, while its chi^2 per voxel stayed
 *     below 1.006; {@code solve.OwnResidualsCalibrationTest}), which is not a fault of the model. Its width
 *     signature is named as a property of the estimate ({@code estimate-too-smooth}, {@code estimate-too-sharp}),
 *     not of the PSF. A chi^2 per voxel below {@value #OWN_CHI2_LOW} (not {@value #CHI2_LOW}: a fitted estimate
 *     absorbs part of the noise, the more the dimmer the data; measured down to 0.85 with the exact model at 30
 *     photons) is named {@code noise-overstated-or-overfit}.</li>
 * <li>Regions: any listed region (see {@link ResidualRegions}) left in the residual after the cause fit; ranked by
 *     the chi^2 they carry above the noise level. A wrong PSF leaves clusters around every bright object that its
 *     width term explains, so they are not called isolated.</li>
 * <li>Too little to judge: the trusted region has fewer than {@value TrustedRegion#MIN_VOXELS} voxels or fewer than
 *     {@value TrustedRegion#MIN_EXTENT} along an axis ({@value #TOO_LITTLE_INTERIOR}).</li>
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
    public static final double MIN_EXPLAINED = 0.001;
    public static final double OWN_MIN_EXPLAINED = 0.005;
    public static final double OWN_CHI2_LOW = 0.8;
    public static final double CAUSE_CHI2_ONE = 12;
    public static final double CAUSE_CHI2_TWO = 14;
    public static final double TREND_T = 5;
    public static final double TREND_MEAN_CHANGE = 0.2;
    public static final double TREND_CHI2_CHANGE = 0.2;
    public static final double SECONDARY_SHARE = 0.25;

    /** The verdict code when the data fit. */
    public static final String FITS = "fits";
    /** The code when a statistic is not a finite number: no judgement is possible. */
    public static final String NOT_COMPUTED = "not-computed";

    /** The verdict code when the trusted region is too small to judge (see {@link TrustedRegion#tooSmall}). */
    public static final String TOO_LITTLE_INTERIOR = "too-little-interior";

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

    /** Decides on maps where every voxel is judged (no band, no sizes of a width mismatch). */
    public static Verdict decide(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions, MismatchFit fit,
            SliceTrend meanTrend, SliceTrend chi2Trend) {
        Volume r = maps.normalised();
        TrustedRegion whole = TrustedRegion.wholeImage(r, new int[3], "mirror", maps.untrusted());
        return decide(maps, spectrum, regions, fit, meanTrend, chi2Trend, Double.NaN, whole,
                new double[] {Double.NaN, Double.NaN, Double.NaN});
    }

    /**
     * Decides on the trusted region of a stack and, when it fits, adds a sentence about the border band if that
     * fits worse.
     *
     * @param maps the maps of the trusted box
     * @param regions the regions the cause fit leaves, positions relative to the trusted box
     * @param chi2Band chi^2 per voxel in the border band, NaN when there is none
     * @param region the trusted region (its box gives positions in the image; too small: no verdict)
     * @param psfVariance Gaussian-equivalent variance of the PSF along x, y, z (voxel^2), for the size of a width
     *     mismatch; NaN when unknown
     */
    public static Verdict decide(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions, MismatchFit fit,
            SliceTrend meanTrend, SliceTrend chi2Trend, double chi2Band, TrustedRegion region, double[] psfVariance) {
        if (region.tooSmall()) {
            int[] b = region.box();
            return new Verdict(TOO_LITTLE_INTERIOR, List.of(), String.format(Locale.ROOT, "Too little to judge: only"
                    + " %d trusted voxels (%dx%dx%d) lie further than the PSF's reach (%d, %d, %d voxels in x, y, z)"
                    + " from every face, and a verdict on fewer than %d voxels, or on fewer than %d along an axis,"
                    + " would be a guess. Judge the deconvolution's own residuals (deconvolve --residuals), whose"
                    + " prediction needs no guess at the border, or choose --boundary zero or mirror if that is how"
                    + " the specimen continues past the field.", region.trustedVoxels(), b[3], b[4], b[5],
                    region.band()[0], region.band()[1], region.band()[2], TrustedRegion.MIN_VOXELS,
                    TrustedRegion.MIN_EXTENT));
        }
        int[] box = region.box();
        Verdict v = decideInterior(maps, spectrum, regions, fit, meanTrend, chi2Trend, box, region.describe(),
                psfVariance, region.boundary().equals("extended-grid"));
        // only when the trusted region fits: otherwise the band may just show the same mismatch more strongly
        if (v.fits() && region.bandExcluded() && Double.isFinite(chi2Band)
                && chi2Band > Math.max(CHI2_HIGH, maps.chi2PerVoxel() + 0.1)) {
            String note = String.format(Locale.ROOT, " The border band (%d, %d, %d voxels from the faces in x, y, z)"
                    + " fits worse (chi^2 per voxel %.3f): light from objects outside the field of view, which an"
                    + " estimate on the data grid cannot hold; it is left out of the verdict.", region.band()[0],
                    region.band()[1], region.band()[2], chi2Band);
            return new Verdict(v.code(), v.causes(), v.text() + note);
        }
        return v;
    }

    /** @return "0.87 times", or words for a ratio the first-order fit cannot size */
    private static String times(double ratio) {
        return Double.isFinite(ratio) ? String.format(Locale.ROOT, "%.2f times", ratio) : "far less than 0.5 times";
    }

    private static Verdict decideInterior(ResidualMaps maps, ResidualSpectrum spectrum, ResidualRegions regions,
            MismatchFit fit, SliceTrend meanTrend, SliceTrend chi2Trend, int[] box, String where,
            double[] psfVariance, boolean own) {
        int ox = box[0];
        int oy = box[1];
        int oz = box[2];
        long n = Math.max(1, maps.trusted());
        double chi2 = maps.chi2PerVoxel();
        if (!Double.isFinite(chi2)) {
            // a NaN or infinite statistic is never a fit
            return new Verdict(NOT_COMPUTED, List.of(), "chi^2 per voxel is " + chi2 + ": the residuals are not all"
                    + " finite numbers, so the fit cannot be judged.");
        }
        double width = 5 * Math.sqrt(2.0 / n);
        double high = Math.max(CHI2_HIGH, 1 + width);
        double low = Math.min(own ? OWN_CHI2_LOW : CHI2_LOW, 1 - width);
        double floor = own ? OWN_MIN_EXPLAINED : MIN_EXPLAINED;
        // a deconvolution's own estimate absorbs what it can: only misfit beyond the noise is looked into
        boolean misfit = !own || chi2 > 1 + width;
        if (own) {
            high = 1 + width;
        }
        double oneTerm = Math.max(floor, CAUSE_CHI2_ONE / n);
        double psfTerms = Math.max(floor, (maps.normalised().depth() >= 3 ? CAUSE_CHI2_TWO : CAUSE_CHI2_ONE) / n);
        double ratioLimit = 1 + Math.max(LOW_RATIO_MARGIN, 6 / Math.sqrt(Math.max(1, spectrum.lowModes())));
        boolean lowFrequency = spectrum.lowFrequencyRatio() > ratioLimit;
        List<Cause> causes = new ArrayList<>();

        if (regions.listedCount() > 0) {
            ResidualRegions.Region big = regions.listed().get(0);
            causes.add(new Cause("isolated-regions", regions.chi2Excess(fit.unexplained(), n), String.format(
                    Locale.ROOT, "%d isolated region%s with |r| > 4 that no background or PSF-width error explains"
                    + " (largest %d voxels at x %.0f, y %.0f, z %.0f, data %s the prediction): saturation, hot or"
                    + " dead pixels or other defects; mask them before measuring.",
                    regions.listedCount(), regions.listedCount() == 1 ? "" : "s", big.voxels(), big.x() + ox,
                    big.y() + oy, big.z() + oz, big.peak() < 0 ? "below" : "above")));
        }
        boolean bg = misfit && fit.explainedByBackground() >= oneTerm;
        boolean psf = misfit && fit.explainedByPsf() >= psfTerms;
        if (bg) {
            boolean tooLow = fit.offsetShift() > 0;
            causes.add(new Cause(tooLow ? "background-too-low" : "background-too-high", fit.explainedByBackground(),
                    String.format(Locale.ROOT, "The data lie about %.3g ADU %s the prediction everywhere: the"
                            + " background or offset is set too %s%s.", Math.abs(fit.offsetShift()),
                            tooLow ? "above" : "below", tooLow ? "low" : "high", own && !tooLow ? ", or the"
                            + " non-negative estimate cannot follow the noise below its mean in dark regions (a"
                            + " bias of maximum-likelihood estimates there)" : "")));
        }
        if (psf) {
            double dxy = fit.extraVarianceXy();
            double dz = fit.extraVarianceZ();
            boolean lateralLeads = Math.abs(dxy) >= Math.abs(dz);
            double lead = lateralLeads ? dxy : dz;
            boolean narrow = lead > 0;
            double rxy = MismatchFit.widthRatio(dxy, 0.5 * (psfVariance[0] + psfVariance[1]));
            double rz = maps.normalised().depth() >= 3 ? MismatchFit.widthRatio(dz, psfVariance[2]) : Double.NaN;
            boolean known = psfVariance[0] + psfVariance[1] > 0;
            boolean axial = maps.normalised().depth() >= 3 && psfVariance[2] > 0;
            String size = !known ? "" : String.format(Locale.ROOT, "; the data look %s as wide as the PSF"
                    + " laterally%s (first-order fit)", times(rxy), axial ? " and " + times(rz) + " axially" : "");
            if (own) {
                // the deconvolution fitted its estimate through this PSF, so the signature says first how sharp the
                // estimate is; a wrong PSF width shows only as far as the estimate could not absorb it
                causes.add(new Cause(narrow ? "estimate-too-sharp" : "estimate-too-smooth", fit.explainedByPsf(),
                        String.format(Locale.ROOT, "Structure is left where the image curves: the data are %s"
                                + " blurred than the run's own prediction (extra blur variance %.2g voxel^2 laterally,"
                                + " %.2g axially%s): the estimate is %s than the data demand: %s. Check the PSF"
                                + " with residuals on an external estimate or with beads.", narrow ? "more" : "less",
                                dxy, dz, size, narrow ? "sharper" : "smoother", narrow
                                ? "it has fitted noise or ringing, or the PSF is too narrow"
                                : "the run stopped early or was regularised strongly, or the PSF is too wide")));
            } else {
                causes.add(new Cause(narrow ? "psf-too-narrow" : "psf-too-wide", fit.explainedByPsf(), String.format(
                        Locale.ROOT, "Structure is left where the image curves: the data are %s blurred than the"
                                + " prediction (extra blur variance %.2g voxel^2 laterally, %.2g axially%s), so the PSF"
                                + " is likely too %s; check numerical aperture, wavelength, refractive indices and voxel"
                                + " size.", narrow ? "more" : "less", dxy, dz, size, narrow ? "narrow" : "wide")));
            }
        }
        boolean fading = misfit && fit.explainedByFading() >= oneTerm;
        if (!misfit) {
            // no trend or generic structure either: the estimate fitted those
        } else if (fading) {
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
        if (misfit && lowFrequency && !bg && !psf && !fading) {
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
        if (causes.isEmpty() && own) {
            return new Verdict(FITS, List.of(), String.format(Locale.ROOT, "Fits the noise model over %s: chi^2 per"
                    + " voxel %.3f, no more misfit than the noise allows and no isolated regions. The estimate was"
                    + " fitted through this PSF, so this does not show that the PSF is right: a PSF that is too narrow,"
                    + " or a little too wide, is absorbed by the estimate; check it with residuals on an external"
                    + " estimate or with beads.", where, chi2));
        }
        if (causes.isEmpty()) {
            return new Verdict(FITS, List.of(), String.format(Locale.ROOT, "Fits the noise model over %s: chi^2 per"
                    + " voxel %.3f, no excess residual power at low frequencies (low/high frequency power"
                    + " %.2f), no isolated regions.", where, chi2, spectrum.lowFrequencyRatio()));
        }
        List<Cause> named = new ArrayList<>();
        double first = causes.get(0).share();
        for (Cause c : causes) {
            if (named.isEmpty() || c.share() >= SECONDARY_SHARE * first) {
                named.add(c);
            }
        }
        StringBuilder sb = new StringBuilder(String.format(Locale.ROOT,
                "Does not fit the noise model over %s (chi^2 per voxel %.3f).", where, chi2));
        for (Cause c : named) {
            sb.append(' ').append(c.sentence());
        }
        return new Verdict(named.get(0).code(), List.copyOf(named), sb.toString());
    }
}
