package org.stackwright.inspect;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.Workers;
import org.stackwright.psf.Fwhm;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;

/**
 * The whole residual analysis in one call: maps, histogram, spectrum, regions, the fit of model causes, per-slice
 * trends and the verdict. Library entry point of the {@code residuals} operation and of {@code deconvolve
 * --residuals}.
 *
 * <p><b>One trusted region.</b> The verdict, chi^2 per voxel, the histogram, the spectrum, the cause fit, the
 * trends and the region table all use the voxels of one {@link TrustedRegion}; the border band is reported apart
 * (its chi^2, its regions). The normalised residual stack itself covers the whole image.
 *
 * <p><b>Causes.</b> The cause fit (background, PSF width, fading; see {@link MismatchFit}) runs first on every
 * trusted voxel, so a wrong PSF, whose residual clusters around every bright object, is explained by its width term
 * before anything is called a region. Regions are then searched in what the fit leaves, the fit is repeated
 * without them, and the search repeated: what is still left (saturation, hot or dead pixels) is called isolated.
 *
 * @param maps predicted data, raw and normalised residuals over the whole image
 * @param trustedMaps the maps of the trusted box
 * @param region the trusted region
 * @param histogram normalised residuals of the trusted voxels against N(0, 1)
 * @param spectrum radially averaged power spectrum of the normalised residual in the trusted box, unexplained
 *     regions and untrusted voxels set to 0
 * @param regions connected regions with |r| > 4 whose centroid lies in the trusted box (positions in the image)
 * @param bandRegions number of such regions in the band outside the trusted box
 * @param unexplainedRegions regions in the trusted box that the cause fit does not explain: the ones the verdict
 *     calls isolated (positions relative to the trusted box)
 * @param fit background, PSF-width and fading explanation of the trusted residual
 * @param psfVariance Gaussian-equivalent variance of the PSF along x, y, z in voxel^2 (from its FWHM), for the
 *     size of a width mismatch
 * @param meanTrend trend over z of the per-slice mean of the residual left after the fit (null below 3 slices)
 * @param chi2Trend trend over z of the per-slice chi^2 of that residual (null below 3 slices)
 * @param chi2PerPlane chi^2 per voxel of every plane over the trusted box's lateral extent (NaN without voxels)
 * @param chi2Band chi^2 per voxel of the trusted voxels in the border band (NaN when there is no band)
 * @param verdict the verdict in words
 */
