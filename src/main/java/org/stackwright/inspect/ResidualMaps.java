package org.stackwright.inspect;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;

/**
 * The residual view's images: predicted data mu = offset + background + H x, raw residual y - mu, and normalised
 * (Pearson) residual r = (y - mu) / sqrt(var(mu)), with chi^2 per voxel (the mean of r^2) for the whole stack and
 * for each slice. For data drawn from the model, r has mean 0 and variance 1 at every voxel, so chi^2 per voxel is
 * close to 1 (E[(y - mu)^2 / var] = 1 by the definition of the variance; for Poisson counts var = mu).
 *
 * @param predicted mu, ADU
 * @param raw y - mu, ADU
 * @param normalised r, in units of the noise standard deviation
 * @param chi2PerVoxel mean of r^2 over the stack
 * @param chi2PerSlice mean of r^2 in each z slice
 * @param meanPerSlice mean of r in each z slice
 * @param meanNormalised mean of r over the stack
 * @param blurred H x alone (ADU above offset and background), used by the cause analysis
 * @param border the PSF half-width (x, y, z) in voxels: the outer band where the estimate's mirror continuation
 *     is a guess (see {@link ForwardBlur})
 * @param deviance the signed deviance residual sign(y - mu) sqrt(2 deviance(y, mu)) of the noise model, close to
 *     normal even at low counts where the Pearson residual is skewed (McCullagh & Nelder, Generalized Linear
 *     Models, 2nd ed., 1989, sec. 2.4.2); equal to r for Gaussian noise. Used to keep low-count noise out of the
 *     region list.
 */
