package org.stackwright.model;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.Volume;

/**
 * Photon transfer from one image: the variance of the camera noise against the mean level, variance = slope * level
 * + intercept, fitted over the smooth parts of the image. For a camera with gain g (ADU per photo-electron), offset o
 * and read noise r the slope is g and the intercept r^2 - g o (Janesick, "Photon Transfer: DN -&gt; lambda", SPIE
 * Press, 2007, ch. 2; one image instead of repeated frames as in Foi, Trimeche, Katkovnik &amp; Egiazarian,
 * "Practical Poissonian-Gaussian noise modeling and fitting for single-image raw-data", IEEE Trans. Image Process.
 * 17(10), 2008).
 *
 * <p><b>How.</b> Every 3 x 3 x 3 block of the image (3 x 3 for images of fewer than 3 planes) gives a noise
 * coefficient d and a level ({@link NoiseCoefficients}: tensor second differences, blind to smooth light, with
 * Var(d) = slope * level + intercept). A block is smooth when no coefficient within 3 voxels exceeds 5 noise
 * standard deviations (points, thin lines and corners fail this). Smooth blocks are sorted by level into bins of
 * equal count; each bin gives a mean level and the mean of d^2 with its standard error; a weighted straight line
 * through the bins is the fit (three rounds, the noise model of each round deciding smoothness in the next; the first
 * from bin medians, which a minority of sharp objects cannot move). Standard errors come from the weighted
 * least-squares covariance, inflated by the scatter of the bins about the line when that exceeds their own errors
 * (common practice). Saturated (clipped) and masked pixels are left out.
 *
 * <p>An electron-multiplying camera multiplies the photon variance by its excess-noise factor F^2 (about 2 at high
 * gain: Robbins &amp; Hadwen, "The noise performance of electron multiplying charge-coupled devices", IEEE Trans.
 * Electron Devices 50(5), 2003), so the slope is then F^2 times the gain: the value the noise model needs.
 */
public final class ImageNoiseFit {

    /** One bin of smooth blocks: mean level (ADU), mean noise variance (ADU^2), its standard error, block count. */
    public record Level(double level, double variance, double standardError, int count) {
    }

    /** A block is not smooth when a coefficient within 3 voxels exceeds this many noise standard deviations. */
    private static final double SMOOTH_SIGMAS = 5;
    /** Median of chi-square with one degree of freedom: median(d^2) / this estimates the variance. */
    private static final double CHI2_1_MEDIAN = 0.454936;
    /** Fewest smooth blocks for a fit. */
    static final int MIN_BLOCKS = 500;

    private final double slope;
    private final double intercept;
    private final double slopeVar;
    private final double interceptVar;
    private final double covariance;
    private final List<Level> levels;
    private final double smoothShare;
    private final int smoothBlocks;
    private final String problem;

    private ImageNoiseFit(double slope, double intercept, double slopeVar, double interceptVar, double covariance,
            List<Level> levels, double smoothShare, int smoothBlocks, String problem) {
        this.slope = slope;
        this.intercept = intercept;
        this.slopeVar = slopeVar;
        this.interceptVar = interceptVar;
        this.covariance = covariance;
        this.levels = List.copyOf(levels);
        this.smoothShare = smoothShare;
        this.smoothBlocks = smoothBlocks;
        this.problem = problem;
    }

    /** @return slope of variance against level: the gain, ADU per photo-electron (times F^2 for EM cameras) */
    public double slope() {
        return slope;
    }

    /** @return intercept of the line at level 0 ADU: read noise^2 - gain * offset, ADU^2 */
    public double intercept() {
        return intercept;
    }

    /** @return standard error of the slope */
    public double slopeError() {
        return Math.sqrt(slopeVar);
    }

    /** @return standard error of the intercept */
    public double interceptError() {
        return Math.sqrt(interceptVar);
    }

    /** @return covariance of slope and intercept */
    public double covariance() {
        return covariance;
    }

