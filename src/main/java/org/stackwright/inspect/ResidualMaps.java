package org.stackwright.inspect;

import org.stackwright.fft.FftEngine;
import org.stackwright.fft.FftEngines;
import org.stackwright.parallel.Workers;
import org.stackwright.volume.Padding;
import org.stackwright.volume.Volume;

/**
 * The residual view's images: predicted data mu = offset + background + H x, raw residual y - mu, and normalised
 * (Pearson) residual r = (y - mu) / sqrt(var(mu)), with chi^2 per voxel (the mean of r^2) over the trusted voxels
 * and per slice. For data drawn from the model, r has mean 0 and variance 1 at every voxel, so chi^2 per voxel is
 * close to 1 (E[(y - mu)^2 / var] = 1 by the definition of the variance; for Poisson counts var = mu).
 * Untrusted voxels (masked or NaN data) get r = 0 and are left out of every statistic.
 *
 * @param predicted mu, ADU
 * @param raw y - mu, ADU (0 where untrusted)
 * @param normalised r, in units of the noise standard deviation (0 where untrusted)
 * @param chi2PerVoxel mean of r^2 over the trusted voxels
 * @param chi2PerSlice mean of r^2 over the trusted voxels of each z slice (NaN for a slice without any)
 * @param meanPerSlice mean of r in each z slice (NaN for a slice without trusted voxels)
 * @param meanNormalised mean of r over the trusted voxels
 * @param blurred H x alone (ADU above offset and background), used by the cause analysis
 * @param deviance the signed deviance residual sign(y - mu) sqrt(2 deviance(y, mu)) of the noise model, close to
 *     normal even at low counts where the Pearson residual is skewed (McCullagh &amp; Nelder, Generalized Linear
 *     Models, 2nd ed., 1989, sec. 2.4.2); equal to r for Gaussian noise. Used to keep low-count noise out of the
 *     region list.
 * @param untrusted per voxel: true where the data carry nothing (null when every voxel is trusted)
 * @param trusted number of trusted voxels
 */
