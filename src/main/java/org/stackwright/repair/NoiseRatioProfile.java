package org.stackwright.repair;

import org.stackwright.volume.Volume;

/**
 * How noisy each column and each row of an image is, relative to the noise expected for its signal: the profiles
 * in which the blend bands of a stitched mosaic show as dips ({@link BlendBands}).
 *
 * <p>Every pixel whose two neighbours on either side along its line are measured (no zero of a gap among the five)
 * gives a residual d = pixel minus (4 (p[-1] + p[+1]) - (p[-2] + p[+2])) / 6, the fourth difference along the line
 * (signal up to a cubic along the line cancels, white noise of variance s^2 leaves 35/18 s^2, and only the line's own
 * pixels enter, so the profile across the lines is not smoothed), and a level, the mean of those four neighbours.
 * The residual of the discrete Laplacian (pixel minus the mean of its four neighbours) was used before: it leaves the
 * curvature of the specimen's cells and puncta in the residual, which varies from line to line and moved the fitted
 * band centres by 0.8-1.2 px rms on the invented mosaics (0.44 on a flat specimen; the second difference along the line: 0.8-0.9); the fourth difference along the
 * line gives 0.45-0.54 px on both, and the tile step came out exact on many more draws (README, repair). Without a
 * prediction the ratio of a line is the mean of that along the line and that of the fourth difference across the
 * lines (see {@link #across}), which halves the variance's noise less a shared part. The noise
 * expected at each level is measured over the whole image (a curve of the residual variance
 * against the level, {@link LevelCurve}), so photon noise that grows with the signal and the tile shading are
 * divided out: z = |d| / sigma(level). The ratio of a column is a trimmed mean of its z^2
 * (the smallest {@link #KEPT}), which ignores the minority of pixels on the specimen's edges, whose residual is
 * structure, not noise. The profile is divided by its median, so 1 is the noise of one exposure and 0.5 about the
 * noise of the mean of two.
 *
 * <p>When a smoothing or interpolation made neighbouring pixels share their noise ({@link NoisePredictor#correlated}),
 * the neighbours along the line cancel most of it and the residual is mostly the specimen's: the residual is then the
 * error of the prediction {@link NoisePredictor} fits to the image, a linear filter that keeps the dip. Noise
 * smoothed beyond what that prediction reaches ({@link NoisePredictor#TOO_SMOOTH}) gives no profile.
 */
final class NoiseRatioProfile {

    /**
     * share of the smallest z^2 of a line whose mean is its ratio: a trimmed mean, proportional to the noise variance
     * like the plain mean, that leaves out the specimen's edges (their residual is structure) and uses more of the
     * pixels than a median
     */
    static final double KEPT = 0.85;
    /** pixels used for the fit of the noise against the level */
    static final int FIT_SAMPLES = 200_000;
    /** level classes of that fit */
    static final int FIT_CLASSES = 32;

    /** the ratio of each column (x) and of each row (y); NaN where no pixel was measured */
    final double[] columns;
    final double[] rows;

    private NoiseRatioProfile(double[] columns, double[] rows) {
        this.columns = columns;
        this.rows = rows;
    }

    /**
     * @param image the image or stack (all planes pooled), not modified
     * @return the profiles, or null when the image is too small or shows no noise
     */
    static NoiseRatioProfile of(Volume image) {
        double correlation = NoisePredictor.correlation(image);
        if (correlation >= NoisePredictor.TOO_SMOOTH) {
            return null;
        }
        return of(image, correlation >= NoisePredictor.CORRELATED ? NoisePredictor.fit(image) : null);
    }

    /**
     * @param pred the prediction whose error is the residual; null for the fourth difference along the line
     * @return the profiles, or null when the image is too small or shows no noise
     */
    static NoiseRatioProfile of(Volume image, NoisePredictor pred) {
        int reach = pred == null ? 2 : NoisePredictor.REACH;
        if (image.width() < 2 * reach + 1 || image.height() < 2 * reach + 1) {
            return null;
        }
        double[] cols = along(image, true, pred, false);
        double[] rws = along(image, false, pred, false);
        if (cols == null || rws == null || !normalise(cols) || !normalise(rws)) {
            return null;
        }
        if (pred == null) {
            // the same pixels' noise once more, from the fourth difference across the lines
            across(cols, along(image, true, null, true));
            across(rws, along(image, false, null, true));
        }
        return new NoiseRatioProfile(cols, rws);
    }

