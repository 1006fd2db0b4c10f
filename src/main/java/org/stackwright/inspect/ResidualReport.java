package org.stackwright.inspect;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * The whole residual analysis in one call: maps, histogram, spectrum, regions, the fit of model causes, per-slice
 * trends and the verdict. Library entry point of the {@code residuals} operation.
 *
 * @param maps predicted data, raw and normalised residuals, chi^2 per voxel and per slice
 * @param histogram normalised residuals against N(0, 1)
 * @param spectrum radially averaged power spectrum of the normalised residual, unexplained regions set to 0
 * @param regions connected regions with |r| > 4 (the table)
 * @param unexplainedRegions regions of the residual left after the background and PSF-width fit: the ones the
 *     verdict calls isolated (saturation, defects)
 * @param fit background and PSF-width explanation of the residual
 * @param meanTrend trend over z of the per-slice mean of the residual left after the fit (null below 3 slices)
 * @param chi2Trend trend over z of the per-slice chi^2 of that residual (null below 3 slices)
 * @param verdict the verdict in words
 */
public record ResidualReport(ResidualMaps maps, ResidualHistogram histogram, ResidualSpectrum spectrum,
        ResidualRegions regions, ResidualRegions unexplainedRegions, MismatchFit fit, SliceTrend meanTrend, SliceTrend chi2Trend, Verdict verdict) {

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
        ResidualMaps maps = ResidualMaps.compute(data, estimate, psf, model, workers);
        ResidualRegions regions = ResidualRegions.find(maps.normalised());
        // Regions that a background or PSF-width error explains (bright objects under a wrong PSF) are not
        // defects: fit the model causes without the regions, then keep only the regions still present in the
        // residual left after that fit, and refit without them.
        MismatchFit first = MismatchFit.fit(maps, model, regions.mask());
        ResidualRegions unexplained = ResidualRegions.find(maps.normalised().withData(first.unexplained()));
        MismatchFit fit = MismatchFit.fit(maps, model, unexplained.mask());
        ResidualSpectrum spectrum = ResidualSpectrum.of(maps.normalised(), unexplained.mask(), workers);
        ResidualHistogram histogram = ResidualHistogram.of(maps.normalised().data());
        SliceTrend meanTrend = null;
        SliceTrend chi2Trend = null;
        int nz = data.depth();
        if (nz >= 3) {
            int plane = data.width() * data.height();
            float[] left = fit.unexplained();
            boolean[] ex = unexplained.mask();
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
            meanTrend = SliceTrend.fit(mean, seMean);
            chi2Trend = SliceTrend.fit(chi2, seChi2);
        }
        Verdict verdict = Verdict.decide(maps, spectrum, unexplained, fit, meanTrend, chi2Trend);
        return new ResidualReport(maps, histogram, spectrum, regions, unexplained, fit, meanTrend, chi2Trend, verdict);
    }
}
