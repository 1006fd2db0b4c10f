package org.stackwright.repair;

import org.apache.commons.math3.distribution.ChiSquaredDistribution;
import org.apache.commons.math3.distribution.NormalDistribution;
import org.stackwright.volume.Volume;

/**
 * Finds hot, dead and stuck pixels from calibration frames: a stack of dark frames (no light) and/or a stack of
 * flat frames (uniform light), each slice one exposure. For every pixel the mean over the frames and the
 * logarithm of its temporal standard deviation are compared with the same quantities of all pixels through robust
 * z-scores z = (v - median) / (1.4826 MAD) (Hampel 1974; see {@link RobustStats}); |z| > k is an outlier.
 * A pixel is "quiet" (almost no temporal noise) when its temporal standard deviation s is below the value that
 * normal noise undercuts with the probability of a k-sigma normal tail, Phi(-k): for n frames of Gaussian noise
 * (n - 1) s^2 / sigma^2 follows a chi-square distribution with n - 1 degrees of freedom (Student 1908; any
 * statistics text), and sigma is estimated from the median s of all pixels through the chi-square median.
 *
 * <p>Classification, in this order (a defect is flagged in any case when a mean is an outlier):
 * <ul>
 * <li>dead: low in the flats; or, with darks only, quiet at a normal or low dark level;</li>
 * <li>stuck: quiet and not dead (a fixed reading that does not follow the light);</li>
 * <li>hot: high mean in the darks (or flats) with normal noise;</li>
 * <li>any other mean outlier: hot when high, dead when low.</li>
 * </ul>
 * Quiet-pixel tests need at least 3 frames in the stack.
 */
public final class FrameDefectFinder {

    private FrameDefectFinder() {
    }

    /** Per-pixel robust z-scores of the temporal mean and of the log temporal standard deviation. */
    record Scores(double[] mean, boolean[] quiet, boolean hasNoise) {
    }

    /**
     * @param dark dark frames (slices = exposures), or null
     * @param flat flat frames, or null
     * @param k threshold in robust sigmas, > 0
     * @throws IllegalArgumentException naming "dark"/"flat" when neither is given or their sizes differ
     */
    public static DefectMap find(Volume dark, Volume flat, double k) {
        if (dark == null && flat == null) {
            throw new IllegalArgumentException("dark and flat: give at least one stack of calibration frames");
        }
        if (dark != null && flat != null && (dark.width() != flat.width() || dark.height() != flat.height())) {
            throw new IllegalArgumentException("dark is " + dark.width() + "x" + dark.height() + " but flat is "
                    + flat.width() + "x" + flat.height() + "; give frames of the same sensor size");
        }
        Volume any = dark != null ? dark : flat;
        int n = any.width() * any.height();
        Scores d = dark == null ? null : scores(dark, k);
        Scores f = flat == null ? null : scores(flat, k);
        PixelDefect[] kinds = new PixelDefect[n];
        for (int p = 0; p < n; p++) {
            boolean quiet = (d != null && d.hasNoise() && d.quiet()[p])
                    || (f != null && f.hasNoise() && f.quiet()[p]);
            double zd = d == null ? 0 : d.mean()[p];
            double zf = f == null ? 0 : f.mean()[p];
            PixelDefect kind = null;
            if (f != null && zf < -k) {
                kind = PixelDefect.DEAD;
            } else if (f == null && quiet && zd <= k) {
                kind = PixelDefect.DEAD;
            } else if (quiet) {
                kind = PixelDefect.STUCK;
            } else if (zd > k || zf > k) {
                kind = PixelDefect.HOT;
            } else if (zd < -k) {
                kind = PixelDefect.DEAD;
            }
            kinds[p] = kind;
        }
        String source = (dark != null ? "dark frames (" + dark.depth() + ")" : "")
                + (dark != null && flat != null ? " and " : "") + (flat != null ? "flat frames (" + flat.depth() + ")" : "");
        return new DefectMap(any.width(), any.height(), kinds, source);
    }

    static Scores scores(Volume frames, double k) {
        int n = frames.width() * frames.height();
        int t = frames.depth();
        float[] v = frames.data();
        double[] mean = new double[n];
        double[] std = new double[n];
        for (int p = 0; p < n; p++) {
            double s = 0;
            for (int z = 0; z < t; z++) {
                s += v[z * n + p];
            }
            double m = s / t;
            double q = 0;
            for (int z = 0; z < t; z++) {
                double e = v[z * n + p] - m;
                q += e * e;
            }
            mean[p] = m;
            std[p] = t > 1 ? Math.sqrt(q / (t - 1)) : 0;
        }
        boolean hasNoise = t >= 3;
        boolean[] quiet = new boolean[n];
        if (hasNoise) {
            ChiSquaredDistribution chi = new ChiSquaredDistribution(t - 1);
            double dof = t - 1;
            double sigma = RobustStats.median(std, n) / Math.sqrt(chi.inverseCumulativeProbability(0.5) / dof);
            double tail = new NormalDistribution().cumulativeProbability(-k);
            double limit = sigma * Math.sqrt(chi.inverseCumulativeProbability(tail) / dof);
            for (int p = 0; p < n; p++) {
                quiet[p] = std[p] < limit;
            }
        }
        standardise(mean);
        return new Scores(mean, quiet, hasNoise);
    }

    /** Replaces values by robust z-scores in place; a zero spread gives z = 0 for the median, +-inf otherwise. */
    static void standardise(double[] v) {
        double[] ms = RobustStats.medianSigma(v, v.length);
        double sigma = ms[1];
        for (int i = 0; i < v.length; i++) {
            double dev = v[i] - ms[0];
            v[i] = dev == 0 ? 0 : sigma > 0 ? dev / sigma : Math.copySign(Double.POSITIVE_INFINITY, dev);
        }
    }
}