    /**
     * Averages the ratio from the residuals across the lines into that along them (both normalised): a pixel's two
     * residuals share only the pixel itself (correlation 18/35 between them, 0.26 between their squares), so the mean
     * of the two has about 0.63 of the variance of one. Across the lines the residual also holds the neighbouring
     * lines' noise (weights 16/70 at one line, 1/70 at two), a blur of the dip by about a pixel that moves no band's
     * centre. Measured with the known band width on crop-tune-d-blend and crop-tune2-d-blend (40 draws, 160 bands):
     * the fitted band centres 0.46 px rms from the truth with the residual along the line, 0.35 with both.
     *
     * @param ratio the ratio along the lines, normalised; modified
     * @param cross the ratio from the residual across the lines, not normalised (NaN at the two lines of each end);
     *     null when there is none
     */
    private static void across(double[] ratio, double[] cross) {
        if (cross == null || !normalise(cross)) {
            return;
        }
        for (int i = 0; i < ratio.length; i++) {
            if (Double.isFinite(ratio[i]) && Double.isFinite(cross[i])) {
                ratio[i] = 0.5 * (ratio[i] + cross[i]);
            }
        }
    }

    /**
     * @param columns true for the ratio of each column, false for each row
     * @param cross the fourth difference across the lines (x for a column) instead of along them; pred must be null
     * @return the ratio per line, not yet normalised; null when too few pixels were measured
     */
    private static double[] along(Volume image, boolean columns, NoisePredictor pred, boolean cross) {
        int w = image.width();
        int h = image.height();
        int d = image.depth();
        float[] v = image.data();
        int plane = w * h;
        // residual and level of every measured pixel, line by line (the line's pixels contiguous)
        int lines = columns ? w : h;
        int along = columns ? h : w;
        float[] level = new float[lines * along * d];
        float[] residual = new float[level.length];
        int[] count = new int[lines];
        int n = 0;
        int next = columns ? w : 1;
        // the residual's step: along the line, or across it (then its two lines at each end have none)
        int step = cross ? (columns ? 1 : w) : next;
        int skip = cross ? 0 : 2;
        for (int line = 0; line < lines; line++) {
            int base = line * along * d;
            int m = 0;
            for (int z = 0; z < d && (!cross || line >= 2 && line < lines - 2); z++) {
                int first = z * plane + (columns ? line : line * w);
                for (int t = skip; t < along - skip; t++) {
                    int p = first + t * next;
                    if (pred != null) {
                        int q = columns ? line : t;
                        int r = columns ? t : line;
                        if (q < NoisePredictor.REACH || q >= w - NoisePredictor.REACH || r < NoisePredictor.REACH
                                || r >= h - NoisePredictor.REACH || !pred.measured(v, p, w)) {
                            continue;
                        }
                        level[base + m] = 0.25f * (v[p - 1] + v[p + 1] + v[p - w] + v[p + w]);
                        residual[base + m] = (float) pred.residual(v, p, w);
                        m++;
                        continue;
                    }
                    float c = v[p];
                    float u1 = v[p - step];
                    float d1 = v[p + step];
                    float u2 = v[p - 2 * step];
                    float d2 = v[p + 2 * step];
                    if (c == 0 || u1 == 0 || d1 == 0 || u2 == 0 || d2 == 0) {
                        continue;
                    }
                    level[base + m] = 0.25f * (u1 + d1 + u2 + d2);
                    residual[base + m] = c - (4 * (u1 + d1) - (u2 + d2)) / 6f;
                    m++;
                }
            }
            count[line] = m;
            n += m;
        }
        if (n < 100) {
            return null;
        }
        // the fit samples every line's measured pixels: pack them
        float[] fitLevel = new float[n];
        float[] fitResidual = new float[n];
        int k = 0;
        for (int line = 0; line < lines; line++) {
            System.arraycopy(level, line * along * d, fitLevel, k, count[line]);
            System.arraycopy(residual, line * along * d, fitResidual, k, count[line]);
            k += count[line];
        }
        LevelCurve noise = LevelCurve.of(fitLevel, fitResidual, n);
        double[] out = new double[lines];
        double[] buf = new double[along * d];
        for (int line = 0; line < lines; line++) {
            int base = line * along * d;
            for (int i = 0; i < count[line]; i++) {
                buf[i] = Math.abs(residual[base + i]) / Math.sqrt(noise.variance(level[base + i]));
            }
            out[line] = ratio(buf, count[line]);
        }
        return out;
    }

