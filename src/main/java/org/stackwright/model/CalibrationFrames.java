package org.stackwright.model;

import java.util.ArrayList;
import java.util.Arrays;
import java.util.List;
import java.util.Locale;

import org.stackwright.volume.Volume;

/**
 * Camera values from calibration frames, the direct form of photon transfer (Janesick, "Photon Transfer:
 * DN -&gt; lambda", SPIE Press, 2007, ch. 2 and 5):
 * <ul>
 * <li><b>dark frames</b> (no light, same exposure): the offset is the mean, the read noise the root mean square over
 * pixels of each pixel's standard deviation over the frames (the fixed pattern of pixel offsets is not noise and
 * drops out); with one frame only, the spatial standard deviation is used and includes the fixed pattern;</li>
 * <li><b>flat frames</b> (even light, several frames at each of one or more levels, in order): each run of frames
 * of about the same mean is one level; per level the mean and the mean over pixels of each pixel's variance over the
 * frames (after the common change of the frame means is taken out: lamp flicker), so the pixel-to-pixel sensitivity
 * pattern drops out; the gain is the slope of variance against mean over the levels, or (one level) the variance
 * above the read noise divided by the mean above the offset.</li>
 * </ul>
 * Pixels whose offset or noise is far from the rest (hot or flickering pixels: more than 6 robust standard deviations
 * from the median mean, or more than 25 times the median variance) are left out and counted.
 */
public final class CalibrationFrames {

    /** A value with its standard error and how it was found. */
    public record Estimate(double value, double standardError, String note) {
    }

    /** Offset and read noise from dark frames. */
    public record Dark(Estimate offset, Estimate readNoise, int frames, int pixelsLeftOut) {
    }

    /** Gain from flat frames; levels as (mean ADU, variance ADU^2, standard error). */
    public record Flat(Estimate gain, List<double[]> levels, int pixelsLeftOut) {
    }

    /**
     * @param key the frames' parameter key
     * @param frames calibration frames, not modified
     * @param image the image they are for (only its plane size is used)
     * @return the frames, when their planes have the image's size
     * @throws IllegalArgumentException naming the key otherwise
     */
    public static Volume requireSamePlanes(String key, Volume frames, Volume image) {
        if (frames.width() != image.width() || frames.height() != image.height()) {
            throw new IllegalArgumentException(key + ": frames of " + frames.width() + "x" + frames.height() + " pixels"
                    + " do not match the image's " + image.width() + "x" + image.height() + "; give frames from the same"
                    + " camera and region of interest");
        }
        return frames;
    }

    private static final double HOT_SIGMAS = 6;
    private static final double NOISY_FACTOR = 25;
    private static final double SAME_LEVEL = 0.05;

    private CalibrationFrames() {
    }

    /**
     * @param key the parameter key the frames came from (for messages)
     * @param frames dark frames (planes of the sensor), not modified
     * @throws IllegalArgumentException naming the key when the frames are not usable
     */
    public static Dark dark(String key, Volume frames) {
        int p = frames.width() * frames.height();
        int n = frames.depth();
        float[] v = frames.data();
        requireFinite(key, v);
        double[] mean = new double[p];
        double[] var = new double[p];
        for (int i = 0; i < p; i++) {
            double s = 0;
            for (int f = 0; f < n; f++) {
                s += v[f * p + i];
            }
            mean[i] = s / n;
            double q = 0;
            for (int f = 0; f < n; f++) {
                double d = v[f * p + i] - mean[i];
                q += d * d;
            }
            var[i] = n > 1 ? q / (n - 1) : 0;
        }
        boolean[] keep = keepPixels(mean, n > 1 ? var : null);
        int left = 0;
        double sm = 0;
        double sm2 = 0;
        double sv = 0;
        double sv2 = 0;
        int k = 0;
        for (int i = 0; i < p; i++) {
            if (!keep[i]) {
                left++;
                continue;
            }
            sm += mean[i];
            sm2 += mean[i] * mean[i];
            sv += var[i];
            sv2 += var[i] * var[i];
            k++;
        }
        double offset = sm / k;
        double spread = Math.sqrt(Math.max(sm2 / k - offset * offset, 0));
        Estimate off = new Estimate(offset, spread / Math.sqrt(k), "mean of " + n + " dark frame(s)");
        Estimate rn;
        if (n > 1) {
            double mv = sv / k;
            double seVar = Math.sqrt(Math.max(sv2 / k - mv * mv, 0) / k);
            double r = Math.sqrt(mv);
            rn = new Estimate(r, r > 0 ? seVar / (2 * r) : 0, "root mean square over pixels of the standard deviation over "
                    + n + " dark frames");
        } else {
            double r = spread;
            rn = new Estimate(r, r / Math.sqrt(2.0 * k), "standard deviation over the pixels of one dark frame (includes"
                    + " the fixed pattern of pixel offsets; give several frames to leave it out)");
        }
        if (!(rn.value() > 0)) {
            throw new IllegalArgumentException(key + ": the dark frames show no noise at all (every pixel constant);"
                    + " give raw dark frames from the camera");
        }
        return new Dark(off, rn, n, left);
    }

