package org.stackwright.imagej;

/** Comparisons of an image with a known truth that do not depend on camera gain and offset. */
final class Fit {

    private Fit() {
    }

    /** Pearson correlation coefficient. */
    static double pearson(float[] a, float[] b) {
        double ma = mean(a);
        double mb = mean(b);
        double sab = 0;
        double saa = 0;
        double sbb = 0;
        for (int i = 0; i < a.length; i++) {
            double x = a[i] - ma;
            double y = b[i] - mb;
            sab += x * y;
            saa += x * x;
            sbb += y * y;
        }
        return sab / Math.sqrt(saa * sbb);
    }

    /**
     * Root-mean-square error between the truth and the least-squares fit g x + c of the image to it, divided by
     * the truth's range (max - min).
     */
    static double nrmseAfterLinearFit(float[] image, float[] truth) {
        double mx = mean(image);
        double my = mean(truth);
        double sxy = 0;
        double sxx = 0;
        for (int i = 0; i < image.length; i++) {
            sxy += (image[i] - mx) * (truth[i] - my);
            sxx += (image[i] - mx) * (image[i] - mx);
        }
        double g = sxy / sxx;
        double c = my - g * mx;
        double se = 0;
        double lo = Double.POSITIVE_INFINITY;
        double hi = Double.NEGATIVE_INFINITY;
        for (int i = 0; i < image.length; i++) {
            double e = truth[i] - (g * image[i] + c);
            se += e * e;
            lo = Math.min(lo, truth[i]);
            hi = Math.max(hi, truth[i]);
        }
        return Math.sqrt(se / image.length) / (hi - lo);
    }

    private static double mean(float[] a) {
        double s = 0;
        for (float v : a) {
            s += v;
        }
        return s / a.length;
    }
}
