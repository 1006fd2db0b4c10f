package org.stackwright.solve;

/**
 * Normalised root-mean-square error against a known truth: ||a - t||_2 / ||t||_2 (for invented specimens, where
 * the truth is known; common practice in deconvolution studies).
 */
public final class Nrmse {

    private Nrmse() {
    }

    /** @return ||a - t|| / ||t|| over all voxels; arrays not modified */
    public static double of(float[] a, float[] truth) {
        return of(a, truth, 0);
    }

    /** @return ||(a - shift) - t|| / ||t||, for camera data compared with the truth (shift = offset + background) */
    public static double of(float[] a, float[] truth, double shift) {
        if (a.length != truth.length) {
            throw new IllegalArgumentException("sizes differ: " + a.length + " and " + truth.length);
        }
        double e = 0;
        double t = 0;
        for (int i = 0; i < a.length; i++) {
            double d = a[i] - shift - truth[i];
            e += d * d;
            t += (double) truth[i] * truth[i];
        }
        return Math.sqrt(e / t);
    }
}
