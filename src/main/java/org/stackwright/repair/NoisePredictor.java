package org.stackwright.repair;

import org.apache.commons.math3.linear.Array2DRowRealMatrix;
import org.apache.commons.math3.linear.ArrayRealVector;
import org.apache.commons.math3.linear.LUDecomposition;
import org.apache.commons.math3.linear.RealVector;
import org.stackwright.volume.Volume;

/**
 * The prediction of every pixel from its neighbours whose error is the noise {@link NoiseRatioProfile} measures:
 * pixel minus a weighted mean of the pixels within {@link #REACH} (weights summing to 1, so any level cancels).
 * Fitted per image by trimmed least squares, the weights make the residual as small as the image allows: structure
 * that the neighbours predict drops out, and noise that a linear filter spread over neighbouring pixels (smoothing,
 * interpolation) is predicted in part, leaving its innovation. A linear filter maps the noise variance of every
 * pixel to a weighted sum of its sources' variances, so a band where two exposures are averaged keeps its dip in
 * the residual (Bevington &amp; Robinson 2003, ch. 3, propagation of errors).
 */
final class NoisePredictor {

    /** the farthest neighbour used, pixels along each axis */
    static final int REACH = 3;
    /** pixels used for the fit */
    static final int SAMPLES = 200_000;
    /** share of the smallest residuals the fit is made on (the specimen's edges left out), and its rounds */
    static final double KEPT = 0.85;
    static final int ROUNDS = 3;
    /** one of each pair of opposite neighbours within the reach; the pair shares a weight */
    private static final int[][] PAIRS = pairs();

    /** @return the half of the neighbours within the reach (the first two: {1, 0} and {0, 1}) */
    private static int[][] pairs() {
        java.util.List<int[]> l = new java.util.ArrayList<>();
        l.add(new int[] {1, 0});
        l.add(new int[] {0, 1});
        for (int y = 0; y <= REACH; y++) {
            for (int x = -REACH; x <= REACH; x++) {
                boolean half = y > 0 || x > 0;
                if (half && !(x == 1 && y == 0) && !(x == 0 && y == 1)) {
                    l.add(new int[] {x, y});
                }
            }
        }
        return l.toArray(new int[0][]);
    }

    /** the neighbours' offsets and weights */
    final int[] dx;
    final int[] dy;
    final double[] weight;

    private NoisePredictor(double[] pairWeights) {
        dx = new int[2 * PAIRS.length];
        dy = new int[dx.length];
        weight = new double[dx.length];
        for (int k = 0; k < PAIRS.length; k++) {
            dx[2 * k] = PAIRS[k][0];
            dy[2 * k] = PAIRS[k][1];
            dx[2 * k + 1] = -PAIRS[k][0];
            dy[2 * k + 1] = -PAIRS[k][1];
            weight[2 * k] = 0.5 * pairWeights[k];
            weight[2 * k + 1] = 0.5 * pairWeights[k];
        }
    }

    /** @return pixel p minus its prediction */
    double residual(float[] v, int p, int w) {
        double s = 0;
        for (int i = 0; i < dx.length; i++) {
            s += weight[i] * v[p + dy[i] * w + dx[i]];
        }
        return v[p] - s;
    }

    /** @return whether pixel p and all its neighbours are measured (none is a zero of a gap) */
    boolean measured(float[] v, int p, int w) {
        if (v[p] == 0) {
            return false;
        }
        for (int i = 0; i < dx.length; i++) {
            if (v[p + dy[i] * w + dx[i]] == 0) {
                return false;
            }
        }
        return true;
    }

    /**
     * Whether the noise is correlated across neighbouring pixels: the residual "pixel minus the mean of its four
     * neighbours at distance 2" then has clearly more variance than the same residual at distance 1, which cancels
     * much of a noise that neighbours share. For independent noise both have 1.25 times the pixel variance (plus what
     * the specimen adds, more at distance 2: the ratio measured 1.15-1.22 on the invented mosaics without
     * smoothing, 1.8-12 with smoothing or sub-pixel interpolation). The variances are trimmed means of the squared
     * residuals (the smallest half, the specimen's edges left out).
     *
     * @param image the image or stack (all planes pooled), not modified
     */
    static boolean correlated(Volume image) {
        return correlation(image) >= CORRELATED;
    }

    /** @return the ratio of the residual variances at distance 2 and 1 (0 when the image is too small) */
    static double correlation(Volume image) {
        double v1 = trimmedVariance(image, 1);
        double v2 = trimmedVariance(image, 2);
        return v1 > 0 ? v2 / v1 : 0;
    }

    /** the ratio of the residual variances at distance 2 and 1 above which the noise counts as correlated */
    static final double CORRELATED = 1.5;
    /**
     * and above which it is smoothed beyond what a prediction within {@link #REACH} can see through: measured 4.3
     * for a Gaussian of sigma 0.7 px, 7.6-7.8 for sigma 1, 8.1-8.5 for sigma 1.5 stored as whole numbers and 11.5-11.7
     * without (where the prediction's residual is mostly the specimen's and false bands appeared)
     */
    static final double TOO_SMOOTH = 10;

