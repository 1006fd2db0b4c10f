package org.stackwright.repair;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Finds defective pixels in the image itself, in each slice, then keeps those seen with the same sign in at least
 * a given fraction of the slices (z or time; a defect sits at the same sensor position in every exposure,
 * structure does not).
 *
 * <p>In each slice, first defective lines (columns, rows and segments of them: {@link LineDefectFinder}), then,
 * with the line pixels left out of every reference, single pixels and clusters of a few touching pixels
 * ({@link ClusterDefectFinder}): a group is a high outlier when it exceeds every pixel around it by more than k
 * noise sigmas and by more than {@link #SHARPNESS} of their signal (a low outlier likewise below). The noise grows
 * with the signal (photon noise), so sigma depends on the local level (the 3x3 median) through the
 * Poisson-Gaussian model fitted to the image ({@link NoiseLevel}). Lines, clusters and pixels are told apart in
 * the final map by {@link DefectGrouping}.
 *
 * <p>Kinds: mostly negative deviations = dead; positive deviations of a pixel whose value hardly changes over the
 * slices while its neighbours do (and which is not brighter than every good pixel) = stuck; other positive ones =
 * hot. With fewer than 3 slices stuck cannot be told from hot, and bright outliers are called hot.
 */
public final class ImageDefectFinder {

    static final int LEVEL_CLASSES = 16;
    /**
     * A defect must stand out from all 8 neighbours by more than this share of the neighbours' signal above the
     * dark level. An optical image cannot: at Nyquist sampling the Airy pattern falls by about 48 % from its peak
     * to the next pixel ([2 J1(v)/v]^2 at v = pi/2 is 0.52; Born & Wolf 1999, sec. 8.5.2), so a bead or a
     * filament is not taken for a defect, while a hot, dead or stuck pixel differs by far more.
     */
    static final double SHARPNESS = 0.7;
    /** zeros count as missing data when the typical level is this many sigmas above zero */
    static final double NO_DATA_SIGMAS = 10;
    /** samples per slice used for the class limits and the class sigmas (deterministic stride) */
    static final int SAMPLES = 200_000;

    private ImageDefectFinder() {
    }

    /**
     * @param image the image or stack, not modified
     * @param k threshold in robust sigmas, > 0
     * @param fraction fraction of slices in which the deviation must be seen, in (0, 1]
     */
    public static DefectMap find(Volume image, double k, double fraction, Workers workers) {
        int w = image.width();
        int h = image.height();
        int d = image.depth();
        int plane = w * h;
        short[] positive = new short[plane];
        short[] negative = new short[plane];
        short[] missing = new short[plane];
        float[][] med = new float[workers.threads()][plane];
        float[][] res = new float[workers.threads()][plane];
        Object lock = new Object();
        workers.forSlots(d, (slot, z0, z1) -> {
            short[] pos = new short[plane];
            short[] neg = new short[plane];
            short[] gap = new short[plane];
            for (int z = z0; z < z1; z++) {
                scoreSlice(image.data(), z * plane, w, h, k, med[slot], res[slot], pos, neg, gap);
            }
            synchronized (lock) {
                for (int p = 0; p < plane; p++) {
                    positive[p] += pos[p];
                    negative[p] += neg[p];
                    missing[p] += gap[p];
                }
            }
        });
        int need = Math.max(1, (int) Math.ceil(fraction * d - 1e-9));
        PixelDefect[] kinds = new PixelDefect[plane];
        boolean[] flagged = new boolean[plane];
        boolean[] noData = new boolean[plane];
        for (int p = 0; p < plane; p++) {
            flagged[p] = positive[p] >= need || negative[p] >= need;
            noData[p] = missing[p] >= need;
        }
        double[] spread = d >= 3 ? temporalSpread(image) : null;
        float brightestGood = Float.NEGATIVE_INFINITY;
        float[] v = image.data();
        for (int i = 0; i < v.length; i++) {
            if (!flagged[i % plane]) {
                brightestGood = Math.max(brightestGood, v[i]);
            }
        }
        double[] nb = new double[8];
        for (int p = 0; p < plane; p++) {
            if (!flagged[p]) {
                continue;
            }
            if (negative[p] > positive[p]) {
                kinds[p] = PixelDefect.DEAD;
                continue;
            }
            kinds[p] = PixelDefect.HOT;
            if (spread != null) {
                int x = p % w;
                int y = p / w;
                int m = 0;
                for (int dy = -1; dy <= 1; dy++) {
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = x + dx;
                        int yy = y + dy;
                        if ((dx | dy) != 0 && xx >= 0 && yy >= 0 && xx < w && yy < h && !flagged[yy * w + xx]) {
                            nb[m++] = spread[yy * w + xx];
                        }
                    }
                }
                double typical = m > 0 ? RobustStats.median(nb, m) : 0;
                boolean constant = spread[p] <= 0.1 * typical;
                boolean aboveAll = minOverSlices(v, p, plane, d) > brightestGood;
                if (constant && !aboveAll) {
                    kinds[p] = PixelDefect.STUCK;
                }
            }
        }
        return new DefectMap(w, h, kinds, "image (" + d + " slice" + (d == 1 ? "" : "s") + ", line, cluster and pixel "
                + "tests)", noData);
    }

    private static float minOverSlices(float[] v, int p, int plane, int d) {
        float m = Float.POSITIVE_INFINITY;
        for (int z = 0; z < d; z++) {
            m = Math.min(m, v[z * plane + p]);
        }
        return m;
    }

    /** Robust temporal spread of each pixel: 1.4826 MAD of its values over the slices. */
    static double[] temporalSpread(Volume image) {
        int plane = image.width() * image.height();
        int d = image.depth();
        double[] out = new double[plane];
        double[] t = new double[d];
        for (int p = 0; p < plane; p++) {
            for (int z = 0; z < d; z++) {
                t[z] = image.data()[z * plane + p];
            }
            out[p] = RobustStats.medianSigma(t, d)[1];
        }
        return out;
    }

    /**
     * Pixels without data: exact zeros in a plane whose typical level (median of the local levels) lies more than
     * {@link #NO_DATA_SIGMAS} noise sigmas above zero, as the gaps a stitcher leaves between tiles. A camera with an
     * offset never reads exactly 0 there; data whose level is near 0 keep their zeros as data.
     */
    static boolean[] noData(float[] v, int off, int plane, float[] level, NoiseLevel noise) {
        boolean[] out = new boolean[plane];
        double[] sample = new double[Math.min(plane, SAMPLES)];
        int stride = Math.max(1, plane / sample.length);
        int m = 0;
        for (int p = 0; p < plane && m < sample.length; p += stride) {
            sample[m++] = level[p];
        }
        double typical = RobustStats.median(sample, m);
        if (!(typical > NO_DATA_SIGMAS * noise.sigma(typical))) {
            return out;
        }
        for (int p = 0; p < plane; p++) {
            out[p] = v[off + p] == 0;
        }
        return out;
    }

    /**
     * Scores one slice: counts slices with a high outlier in pos, a low outlier in neg and no data (a gap of zeros) in
     * gap. A pixel without data is never an outlier.
     */
    static void scoreSlice(float[] v, int off, int w, int h, double k, float[] med, float[] res, short[] pos,
            short[] neg, short[] gap) {
        int plane = w * h;
        float[] win = new float[9];
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                int m = 0;
                for (int dy = -1; dy <= 1; dy++) {
                    int yy = Math.min(h - 1, Math.max(0, y + dy));
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = Math.min(w - 1, Math.max(0, x + dx));
                        win[m++] = v[off + yy * w + xx];
                    }
                }
                int p = y * w + x;
                med[p] = RobustStats.median9(win);
                res[p] = v[off + p] - med[p];
            }
        }
        NoiseLevel noise = NoiseLevel.fit(med, res, plane, SAMPLES, LEVEL_CLASSES);
        boolean[] noData = noData(v, off, plane, med, noise);
        boolean[] lineHot = new boolean[plane];
        boolean[] lineDead = new boolean[plane];
        LineDefectFinder.scan(v, off, w, h, noise, k, noData, lineHot, lineDead);
        boolean[] excluded = new boolean[plane];
        for (int p = 0; p < plane; p++) {
            excluded[p] = lineHot[p] || lineDead[p];
        }
        boolean[] hot = new boolean[plane];
        boolean[] dead = new boolean[plane];
        ClusterDefectFinder.scan(v, off, w, h, noise, med, k, excluded, noData, hot, dead);
        for (int p = 0; p < plane; p++) {
            if (noData[p]) {
                gap[p]++;
            } else if (hot[p] || lineHot[p]) {
                pos[p]++;
            } else if (dead[p] || lineDead[p]) {
                neg[p]++;
            }
        }
    }
}