public record ResidualMaps(Volume predicted, Volume raw, Volume normalised, double chi2PerVoxel, double[] chi2PerSlice,
        double[] meanPerSlice, double meanNormalised, Volume blurred, int[] border, Volume deviance) {

    /**
     * Computes the maps.
     *
     * @param data the data y, ADU, not modified
     * @param estimate the estimate x on the data grid, not modified
     * @param psf the PSF (odd sizes, peak at the centre voxel); normalised to unit sum here (a copy), not modified
     * @param model offset, background and noise model
     * @throws IllegalArgumentException naming the input when shapes differ, values are not finite or the PSF is
     *     not usable
     */
    public static ResidualMaps compute(Volume data, Volume estimate, Volume psf, ResidualModel model, Workers workers) {
        return compute(data, estimate, psf, model, workers, FftEngines.standard());
    }

    /** As above, with the FFT engine of the blur. */
    public static ResidualMaps compute(Volume data, Volume estimate, Volume psf, ResidualModel model, Workers workers,
            FftEngine fft) {
        check(data, estimate, psf);
        Volume unit = normalise(psf);
        Volume hx = ForwardBlur.blur(estimate, unit, workers, fft);
        int n = data.size();
        float[] y = data.data();
        float[] b = hx.data();
        float[] mu = new float[n];
        float[] raw = new float[n];
        float[] r = new float[n];
        float[] dev = new float[n];
        double offset = model.offset();
        double bg = model.background();
        workers.forRange(n, (from, to) -> {
            for (int i = from; i < to; i++) {
                double above = bg + b[i];
                double m = offset + above;
                double d = y[i] - m;
                mu[i] = (float) m;
                raw[i] = (float) d;
                r[i] = (float) (d / Math.sqrt(model.noise().variance(above)));
                double dv = Math.sqrt(2 * Math.max(0, model.noise().deviance(y[i] - offset, above)));
                dev[i] = (float) (d < 0 ? -dv : dv);
            }
        });
        int plane = data.width() * data.height();
        int nz = data.depth();
        double[] chi2Slice = new double[nz];
        double[] meanSlice = new double[nz];
        double[] sums = planeSums(r, plane, nz, chi2Slice, meanSlice);
        double chi2 = sums[0];
        double mean = sums[1];
        Volume k = data.depth() == 1 && psf.depth() > 1 ? ForwardBlur.centrePlane(unit) : unit;
        int[] border = {k.width() / 2, k.height() / 2, k.depth() / 2};
        return new ResidualMaps(data.withData(mu), data.withData(raw), data.withData(r), chi2 / n, chi2Slice,
                meanSlice, mean / n, hx, border, data.withData(dev));
    }

    /**
     * @return the maps inside a box, with chi^2 and means recomputed for the box (the border field keeps the PSF
     *     half-width)
     */
    public ResidualMaps crop(int x0, int y0, int z0, int w, int h, int d) {
        Volume r = Padding.crop(normalised, x0, y0, z0, w, h, d);
        float[] v = r.data();
        int plane = w * h;
        double[] chi2Slice = new double[d];
        double[] meanSlice = new double[d];
        double[] sums = planeSums(v, plane, d, chi2Slice, meanSlice);
        double chi2 = sums[0];
        double mean = sums[1];
        return new ResidualMaps(Padding.crop(predicted, x0, y0, z0, w, h, d), Padding.crop(raw, x0, y0, z0, w, h, d),
                r, chi2 / v.length, chi2Slice, meanSlice, mean / v.length, Padding.crop(blurred, x0, y0, z0, w, h, d),
                border, Padding.crop(deviance, x0, y0, z0, w, h, d));
    }

    private static void check(Volume data, Volume estimate, Volume psf) {
        if (!data.sameShape(estimate)) {
            throw new IllegalArgumentException("estimate is " + estimate.shape() + " but input is " + data.shape()
                    + "; give the estimate made from this input (same size)");
        }
        if (data.countNonFinite() > 0) {
            throw new IllegalArgumentException("input has " + data.countNonFinite() + " NaN or infinite voxels; allowed: finite values only");
        }
        if (estimate.countNonFinite() > 0) {
            throw new IllegalArgumentException("estimate has " + estimate.countNonFinite() + " NaN or infinite voxels; allowed: finite values only");
        }
        if ((psf.width() & 1) == 0 || (psf.height() & 1) == 0 || (psf.depth() & 1) == 0) {
            throw new IllegalArgumentException("psf size " + psf.shape() + " is not allowed: every size must be odd"
                    + " with the peak at the centre voxel");
        }
        if (psf.countNonFinite() > 0 || !(psf.sum() > 0)) {
            throw new IllegalArgumentException("psf must hold finite values with a positive sum (sum " + psf.sum() + ")");
        }
        if (!psf.voxel().sameAs(data.voxel())) {
            throw new IllegalArgumentException("psf voxel size " + psf.voxel() + " differs from the input's "
                    + data.voxel() + "; resample the PSF to the data's voxel size first");
        }
    }

    /** @return a unit-sum copy of the PSF */
    static Volume normalise(Volume psf) {
        double s = psf.sum();
        Volume c = psf.copy();
        float[] d = c.data();
        for (int i = 0; i < d.length; i++) {
            d[i] = (float) (d[i] / s);
        }
        return c;
    }

    /**
     * Per-plane mean of r^2 and of r, plane by plane in a fixed order (deterministic).
     *
     * @param r normalised residuals, not modified
     * @param chi2Slice receives the mean of r^2 of each plane
     * @param meanSlice receives the mean of r of each plane
     * @return {sum of r^2, sum of r} over all planes
     */
    private static double[] planeSums(float[] r, int plane, int nz, double[] chi2Slice, double[] meanSlice) {
        double chi2 = 0;
        double mean = 0;
        for (int z = 0; z < nz; z++) {
            double s1 = 0;
            double s2 = 0;
            for (int i = z * plane, e = i + plane; i < e; i++) {
                s1 += r[i];
                s2 += (double) r[i] * r[i];
            }
            chi2Slice[z] = s2 / plane;
            meanSlice[z] = s1 / plane;
            chi2 += s2;
            mean += s1;
        }
        return new double[] {chi2, mean};
    }
}