    /**
     * The residual variance expected at each level, measured rather than modelled: the measured pixels are put into
     * {@link #FIT_CLASSES} classes of equal count by level, each class gets the same trimmed mean of squares as a line
     * (so a line of ordinary noise has ratio 1 whatever its level), and the variance between the classes' mean levels
     * is interpolated linearly (held at the ends). No model of the camera is assumed: a straight line of variance
     * against level (Poisson-Gaussian) misses the darkest and brightest levels by enough to make bright or dark rows
     * look like bands.
     */
    private record LevelCurve(double[] levels, double[] variances) {

        static LevelCurve of(float[] level, float[] residual, int n) {
            int stride = Math.max(1, n / FIT_SAMPLES);
            int ns = (n + stride - 1) / stride;
            long[] order = new long[ns];
            for (int s = 0; s < ns; s++) {
                // sort by level, keeping the index: the level's bits are ordered for positive and negative floats alike
                int bits = Float.floatToIntBits(level[s * stride]);
                int key = bits >= 0 ? bits : bits ^ 0x7fffffff;
                order[s] = ((long) key << 32) | (s * stride & 0xffffffffL);
            }
            java.util.Arrays.sort(order);
            double[] lv = new double[FIT_CLASSES];
            double[] var = new double[FIT_CLASSES];
            double[] buf = new double[ns / FIT_CLASSES + 1];
            for (int c = 0; c < FIT_CLASSES; c++) {
                int a = (int) ((long) c * ns / FIT_CLASSES);
                int b = (int) ((long) (c + 1) * ns / FIT_CLASSES);
                double sum = 0;
                for (int i = a; i < b; i++) {
                    int p = (int) order[i];
                    sum += level[p];
                    buf[i - a] = Math.abs(residual[p]);
                }
                lv[c] = sum / Math.max(1, b - a);
                var[c] = Math.max(1e-12, ratio(buf, b - a));
            }
            return new LevelCurve(lv, var);
        }

        double variance(double l) {
            if (l <= levels[0]) {
                return variances[0];
            }
            for (int c = 1; c < levels.length; c++) {
                if (l <= levels[c]) {
                    double t = levels[c] > levels[c - 1] ? (l - levels[c - 1]) / (levels[c] - levels[c - 1]) : 1;
                    return variances[c - 1] + t * (variances[c] - variances[c - 1]);
                }
            }
            return variances[levels.length - 1];
        }
    }

    /**
     * @return the variance ratio of one line: the mean of the smallest {@link #KEPT} of its z^2 (NaN with fewer than
     *     8 pixels); the values are reordered
     */
    private static double ratio(double[] absZ, int m) {
        if (m < 8) {
            return Double.NaN;
        }
        java.util.Arrays.sort(absZ, 0, m);
        int k = Math.max(1, (int) (KEPT * m));
        double sum = 0;
        for (int i = 0; i < k; i++) {
            sum += absZ[i] * absZ[i];
        }
        return sum / k;
    }

    /** Divides the measured entries by their median; @return false when there is nothing to divide by */
    private static boolean normalise(double[] p) {
        double[] ok = new double[p.length];
        int m = 0;
        for (double q : p) {
            if (Double.isFinite(q)) {
                ok[m++] = q;
            }
        }
        double med = m > 0 ? RobustStats.median(ok, m) : 0;
        if (!(med > 0)) {
            return false;
        }
        for (int i = 0; i < p.length; i++) {
            p[i] /= med;
        }
        return true;
    }
}