public record ResidualReport(ResidualMaps maps, ResidualMaps trustedMaps, TrustedRegion region,
        ResidualHistogram histogram, ResidualSpectrum spectrum, ResidualRegions regions, int bandRegions,
        ResidualRegions unexplainedRegions, MismatchFit fit, double[] psfVariance, SliceTrend meanTrend,
        SliceTrend chi2Trend, double[] chi2PerPlane, double chi2Band, Verdict verdict) {

    /** Image-sized float arrays an analysis holds at its peak (maps, crops, Laplacians, fit residuals). */
    public static final int IMAGE_ARRAYS = 22;

    /** Boundary words of {@code residuals --boundary}. */
    public static final java.util.List<String> BOUNDARIES = java.util.List.of("exclude", "mirror", "zero");

    /**
     * Analyses an estimate on the data grid, continued past the faces as chosen.
     *
     * @param data the data, ADU, not modified; NaN allowed where untrusted
     * @param estimate the estimate on the data grid, in ADU above the offset, not modified
     * @param psf the PSF (odd sizes, peak at the centre voxel; normalised to unit sum internally), not modified
     * @param model offset, background and noise model
     * @param boundary "exclude" (mirror continuation, band left out), "mirror" or "zero" (whole image judged)
     * @param untrusted per voxel, true where the data carry nothing; null for none
     * @param fft the FFT engine of the blur and the spectrum
     */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            String boundary, boolean[] untrusted, Workers workers, FftEngine fft) {
        if (!BOUNDARIES.contains(boundary)) {
            throw new IllegalArgumentException("boundary = '" + boundary + "' is not allowed; choose one of "
                    + String.join(", ", BOUNDARIES));
        }
        if (!data.sameShape(estimate)) {
            throw new IllegalArgumentException("estimate is " + estimate.shape() + " but input is " + data.shape()
                    + "; give the estimate made from this input (same size)");
        }
        if (estimate.countNonFinite() > 0) {
            throw new IllegalArgumentException("estimate has " + estimate.countNonFinite()
                    + " NaN or infinite voxels; allowed: finite values only");
        }
        ResidualMaps.checkPsf(psf, data);
        Volume unit = ResidualMaps.normalise(psf);
        Volume kernel = data.depth() == 1 && unit.depth() > 1 ? ForwardBlur.centrePlane(unit) : unit;
        Volume blurred = ForwardBlur.blur(estimate, kernel, boundary.equals("zero") ? Padding.Mode.ZERO
                : Padding.Mode.MIRROR, workers, fft);
        int[] band = TrustedRegion.bandOf(kernel);
        TrustedRegion region = boundary.equals("exclude") ? TrustedRegion.interior(data, band, untrusted)
                : TrustedRegion.wholeImage(data, band, boundary, untrusted);
        return analyse(data, blurred, model, region, kernel, workers, fft);
    }

    /** As above on the standard FFT engine. */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            String boundary, boolean[] untrusted, Workers workers) {
        return analyse(data, estimate, psf, model, boundary, untrusted, workers, FftEngines.standard());
    }

    /** As above with the default boundary, {@code exclude}, every voxel trusted and the standard FFT engine. */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            Workers workers) {
        return analyse(data, estimate, psf, model, workers, FftEngines.standard());
    }

    /** As above with the default boundary, {@code exclude}, and every voxel trusted, on a given FFT engine. */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            Workers workers, FftEngine fft) {
        return analyse(data, estimate, psf, model, "exclude", null, workers, fft);
    }

    /**
     * Analyses a prediction that is already made (for instance by the deconvolution itself, from its
     * extended-grid estimate).
     *
     * @param data the data, ADU, not modified
     * @param blurred H x on the data grid, ADU above offset and background, not modified
     * @param model offset, background and noise model
     * @param region the voxels to judge
     * @param psf the PSF the prediction was made with (for the size of a width mismatch), not modified
     * @param fft the FFT engine of the spectrum
     */
    public static ResidualReport analyse(Volume data, Volume blurred, ResidualModel model, TrustedRegion region,
            Volume psf, Workers workers, FftEngine fft) {
        ResidualMaps maps = ResidualMaps.of(data, blurred, model, region.untrusted(), workers);
        int[] box = region.analysisBox();
        ResidualMaps inner = maps.crop(box);
        Volume[] lap = MismatchFit.laplacians(maps.blurred());
        Volume lx = Padding.crop(lap[0], box[0], box[1], box[2], box[3], box[4], box[5]);
        Volume lz = Padding.crop(lap[1], box[0], box[1], box[2], box[3], box[4], box[5]);
        // the cause fit on every trusted voxel first; then leave out what it cannot explain and fit again
        MismatchFit fit = MismatchFit.fit(inner, lx, lz, model, null);
        ResidualRegions left = ResidualRegions.find(inner.normalised().withData(fit.unexplained()), inner.deviance());
        fit = MismatchFit.fit(inner, lx, lz, model, left.mask());
        ResidualRegions unexplained = ResidualRegions.find(inner.normalised().withData(fit.unexplained()),
                inner.deviance());
        if (box[5] > 1) {
            // report the fading from the first to the last slice of the whole stack, not of the box
            fit = fit.withFadingOver((data.depth() - 1) / (double) (box[5] - 1));
        }
        boolean[] skip = union(unexplained.mask(), inner.untrusted());
        ResidualSpectrum spectrum = ResidualSpectrum.of(inner.normalised(), skip, workers, fft);
        ResidualHistogram histogram = ResidualHistogram.of(inner.trustedValues());
        SliceTrend[] trends = trends(inner, fit, skip);
        ResidualRegions all = ResidualRegions.find(maps.normalised(), maps.deviance());
        int[] judged = region.box();
        ResidualRegions listed = all.within(judged);
        int bandRegions = all.outside(judged);
        double chi2Band = bandChi2(maps, region);
        double[] psfVariance = gaussianVariance(psf);
        Verdict verdict = Verdict.decide(inner, spectrum, unexplained, fit, trends[0], trends[1], chi2Band, region,
                psfVariance);
        return new ResidualReport(maps, inner, region, histogram, spectrum, listed, bandRegions, unexplained, fit,
                psfVariance, trends[0], trends[1], perPlane(maps, box), chi2Band, verdict);
    }

    /** @return chi^2 per voxel in the trusted region */
    public double chi2Trusted() {
        return trustedMaps.chi2PerVoxel();
    }

    /** @return chi^2 per voxel of every trusted voxel of the image, band included */
    public double chi2Whole() {
        return maps.chi2PerVoxel();
    }

    /** @return the data's width over the PSF's laterally (first order; NaN when unknown) */
    public double widthRatioXy() {
        return MismatchFit.widthRatio(fit.extraVarianceXy(), 0.5 * (psfVariance[0] + psfVariance[1]));
    }

    /** @return the data's width over the PSF's axially (first order; NaN for a 2D image or when unknown) */
    public double widthRatioZ() {
        return maps.normalised().depth() >= 3 ? MismatchFit.widthRatio(fit.extraVarianceZ(), psfVariance[2])
                : Double.NaN;
    }

    /** @return the Gaussian-equivalent variance (FWHM / 2.3548)^2 of the PSF along x, y, z, voxel^2 */
    static double[] gaussianVariance(Volume psf) {
        Fwhm.Widths fw = Fwhm.measure(psf);
        double[] um = {fw.xUm() / psf.voxel().x(), fw.yUm() / psf.voxel().y(),
            psf.depth() > 1 ? fw.zUm() / psf.voxel().z() : Double.NaN};
        double[] v = new double[3];
        for (int a = 0; a < 3; a++) {
            double s = um[a] / Fwhm.FWHM_PER_SIGMA;
            v[a] = Double.isFinite(s) ? s * s : Double.NaN;
        }
        return v;
    }

    private static boolean[] union(boolean[] a, boolean[] b) {
        if (b == null) {
            return a;
        }
        boolean[] u = a.clone();
        for (int i = 0; i < u.length; i++) {
            u[i] |= b[i];
        }
        return u;
    }

    /** chi^2 per voxel of the trusted voxels of the band (NaN when it holds none) */
    private static double bandChi2(ResidualMaps maps, TrustedRegion region) {
        Volume r = maps.normalised();
        float[] v = r.data();
        int w = r.width();
        int h = r.height();
        double s = 0;
        long n = 0;
        for (int z = 0; z < r.depth(); z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    int i = (z * h + y) * w + x;
                    if (maps.isTrusted(i) && region.inBand(x, y, z)) {
                        s += (double) v[i] * v[i];
                        n++;
                    }
                }
            }
        }
        return n > 0 ? s / n : Double.NaN;
    }

    /** chi^2 per voxel of each plane over the box's lateral extent */
    private static double[] perPlane(ResidualMaps maps, int[] box) {
        Volume r = maps.normalised();
        float[] v = r.data();
        int w = r.width();
        int h = r.height();
        double[] out = new double[r.depth()];
        for (int z = 0; z < r.depth(); z++) {
            double s = 0;
            int n = 0;
            for (int y = box[1]; y < box[1] + box[4]; y++) {
                for (int x = box[0]; x < box[0] + box[3]; x++) {
                    int i = (z * h + y) * w + x;
                    if (maps.isTrusted(i)) {
                        s += (double) v[i] * v[i];
                        n++;
                    }
                }
            }
            out[z] = n > 0 ? s / n : Double.NaN;
        }
        return out;
    }

    private static SliceTrend[] trends(ResidualMaps inner, MismatchFit fit, boolean[] ex) {
        Volume r = inner.normalised();
        int nz = r.depth();
        if (nz < 3) {
            return new SliceTrend[2];
        }
        int plane = r.width() * r.height();
        float[] left = fit.unexplained();
        double[] mean = new double[nz];
        double[] chi2 = new double[nz];
        double[] seMean = new double[nz];
        double[] seChi2 = new double[nz];
        for (int z = 0; z < nz; z++) {
            double s1 = 0;
            double s2 = 0;
            int m = 0;
            for (int i = z * plane, e = i + plane; i < e; i++) {
                if (!ex[i]) {
                    s1 += left[i];
                    s2 += (double) left[i] * left[i];
                    m++;
                }
            }
            m = Math.max(m, 1);
            mean[z] = s1 / m;
            chi2[z] = s2 / m;
            double c = Math.max(chi2[z], 1e-6);
            // standard errors of a mean and of a mean square of m values of variance c (Gaussian case)
            seMean[z] = Math.sqrt(c / m);
            seChi2[z] = c * Math.sqrt(2.0 / m);
        }
        return new SliceTrend[] {SliceTrend.fit(mean, seMean), SliceTrend.fit(chi2, seChi2)};
    }
}
