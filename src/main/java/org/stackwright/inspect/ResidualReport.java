package org.stackwright.inspect;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The whole residual analysis in one call: maps, histogram, spectrum, regions, the fit of model causes, per-slice
 * trends and the verdict. Library entry point of the {@code residuals} operation.
 *
 * <p><b>Border band.</b> The maps, the histogram, chi^2 per voxel and per slice and the region table cover the
 * whole stack. The verdict, the spectrum and the cause fit use the interior: voxels further than the PSF half-width
 * from every face (the band is narrowed to a quarter of the size along an axis where it would leave less). In the
 * band the data hold light from objects outside the field of view, which an estimate on the data grid cannot
 * hold, so a perfect estimate still leaves a residual there (see {@link ForwardBlur}); a worse fit in the band is
 * reported in words but does not decide the verdict.
 *
 * @param maps predicted data, raw and normalised residuals, chi^2 per voxel and per slice (whole stack)
 * @param histogram normalised residuals against N(0, 1) (whole stack)
 * @param spectrum radially averaged power spectrum of the normalised residual in the interior, unexplained regions
 *     set to 0
 * @param regions connected regions with |r| > 4 in the whole stack (the table)
 * @param unexplainedRegions regions in the interior that the background and PSF-width fit does not explain: the
 *     ones the verdict calls isolated (saturation, defects); positions relative to the interior box
 * @param fit background, PSF-width and fading explanation of the interior residual
 * @param meanTrend trend over z of the per-slice mean of the residual left after the fit (null below 3 slices)
 * @param chi2Trend trend over z of the per-slice chi^2 of that residual (null below 3 slices)
 * @param interior the interior box: x0, y0, z0, width, height, depth
 * @param chi2Interior chi^2 per voxel in the interior
 * @param chi2Band chi^2 per voxel in the border band (NaN when there is no band)
 * @param verdict the verdict in words
 */
public record ResidualReport(ResidualMaps maps, ResidualHistogram histogram, ResidualSpectrum spectrum,
        ResidualRegions regions, ResidualRegions unexplainedRegions, MismatchFit fit, SliceTrend meanTrend,
        SliceTrend chi2Trend, int[] interior, double chi2Interior, double chi2Band, Verdict verdict) {

    /**
     * Runs the analysis. Inputs are not modified.
     *
     * @param data the data, ADU
     * @param estimate the estimate on the data grid, in ADU above the offset
     * @param psf the PSF (odd sizes, peak at the centre voxel; normalised to unit sum internally)
     * @param model offset, background and noise model
     */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            Workers workers) {
        return analyse(data, estimate, psf, model, workers, FftEngines.standard());
    }

    /** As above, with the FFT engine of the blur and the spectrum. */
    public static ResidualReport analyse(Volume data, Volume estimate, Volume psf, ResidualModel model,
            Workers workers, FftEngine fft) {
        ResidualMaps maps = ResidualMaps.compute(data, estimate, psf, model, workers, fft);
        ResidualRegions regions = ResidualRegions.find(maps.normalised(), maps.deviance());
        int[] box = interior(data, maps.border());
        ResidualMaps inner = maps.crop(box[0], box[1], box[2], box[3], box[4], box[5]);
        long nAll = data.size();
        long nIn = inner.normalised().size();
        double chi2Band = nAll > nIn ? (maps.chi2PerVoxel() * nAll - inner.chi2PerVoxel() * nIn) / (nAll - nIn)
                : Double.NaN;
        // Regions that a background or PSF-width error explains (bright objects under a wrong PSF) are not
        // defects: fit the model causes without the regions, then keep only the regions still present in the
        // residual left after that fit, and refit without them.
        ResidualRegions first = ResidualRegions.find(inner.normalised(), inner.deviance());
        MismatchFit firstFit = MismatchFit.fit(inner, model, first.mask());
        ResidualRegions unexplained = ResidualRegions.find(inner.normalised().withData(firstFit.unexplained()),
                inner.deviance());
        MismatchFit fit = MismatchFit.fit(inner, model, unexplained.mask());
        if (box[5] > 1) {
            // report the fading from the first to the last slice of the whole stack, not of the interior
            fit = fit.withFadingOver((data.depth() - 1) / (double) (box[5] - 1));
        }
        ResidualSpectrum spectrum = ResidualSpectrum.of(inner.normalised(), unexplained.mask(), workers, fft);
        ResidualHistogram histogram = ResidualHistogram.of(maps.normalised().data());
        SliceTrend[] trends = trends(inner, fit, unexplained.mask());
        Verdict verdict = Verdict.decide(inner, spectrum, unexplained, fit, trends[0], trends[1], chi2Band, box);
        return new ResidualReport(maps, histogram, spectrum, regions, unexplained, fit, trends[0], trends[1], box,
                inner.chi2PerVoxel(), chi2Band, verdict);
    }

    /** @return x0, y0, z0, w, h, d of the voxels further than the PSF half-width from every face */
    static int[] interior(Volume v, int[] border) {
        int[] n = {v.width(), v.height(), v.depth()};
        int[] box = new int[6];
        for (int a = 0; a < 3; a++) {
            int b = Math.min(border[a], (n[a] - 1) / 4);
            box[a] = b;
            box[3 + a] = n[a] - 2 * b;
        }
        return box;
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
