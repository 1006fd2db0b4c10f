package org.stackwright.repair;

import java.util.Arrays;

/**
 * Median and median absolute deviation (MAD). The MAD times 1.4826 estimates the standard deviation of normally
 * distributed data and ignores a minority of outliers (Hampel, "The influence curve and its role in robust
 * estimation", J. Am. Stat. Assoc. 69:383-393, 1974; the factor is 1 / Phi^-1(3/4)).
 */
final class RobustStats {

    /** 1 / Phi^-1(3/4): makes the MAD a consistent estimate of a normal standard deviation */
    static final double MAD_TO_SIGMA = 1.4826;

    private RobustStats() {
    }

    /** @return the median of the first n values (the array is not modified) */
    static double median(double[] v, int n) {
        if (n == 0) {
            return Double.NaN;
        }
        double[] c = Arrays.copyOf(v, n);
        Arrays.sort(c);
        return n % 2 == 1 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    }

    /** @return median and robust sigma (1.4826 MAD) of the first n values, not modified */
    static double[] medianSigma(double[] v, int n) {
        double med = median(v, n);
        double[] dev = new double[n];
        for (int i = 0; i < n; i++) {
            dev[i] = Math.abs(v[i] - med);
        }
        return new double[] {med, MAD_TO_SIGMA * median(dev, n)};
    }

    /** Median of the first m values; sorts them in place (insertion sort, allocation free: for small m). */
    static double medianInPlace(double[] a, int m) {
        for (int i = 1; i < m; i++) {
            double t = a[i];
            int j = i - 1;
            while (j >= 0 && a[j] > t) {
                a[j + 1] = a[j];
                j--;
            }
            a[j + 1] = t;
        }
        return m % 2 == 1 ? a[m / 2] : 0.5 * (a[m / 2 - 1] + a[m / 2]);
    }

    /** tuning constant of the biweight, in units of the MAD (Mosteller &amp; Tukey 1977: 6 to 9) */
    static final double BIWEIGHT_C = 6;

    /**
     * Tukey's biweight location of the first n values (not modified): a weighted mean whose weights (1 - u^2)^2,
     * u = (x - m) / (c MAD), fall to zero for values more than c MADs from the estimate m, iterated from the median.
     * Unlike the median it uses every value of the central bulk, so it keeps its centre when a minority of outliers
     * lies on one side, where the median is pushed into the bulk's tail (Mosteller &amp; Tukey, "Data Analysis and
     * Regression", Addison-Wesley 1977, ch. 10; Beaton &amp; Tukey, "The fitting of power series, meaning
     * polynomials, illustrated on band-spectroscopic data", Technometrics 16:147-185, 1974).
     */
    static double biweight(double[] v, int n) {
        double m = median(v, n);
        double[] dev = new double[n];
        for (int i = 0; i < n; i++) {
            dev[i] = Math.abs(v[i] - m);
        }
        double scale = BIWEIGHT_C * median(dev, n);
        return recentred(v, n, m, centre -> scale);
    }

    /**
     * Tukey's biweight iterated from the centre m until it settles (at most 50 steps): each step the weighted mean
     * with weights (1 - u^2)^2, u = (x - m) / scale, scale given by scaleAt(m).
     *
     * @return the settled centre; m itself when the scale is not positive
     */
    private static double recentred(double[] v, int n, double m, java.util.function.DoubleUnaryOperator scaleAt) {
        for (int it = 0; it < 50; it++) {
            double scale = scaleAt.applyAsDouble(m);
            if (!(scale > 0)) {
                return m;
            }
            double sw = 0;
            double swx = 0;
            for (int i = 0; i < n; i++) {
                double u = (v[i] - m) / scale;
                if (Math.abs(u) < 1) {
                    double wgt = (1 - u * u) * (1 - u * u);
                    sw += wgt;
                    swx += wgt * v[i];
                }
            }
            double next = swx / sw;
            if (Math.abs(next - m) < 1e-9 * scale) {
                return next;
            }
            m = next;
        }
        return m;
    }

    /** tuning constant of {@link #background}, in units of the lower half's median deviation */
    static final double BACKGROUND_C = 4;

    /**
     * The level of the background under a specimen that only adds to it (cells, spots and fibres brighter than the
     * background): Tukey's biweight centred on the half-sample mode, its scale taken from the values below the
     * centre only (the background's own spread: a bright specimen widens the upper side alone), recentred until it
     * settles. Where the median and a plain biweight move with the amount of specimen (by several per cent between
     * tiles of one mosaic), this stays on the background. Half-sample mode: Bickel &amp; Fruehwirth, "On a fast,
     * robust estimator of the mode", Comput. Stat. Data Anal. 50:3500-3530, 2006; the lower-half scale is common
     * practice for backgrounds, no single source.
     *
     * @return the background level of the first n values (not modified); NaN when n is 0
     */
    static double background(double[] v, int n) {
        if (n < 3) {
            return median(v, n);
        }
        double[] d = new double[n];
        return recentred(v, n, halfSampleMode(v, n), centre -> {
            int k = 0;
            for (int i = 0; i < n; i++) {
                if (v[i] < centre) {
                    d[k++] = centre - v[i];
                }
            }
            return BACKGROUND_C * median(d, k);
        });
    }

    /**
     * Half-sample mode (Bickel &amp; Fruehwirth 2006, section 2): of the sorted values keep the shortest run holding
     * half of them, repeatedly, until at most three are left; their middle (the mean of the closer two of three).
     *
     * @return the mode of the first n values (not modified)
     */
    static double halfSampleMode(double[] v, int n) {
        double[] a = Arrays.copyOf(v, n);
        Arrays.sort(a);
        int lo = 0;
        int len = n;
        while (len > 3) {
            int h = (len + 1) / 2;
            int best = lo;
            double width = Double.POSITIVE_INFINITY;
            for (int i = lo; i + h <= lo + len; i++) {
                if (a[i + h - 1] - a[i] < width) {
                    width = a[i + h - 1] - a[i];
                    best = i;
                }
            }
            lo = best;
            len = h;
        }
        if (len == 3) {
            double left = a[lo + 1] - a[lo];
            double right = a[lo + 2] - a[lo + 1];
            return left < right ? 0.5 * (a[lo] + a[lo + 1]) : right < left ? 0.5 * (a[lo + 1] + a[lo + 2]) : a[lo + 1];
        }
        return len == 2 ? 0.5 * (a[lo] + a[lo + 1]) : a[lo];
    }

    /** Median of 9 values (sorted in place; the array is modified). */
    static float median9(float[] a) {
        // partial selection: the 5 smallest in order, the 5th is the median
        for (int i = 0; i < 5; i++) {
            int best = i;
            for (int j = i + 1; j < 9; j++) {
                if (a[j] < a[best]) {
                    best = j;
                }
            }
            float t = a[i];
            a[i] = a[best];
            a[best] = t;
        }
        return a[4];
    }
}