    /**
     * @param key the parameter key (for messages)
     * @param frames flat frames: runs of at least two frames at each level, not modified
     * @param offset camera offset (ADU) for a single level, NaN when unknown
     * @param readNoise read noise (ADU) for a single level, NaN when unknown
     * @throws IllegalArgumentException naming the key when no gain can be found
     */
    public static Flat flat(String key, Volume frames, double offset, double readNoise) {
        int p = frames.width() * frames.height();
        int n = frames.depth();
        float[] v = frames.data();
        requireFinite(key, v);
        double[] frameMean = new double[n];
        float max = Float.NEGATIVE_INFINITY;
        for (int f = 0; f < n; f++) {
            double s = 0;
            for (int i = 0; i < p; i++) {
                s += v[f * p + i];
                max = Math.max(max, v[f * p + i]);
            }
            frameMean[f] = s / p;
        }
        List<int[]> runs = new ArrayList<>();
        int start = 0;
        for (int f = 1; f <= n; f++) {
            if (f == n || Math.abs(frameMean[f] - frameMean[start]) > SAME_LEVEL * Math.abs(frameMean[start])) {
                runs.add(new int[] {start, f});
                start = f;
            }
        }
        List<double[]> levels = new ArrayList<>();
        int left = 0;
        for (int[] run : runs) {
            int m = run[1] - run[0];
            if (m < 2 || saturated(v, p, run, max)) {
                continue;
            }
            double level = 0;
            for (int f = run[0]; f < run[1]; f++) {
                level += frameMean[f] / m;
            }
            double[] mean = new double[p];
            double[] var = new double[p];
            for (int i = 0; i < p; i++) {
                double s = 0;
                for (int f = run[0]; f < run[1]; f++) {
                    s += v[f * p + i] - (frameMean[f] - level);
                }
                mean[i] = s / m;
                double q = 0;
                for (int f = run[0]; f < run[1]; f++) {
                    double d = v[f * p + i] - (frameMean[f] - level) - mean[i];
                    q += d * d;
                }
                // one degree of freedom per frame goes to its mean (taken out above), spread over p pixels
                var[i] = q / (m - 1) * p / (p - 1.0);
            }
            boolean[] keep = keepPixels(mean, var);
            double sv = 0;
            double sv2 = 0;
            int k = 0;
            for (int i = 0; i < p; i++) {
                if (keep[i]) {
                    sv += var[i];
                    sv2 += var[i] * var[i];
                    k++;
                } else {
                    left++;
                }
            }
            double mv = sv / k;
            levels.add(new double[] {level, mv, Math.sqrt(Math.max(sv2 / k - mv * mv, 0) / k)});
        }
        if (levels.isEmpty()) {
            throw new IllegalArgumentException(key + ": no level with at least two frames of about the same mean and"
                    + " without saturated pixels; give runs of two or more flat frames per light level (in order)");
        }
        Estimate gain = levels.size() >= 2 ? slope(levels) : single(key, levels.get(0), offset, readNoise);
        if (!(gain.value() > 0)) {
            throw new IllegalArgumentException(key + String.format(Locale.ROOT, ": the variance does not grow with the"
                    + " light in the flat frames (slope %.3g); give raw frames at clearly different light levels",
                    gain.value()));
        }
        return new Flat(gain, levels, left);
    }