    /** @return the binned levels the line was fitted to (for a photon-transfer plot) */
    public List<Level> levels() {
        return levels;
    }

    /** @return share of the image's blocks found smooth, 0 to 1 */
    public double smoothShare() {
        return smoothShare;
    }

    /** @return number of smooth blocks used */
    public int smoothBlocks() {
        return smoothBlocks;
    }

    /** @return true when a line could be fitted (a positive slope from enough smooth cubes) */
    public boolean usable() {
        return problem == null;
    }

    /** @return why no line could be fitted, or null */
    public String problem() {
        return problem;
    }

    /**
     * @param data camera data in ADU (not offset-subtracted), not modified
     * @param mask pixels to leave out (nonzero), one per voxel, or null
     */
    public static ImageNoiseFit of(Volume data, byte[] mask) {
        NoiseCoefficients c = NoiseCoefficients.of(data, mask);
        if (c.valid < MIN_BLOCKS) {
            return failed(0, c.valid, "only " + c.valid + " blocks of 3 x 3 pixels are free of masked, saturated or"
                    + " non-finite pixels; at least " + MIN_BLOCKS + " are needed");
        }
        boolean[] all = c.ok.clone();
        double[] start = medianLine(c, all);
        ImageNoiseFit last = null;
        double a = start[0];
        double b = start[1];
        for (int round = 0; round < 3; round++) {
            last = fitLine(c, c.smooth(a, b, SMOOTH_SIGMAS));
            if (!last.usable()) {
                return last;
            }
            a = last.slope;
            b = last.intercept;
        }
        return last;
    }

    private static ImageNoiseFit failed(double share, int blocks, String why) {
        return new ImageNoiseFit(Double.NaN, Double.NaN, Double.NaN, Double.NaN, Double.NaN, List.of(), share, blocks, why);
    }

    /** The selected coefficients, in bins of equal count by level. */
    private record Bins(int[][] members, int count) {
    }

    private static Bins bins(NoiseCoefficients c, boolean[] use, int perBin, int maxBins) {
        int n = 0;
        for (boolean u : use) {
            n += u ? 1 : 0;
        }
        float[] sorted = new float[n];
        int k = 0;
        for (int i = 0; i < use.length; i++) {
            if (use[i]) {
                sorted[k++] = c.level[i];
            }
        }
        Arrays.sort(sorted);
        int nb = Math.max(1, Math.min(maxBins, n / perBin));
        float[] upper = new float[nb];
        for (int b = 0; b < nb - 1; b++) {
            upper[b] = sorted[(int) ((long) n * (b + 1) / nb)];
        }
        upper[nb - 1] = Float.POSITIVE_INFINITY;
        int[] fill = new int[nb];
        int[] which = new int[use.length];
        for (int i = 0; i < use.length; i++) {
            if (use[i]) {
                int b = 0;
                while (c.level[i] >= upper[b] && b < nb - 1) {
                    b++;
                }
                which[i] = b;
                fill[b]++;
            }
        }
        int[][] members = new int[nb][];
        for (int b = 0; b < nb; b++) {
            members[b] = new int[fill[b]];
            fill[b] = 0;
        }
        for (int i = 0; i < use.length; i++) {
            if (use[i]) {
                members[which[i]][fill[which[i]]++] = i;
            }
        }
        return new Bins(members, n);
    }