public record ResidualMaps(Volume predicted, Volume raw, Volume normalised, double chi2PerVoxel, double[] chi2PerSlice,
        double[] meanPerSlice, double meanNormalised, Volume blurred, Volume deviance, boolean[] untrusted,
        long trusted) {

    /**
     * Computes the maps of an estimate on the data grid, continued past the faces by mirroring (see
     * {@link ForwardBlur}).
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
        return of(data, ForwardBlur.blur(estimate, normalise(psf), workers, fft), model, null, workers);
    }

    /**
     * Computes the maps from a prediction.
     *
     * @param data the data y, ADU, not modified; may hold NaN where untrusted
     * @param blurred H x on the data grid, ADU above offset and background, not modified (kept in the result)
     * @param model offset, background and noise model
     * @param untrusted per voxel, true to leave out; null for none; not modified (kept in the result)
     */
    public static ResidualMaps of(Volume data, Volume blurred, ResidualModel model, boolean[] untrusted,
            Workers workers) {
        if (!data.sameShape(blurred)) {
            throw new IllegalArgumentException("prediction is " + blurred.shape() + " but input is " + data.shape());
        }
        int n = data.size();
        float[] y = data.data();
        float[] b = blurred.data();
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
                mu[i] = (float) m;
                if (untrusted != null && untrusted[i]) {
                    continue;
                }
                double d = y[i] - m;
                raw[i] = (float) d;
                r[i] = (float) (d / Math.sqrt(model.noise().variance(above)));
                double dv = Math.sqrt(2 * Math.max(0, model.noise().deviance(y[i] - offset, above)));
                dev[i] = (float) (d < 0 ? -dv : dv);
            }
        });
        return assemble(data.withData(mu), data.withData(raw), data.withData(r), blurred, data.withData(dev),
                untrusted);
    }

    private static ResidualMaps assemble(Volume mu, Volume raw, Volume r, Volume blurred, Volume dev,
            boolean[] untrusted) {
        int plane = r.width() * r.height();
        int nz = r.depth();
        double[] chi2Slice = new double[nz];
        double[] meanSlice = new double[nz];
        double[] sums = planeSums(r.data(), untrusted, plane, nz, chi2Slice, meanSlice);
        long count = (long) sums[2];
        double chi2 = count > 0 ? sums[0] / count : Double.NaN;
        double mean = count > 0 ? sums[1] / count : Double.NaN;
        return new ResidualMaps(mu, raw, r, chi2, chi2Slice, meanSlice, mean, blurred, dev, untrusted, count);
    }

    /** @return the maps inside a box, with chi^2 and means recomputed for the box */
    public ResidualMaps crop(int[] box) {
        return crop(box[0], box[1], box[2], box[3], box[4], box[5]);
    }

    /** @return the maps inside a box, with chi^2 and means recomputed for the box */
    public ResidualMaps crop(int x0, int y0, int z0, int w, int h, int d) {
        boolean[] u = null;
        if (untrusted != null) {
            u = new boolean[w * h * d];
            int iw = normalised.width();
            int ih = normalised.height();
            for (int z = 0; z < d; z++) {
                for (int y = 0; y < h; y++) {
                    for (int x = 0; x < w; x++) {
                        u[(z * h + y) * w + x] = untrusted[((z + z0) * ih + y + y0) * iw + x + x0];
                    }
                }
            }
        }
        return assemble(Padding.crop(predicted, x0, y0, z0, w, h, d), Padding.crop(raw, x0, y0, z0, w, h, d),
                Padding.crop(normalised, x0, y0, z0, w, h, d), Padding.crop(blurred, x0, y0, z0, w, h, d),
                Padding.crop(deviance, x0, y0, z0, w, h, d), u);
    }

    /** @return true when voxel i carries data */
    public boolean isTrusted(int i) {
        return untrusted == null || !untrusted[i];
    }

    /** @return the normalised residuals of the trusted voxels, in voxel order */
    public float[] trustedValues() {
        float[] v = normalised.data();
        if (untrusted == null) {
            return v.clone();
        }
        float[] out = new float[(int) trusted];
        int k = 0;
        for (int i = 0; i < v.length; i++) {
            if (!untrusted[i]) {
                out[k++] = v[i];
            }
        }
        return out;
    }

    private static void check(Volume data, Volume estimate, Volume psf) {
        if (!data.sameShape(estimate)) {
            throw new IllegalArgumentException("estimate is " + estimate.shape() + " but input is " + data.shape()
                    + "; give the estimate made from this input (same size)");
        }
        if (estimate.countNonFinite() > 0) {
            throw new IllegalArgumentException("estimate has " + estimate.countNonFinite() + " NaN or infinite voxels; allowed: finite values only");
        }
        checkPsf(psf, data);
    }

    /** Checks a PSF for the residual view: odd sizes, finite, positive sum, the data's voxel size. */
    static void checkPsf(Volume psf, Volume data) {
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
     * Per-plane mean of r^2 and of r over trusted voxels, plane by plane in a fixed order (deterministic).
     *
     * @param r normalised residuals, not modified
     * @param untrusted voxels to leave out, or null
     * @param chi2Slice receives the mean of r^2 of each plane (NaN without trusted voxels)
     * @param meanSlice receives the mean of r of each plane
     * @return {sum of r^2, sum of r, trusted count} over all planes
     */
    private static double[] planeSums(float[] r, boolean[] untrusted, int plane, int nz, double[] chi2Slice,
            double[] meanSlice) {
        double chi2 = 0;
        double mean = 0;
        long count = 0;
        for (int z = 0; z < nz; z++) {
            double s1 = 0;
            double s2 = 0;
            int m = 0;
            for (int i = z * plane, e = i + plane; i < e; i++) {
                if (untrusted == null || !untrusted[i]) {
                    s1 += r[i];
                    s2 += (double) r[i] * r[i];
                    m++;
                }
            }
            chi2Slice[z] = m > 0 ? s2 / m : Double.NaN;
            meanSlice[z] = m > 0 ? s1 / m : Double.NaN;
            chi2 += s2;
            mean += s1;
            count += m;
        }
        return new double[] {chi2, mean, count};
    }
}