    private static Estimate slope(List<double[]> levels) {
        double sw = 0;
        double sx = 0;
        double sy = 0;
        double sxx = 0;
        double sxy = 0;
        for (double[] l : levels) {
            double w = 1 / Math.max(l[2] * l[2], 1e-300);
            sw += w;
            sx += w * l[0];
            sy += w * l[1];
            sxx += w * l[0] * l[0];
            sxy += w * l[0] * l[1];
        }
        double det = sw * sxx - sx * sx;
        double g = (sw * sxy - sx * sy) / det;
        double b = (sxx * sy - sx * sxy) / det;
        double chi2 = 0;
        for (double[] l : levels) {
            double r = (l[1] - g * l[0] - b) / Math.max(l[2], 1e-300);
            chi2 += r * r;
        }
        double inflate = levels.size() > 2 ? Math.max(1, chi2 / (levels.size() - 2)) : 1;
        return new Estimate(g, Math.sqrt(inflate * sw / det), "slope of variance against mean over " + levels.size()
                + " flat levels");
    }

    private static Estimate single(String key, double[] l, double offset, double readNoise) {
        if (Double.isNaN(offset) || Double.isNaN(readNoise)) {
            throw new IllegalArgumentException(key + ": the flat frames hold one light level only; then the offset and"
                    + " the read noise must be known (give --offset and --read-noise, or --dark frames), or give flat"
                    + " frames at two or more levels");
        }
        double above = l[0] - offset;
        if (!(above > 0)) {
            throw new IllegalArgumentException(key + ": the flat frames' mean " + fmt(l[0]) + " ADU is not above the"
                    + " offset " + fmt(offset) + " ADU; give frames with light");
        }
        double g = (l[1] - readNoise * readNoise) / above;
        return new Estimate(g, l[2] / above, "(variance - read noise^2) / (mean - offset) at one flat level");
    }

    private static boolean saturated(float[] v, int p, int[] run, float max) {
        int at = 0;
        for (int f = run[0]; f < run[1]; f++) {
            for (int i = 0; i < p; i++) {
                if (v[f * p + i] == max) {
                    at++;
                }
            }
        }
        return at > Math.max(5, (run[1] - run[0]) * p / 1000);
    }

    /** Pixels not far from the others: mean within 6 robust sd of the median, variance at most 25x the median. */
    private static boolean[] keepPixels(double[] mean, double[] var) {
        int p = mean.length;
        double med = median(mean);
        double[] dev = new double[p];
        for (int i = 0; i < p; i++) {
            dev[i] = Math.abs(mean[i] - med);
        }
        double sigma = 1.4826 * median(dev);
        double medVar = var == null ? 0 : median(var);
        boolean[] keep = new boolean[p];
        for (int i = 0; i < p; i++) {
            keep[i] = (sigma == 0 || dev[i] <= HOT_SIGMAS * sigma) && (var == null || var[i] <= NOISY_FACTOR * medVar);
        }
        return keep;
    }

    private static double median(double[] a) {
        double[] c = a.clone();
        Arrays.sort(c);
        int n = c.length;
        return n % 2 == 1 ? c[n / 2] : 0.5 * (c[n / 2 - 1] + c[n / 2]);
    }

    private static void requireFinite(String key, float[] v) {
        for (float f : v) {
            if (!Float.isFinite(f)) {
                throw new IllegalArgumentException(key + ": the frames hold NaN or infinite values; give raw camera frames");
            }
        }
    }

    private static String fmt(double d) {
        return String.format(Locale.ROOT, "%.4g", d);
    }
}