    /** A first model: median of d^2 per level bin over all blocks (robust to a minority of sharp objects), plain line. */
    private static double[] medianLine(NoiseCoefficients c, boolean[] use) {
        Bins bins = bins(c, use, 200, 16);
        int nb = bins.members().length;
        double[] x = new double[nb];
        double[] y = new double[nb];
        for (int b = 0; b < nb; b++) {
            int[] m = bins.members()[b];
            double[] d2 = new double[m.length];
            double sl = 0;
            for (int j = 0; j < m.length; j++) {
                d2[j] = (double) c.d[m[j]] * c.d[m[j]];
                sl += c.level[m[j]];
            }
            Arrays.sort(d2);
            x[b] = sl / Math.max(1, m.length);
            y[b] = m.length > 0 ? d2[m.length / 2] / CHI2_1_MEDIAN : 0;
        }
        double mx = 0;
        double my = 0;
        for (int b = 0; b < nb; b++) {
            mx += x[b] / nb;
            my += y[b] / nb;
        }
        double sxy = 0;
        double sxx = 0;
        for (int b = 0; b < nb; b++) {
            sxy += (x[b] - mx) * (y[b] - my);
            sxx += (x[b] - mx) * (x[b] - mx);
        }
        double slope = sxx > 0 ? sxy / sxx : 0;
        if (!(slope > 0)) {
            return new double[] {0, Math.max(my, 1e-12)};
        }
        return new double[] {slope, my - slope * mx};
    }

    /** Bins the smooth blocks by level and fits a weighted line. */
    private static ImageNoiseFit fitLine(NoiseCoefficients c, boolean[] smooth) {
        Bins bins = bins(c, smooth, 300, 32);
        int n = bins.count();
        double share = (double) n / c.valid;
        if (n < MIN_BLOCKS) {
            return failed(share, n, "only " + n + " smooth blocks of 3 x 3 pixels (" + pct(share) + " of the image); at"
                    + " least " + MIN_BLOCKS + " are needed");
        }
        double widen = c.correlationFactor();
        List<Level> levels = new ArrayList<>();
        for (int[] m : bins.members()) {
            if (m.length < 10) {
                continue;
            }
            double sl = 0;
            double s2 = 0;
            double s4 = 0;
            for (int i : m) {
                double dd = (double) c.d[i] * c.d[i];
                sl += c.level[i];
                s2 += dd;
                s4 += dd * dd;
            }
            double mean = s2 / m.length;
            double var = widen * Math.max(s4 / m.length - mean * mean, 1e-300) / m.length;
            levels.add(new Level(sl / m.length, mean, Math.sqrt(var), m.length));
        }
        if (levels.size() < 2) {
            return failed(share, n, "the smooth parts of the image hold fewer than two usable levels");
        }
        // weighted least squares v = slope * level + intercept
        double sw = 0;
        double sx = 0;
        double sy = 0;
        double sxx = 0;
        double sxy = 0;
        for (Level l : levels) {
            double w = 1 / (l.standardError() * l.standardError());
            sw += w;
            sx += w * l.level();
            sy += w * l.variance();
            sxx += w * l.level() * l.level();
            sxy += w * l.level() * l.variance();
        }
        double det = sw * sxx - sx * sx;
        if (!(det > 0)) {
            return failed(share, n, "the smooth parts of the image are all at one level");
        }
        double slope = (sw * sxy - sx * sy) / det;
        double intercept = (sxx * sy - sx * sxy) / det;
        double chi2 = 0;
        for (Level l : levels) {
            double r = (l.variance() - slope * l.level() - intercept) / l.standardError();
            chi2 += r * r;
        }
        double inflate = levels.size() > 2 ? Math.max(1, chi2 / (levels.size() - 2)) : 1;
        double vSlope = inflate * sw / det;
        double vIntercept = inflate * sxx / det;
        double cov = -inflate * sx / det;
        if (!(slope > 0)) {
            return new ImageNoiseFit(slope, intercept, vSlope, vIntercept, cov, levels, share, n,
                    "the noise does not grow with the signal in the smooth parts of the image (slope "
                            + String.format(Locale.ROOT, "%.3g", slope) + "); the data may not be raw camera counts");
        }
        return new ImageNoiseFit(slope, intercept, vSlope, vIntercept, cov, levels, share, n, null);
    }

    private static String pct(double share) {
        return String.format(Locale.ROOT, "%.0f%%", 100 * share);
    }
}
