package org.stackwright.inspect;

import java.util.Locale;

import org.stackwright.volume.Volume;

/**
 * Metrics of an image against a reference (ground truth or a reference acquisition), all with an explicit data
 * range: NRMSE, PSNR, SSIM and the Pearson correlation. Definitions follow scikit-image 0.19 so that results can
 * be compared with it (checked in the tests against committed reference values):
 * <ul>
 * <li>NRMSE = ||ref - img|| / ||ref|| ("euclidean"; also by the reference's min-max range and by its mean)</li>
 * <li>PSNR = 10 log10(L^2 / MSE), L the data range</li>
 * <li>SSIM: Wang, Bovik, Sheikh & Simoncelli, "Image quality assessment: from error visibility to structural
 *     similarity", IEEE TIP 13(4):600-612, 2004, with a Gaussian window (see {@link Ssim})</li>
 * <li>Pearson correlation coefficient of the voxel values</li>
 * </ul>
 *
 * @param nrmse NRMSE normalised by the reference's Euclidean norm
 * @param nrmseMinMax NRMSE normalised by the reference's range (max - min)
 * @param nrmseMean NRMSE normalised by the reference's mean
 * @param psnr PSNR in dB
 * @param ssim mean SSIM
 * @param pearson Pearson correlation
 * @param dataRange the data range L used for PSNR and SSIM
 * @param mse mean squared error
 */
public record QualityMetrics(double nrmse, double nrmseMinMax, double nrmseMean, double psnr, double ssim,
        double pearson, double dataRange, double mse) {

    /**
     * @param reference the reference, not modified
     * @param image the image to rate, same shape, not modified
     * @param dataRange L for PSNR and SSIM; NaN for the reference's max - min (scikit-image needs it explicit
     *     for float data; we make the same choice visible in the record)
     * @throws IllegalArgumentException naming the input when shapes differ, values are not finite or the range is
     *     not positive
     */
    public static QualityMetrics of(Volume reference, Volume image, double dataRange) {
        if (!reference.sameShape(image)) {
            throw new IllegalArgumentException("input is " + image.shape() + " but reference is " + reference.shape()
                    + "; the images must have the same size");
        }
        if (reference.countNonFinite() > 0 || image.countNonFinite() > 0) {
            throw new IllegalArgumentException("reference and input must hold finite values only (NaN or infinite"
                    + " voxels found)");
        }
        float[] r = reference.data();
        float[] x = image.data();
        int n = r.length;
        double min = Double.POSITIVE_INFINITY;
        double max = Double.NEGATIVE_INFINITY;
        double sr = 0;
        double sx = 0;
        double srr = 0;
        double se = 0;
        for (int i = 0; i < n; i++) {
            double a = r[i];
            double b = x[i];
            min = Math.min(min, a);
            max = Math.max(max, a);
            sr += a;
            sx += b;
            srr += a * a;
            se += (a - b) * (a - b);
        }
        double mr = sr / n;
        double mx = sx / n;
        double cov = 0;
        double vr = 0;
        double vx = 0;
        for (int i = 0; i < n; i++) {
            double a = r[i] - mr;
            double b = x[i] - mx;
            cov += a * b;
            vr += a * a;
            vx += b * b;
        }
        double range = Double.isNaN(dataRange) ? max - min : dataRange;
        if (!(range > 0) || !Double.isFinite(range)) {
            throw new IllegalArgumentException(String.format(Locale.ROOT, "data-range = %s is not allowed: give a"
                    + " positive number (the reference is constant, so its own range is 0)", range));
        }
        double mse = se / n;
        double rmse = Math.sqrt(mse);
        double nrmse = rmse / Math.sqrt(srr / n);
        double nrmseMinMax = rmse / (max - min);
        double nrmseMean = rmse / mr;
        double psnr = 10 * Math.log10(range * range / mse);
        double pearson = cov / Math.sqrt(vr * vx);
        double ssim = Ssim.mean(reference, image, range);
        return new QualityMetrics(nrmse, nrmseMinMax, nrmseMean, psnr, ssim, pearson, range, mse);
    }
}