    /** @return the mean of the smallest half of the squared residuals "pixel minus its 4 neighbours at this lag" */
    private static double trimmedVariance(Volume image, int lag) {
        int w = image.width();
        int h = image.height();
        int plane = w * h;
        float[] v = image.data();
        long inner = (long) Math.max(0, w - 2 * lag) * Math.max(0, h - 2 * lag) * image.depth();
        if (inner < 100) {
            return 0;
        }
        int stride = (int) Math.max(1, inner / SAMPLES);
        double[] sq = new double[(int) (inner / stride) + 1];
        int m = 0;
        long i = 0;
        for (int z = 0; z < image.depth(); z++) {
            for (int r = lag; r < h - lag; r++) {
                for (int q = lag; q < w - lag; q++, i++) {
                    int p = z * plane + r * w + q;
                    if (i % stride != 0 || m >= sq.length) {
                        continue;
                    }
                    float c = v[p];
                    float a = v[p - lag];
                    float b = v[p + lag];
                    float e = v[p - lag * w];
                    float f = v[p + lag * w];
                    if (c == 0 || a == 0 || b == 0 || e == 0 || f == 0) {
                        continue;
                    }
                    double d = c - 0.25 * (a + b + e + f);
                    sq[m++] = d * d;
                }
            }
        }
        if (m < 100) {
            return 0;
        }
        java.util.Arrays.sort(sq, 0, m);
        double sum = 0;
        for (int k = 0; k < m / 2; k++) {
            sum += sq[k];
        }
        return sum / (m / 2);
    }

    /**
     * @param image the image or stack (all planes pooled), not modified
     * @return the fitted predictor, or null when the image is too small
     */
    static NoisePredictor fit(Volume image) {
        int w = image.width();
        int h = image.height();
        int plane = w * h;
        float[] v = image.data();
        long inner = (long) Math.max(0, w - 2 * REACH) * Math.max(0, h - 2 * REACH) * image.depth();
        if (inner < 1000) {
            return null;
        }
        int stride = (int) Math.max(1, inner / SAMPLES);
        int free = PAIRS.length - 1;
        // y = pixel - mean of its 4 neighbours; x_k = mean of pair k - that mean (pair 1, {0, 1}, left out: the
        // weights sum to 1)
        int ns = (int) (inner / stride) + 1;
        double[] y = new double[ns];
        double[][] x = new double[ns][free];
        NoisePredictor probe = new NoisePredictor(new double[PAIRS.length]);
        int m = 0;
        long i = 0;
        for (int z = 0; z < image.depth(); z++) {
            for (int r = REACH; r < h - REACH; r++) {
                for (int q = REACH; q < w - REACH; q++, i++) {
                    int p = z * plane + r * w + q;
                    if (i % stride != 0 || m >= ns || !probe.measured(v, p, w)) {
                        continue;
                    }
                    double m4 = 0.25 * (v[p - 1] + v[p + 1] + v[p - w] + v[p + w]);
                    y[m] = v[p] - m4;
                    for (int k = 0, j = 0; k < PAIRS.length; k++) {
                        if (k == 1) {
                            continue;
                        }
                        int o = PAIRS[k][1] * w + PAIRS[k][0];
                        x[m][j++] = 0.5 * (v[p + o] + v[p - o]) - m4;
                    }
                    m++;
                }
            }
        }
        if (m < 10 * free) {
            return null;
        }
        double[] b = new double[free];
        double[] res = new double[m];
        for (int round = 0; round < ROUNDS; round++) {
            for (int s = 0; s < m; s++) {
                double pr = 0;
                for (int j = 0; j < free; j++) {
                    pr += b[j] * x[s][j];
                }
                res[s] = Math.abs(y[s] - pr);
            }
            double[] sorted = java.util.Arrays.copyOf(res, m);
            java.util.Arrays.sort(sorted);
            double limit = sorted[Math.min(m - 1, (int) (KEPT * m))];
            double[][] a = new double[free][free];
            double[] c = new double[free];
            for (int s = 0; s < m; s++) {
                if (res[s] > limit) {
                    continue;
                }
                for (int j = 0; j < free; j++) {
                    c[j] += x[s][j] * y[s];
                    for (int l = 0; l <= j; l++) {
                        a[j][l] += x[s][j] * x[s][l];
                    }
                }
            }
            for (int j = 0; j < free; j++) {
                for (int l = j + 1; l < free; l++) {
                    a[j][l] = a[l][j];
                }
            }
            LUDecomposition lu = new LUDecomposition(new Array2DRowRealMatrix(a, false));
            if (!lu.getSolver().isNonSingular()) {
                return null;
            }
            RealVector sol = lu.getSolver().solve(new ArrayRealVector(c, false));
            b = sol.toArray();
        }
        // back to one weight per pair: prediction = (1 - sum b) m4 + sum_k b_k m_k, m4 = (m_0 + m_1) / 2
        double sum = 0;
        for (double bj : b) {
            sum += bj;
        }
        double[] pw = new double[PAIRS.length];
        for (int k = 0, j = 0; k < PAIRS.length; k++) {
            pw[k] = k == 1 ? 0 : b[j++];
        }
        pw[0] += 0.5 * (1 - sum);
        pw[1] += 0.5 * (1 - sum);
        return new NoisePredictor(pw);
    }

    @Override
    public String toString() {
        StringBuilder s = new StringBuilder("prediction weights");
        for (int k = 0; k < PAIRS.length; k++) {
            s.append(String.format(java.util.Locale.ROOT, " (%d,%d) %.3f", PAIRS[k][0], PAIRS[k][1], 2 * weight[2 * k]));
        }
        return s.toString();
    }
}
