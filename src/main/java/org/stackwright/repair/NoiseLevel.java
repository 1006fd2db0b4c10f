package org.stackwright.repair;

import java.util.Arrays;

/**
 * The noise of one image as a function of the local level, variance = a + b * level (the Poisson-Gaussian camera
 * model: photon noise proportional to the signal plus constant read noise; common practice, REFERENCES.md).
 * Fitted from the image itself: pixels are put into classes of equal size by their local level (3x3 median),
 * each class gets a robust sigma of its residuals (1.4826 MAD; Hampel 1974), and a straight line is fitted to
 * (level, sigma^2) by least squares. When the fit is not increasing (data that are not photon counts), the
 * largest class sigma is used for every level, which is conservative.
 */
final class NoiseLevel {

    private final double a;
    private final double b;
    private final double floor;
    private final double minSigma;

    private NoiseLevel(double a, double b, double floor, double minSigma) {
        this.a = a;
        this.b = b;
        this.floor = floor;
        this.minSigma = minSigma;
    }

    /**
     * @param level local level per pixel (3x3 median), not modified
     * @param residual pixel minus level, not modified
     * @param n pixels
     * @param samples at most this many pixels are used (a fixed stride: deterministic)
     * @param classes number of level classes
     */
    static NoiseLevel fit(float[] level, float[] residual, int n, int samples, int classes) {
        int stride = Math.max(1, n / samples);
        int ns = (n + stride - 1) / stride;
        float[] lv = new float[ns];
        for (int s = 0; s < ns; s++) {
            lv[s] = level[s * stride];
        }
        float[] sorted = lv.clone();
        Arrays.sort(sorted);
        double floor = sorted[Math.min(ns - 1, ns / 100)];
        double[] cx = new double[classes];
        double[] cy = new double[classes];
        double largest = 0;
        double[] vals = new double[ns];
        int used = 0;
        for (int c = 0; c < classes; c++) {
            double lo = sorted[(int) ((long) c * ns / classes)];
            double hi = c == classes - 1 ? Double.POSITIVE_INFINITY : sorted[(int) ((long) (c + 1) * ns / classes)];
            int m = 0;
            double sumLevel = 0;
            for (int s = 0; s < ns; s++) {
                if (lv[s] >= lo && (lv[s] < hi || (c == classes - 1))) {
                    vals[m++] = residual[s * stride];
                    sumLevel += lv[s];
                }
            }
            if (m < 10) {
                continue;
            }
            double sigma = RobustStats.medianSigma(vals, m)[1];
            cx[used] = sumLevel / m;
            cy[used] = sigma * sigma;
            used++;
            largest = Math.max(largest, sigma);
        }
        double minSigma = Math.max(1e-3 * largest, Float.MIN_NORMAL);
        if (used >= 2) {
            double mx = 0;
            double my = 0;
            for (int c = 0; c < used; c++) {
                mx += cx[c];
                my += cy[c];
            }
            mx /= used;
            my /= used;
            double sxy = 0;
            double sxx = 0;
            for (int c = 0; c < used; c++) {
                sxy += (cx[c] - mx) * (cy[c] - my);
                sxx += (cx[c] - mx) * (cx[c] - mx);
            }
            double slope = sxx > 0 ? sxy / sxx : 0;
            if (slope > 0) {
                return new NoiseLevel(my - slope * mx, slope, floor, minSigma);
            }
        }
        return new NoiseLevel(largest * largest, 0, floor, minSigma);
    }

    /** @return a, b, floor and the smallest sigma: the four numbers that give this noise level back */
    double[] parameters() {
        return new double[] {a, b, floor, minSigma};
    }

    /** @return the noise level of {@link #parameters()} */
    static NoiseLevel of(double[] p) {
        return new NoiseLevel(p[0], p[1], p[2], p[3]);
    }

    /** @return the noise standard deviation at this level */
    double sigma(double level) {
        return Math.max(minSigma, Math.sqrt(Math.max(0, a + b * level)));
    }

    /** @return the dark level of the image: the 1st percentile of the local levels */
    double floor() {
        return floor;
    }
}
