package org.stackwright.repair;

import org.stackwright.parallel.Workers;
import org.stackwright.volume.Volume;

/**
 * Finds defective pixels in the image itself: a pixel that deviates from the median of its 3x3 neighbourhood by
 * more than k robust sigmas, with the same sign, in at least a given fraction of the slices (z or time; a defect
 * sits at the same sensor position in every exposure, structure does not). A 3x3 median ignores an isolated
 * outlier (common practice for impulse noise).
 *
 * <p>In each slice a pixel is a high outlier when it exceeds the largest of its 8 neighbours by more than k noise
 * sigmas and by more than {@link #SHARPNESS} of the neighbours' signal (a low outlier likewise below the
 * smallest). The noise grows with the signal (photon noise), so sigma depends on the local level (the 3x3
 * median) through the Poisson-Gaussian model fitted to the image ({@link NoiseLevel}).
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
        return candidates(image, k, fraction, null, workers).decide();
    }

    /**
     * The per-pixel verdicts that need only the pixel's own column of slices and its 8 neighbours, before the one
     * whole-image number (the brightest good value) turns stuck candidates into stuck or hot pixels. Blocks of an
     * image give the same verdicts for their inner pixels as the whole image, so blocks can be put together and
     * decided at once.
     *
     * @param width columns
     * @param height rows
     * @param depth slices
     * @param codes per pixel: 0 good, 1 hot, 2 dead, 3 stuck unless brighter than every good pixel
     * @param minimum per pixel: smallest value over the slices
     * @param brightestGood per pixel: largest value over the slices of a good pixel, -infinity for a flagged one
     */
    record Candidates(int width, int height, int depth, byte[] codes, float[] minimum, float[] brightestGood) {

        /** @return the defect map, taking the brightest good value over all pixels */
        DefectMap decide() {
            float bright = Float.NEGATIVE_INFINITY;
            for (float b : brightestGood) {
                bright = Math.max(bright, b);
            }
            PixelDefect[] kinds = new PixelDefect[codes.length];
            for (int p = 0; p < codes.length; p++) {
                kinds[p] = switch (codes[p]) {
                    case 1 -> PixelDefect.HOT;
                    case 2 -> PixelDefect.DEAD;
                    case 3 -> minimum[p] > bright ? PixelDefect.HOT : PixelDefect.STUCK;
                    default -> null;
                };
            }
            return new DefectMap(width, height, kinds, "image (" + depth + " slice" + (depth == 1 ? "" : "s")
                    + ", 3x3 median)");
        }
    }

    /**
     * @param noise the noise level of each slice (fitted on whole slices), or null to fit it here on the given
     *     slices (the image is then the whole image)
     */
    static Candidates candidates(Volume image, double k, double fraction, NoiseLevel[] noise, Workers workers) {
        int w = image.width();
        int h = image.height();
        int d = image.depth();
        int plane = w * h;
        short[] positive = new short[plane];
        short[] negative = new short[plane];
        float[][] med = new float[workers.threads()][plane];
        float[][] res = new float[workers.threads()][plane];
        Object lock = new Object();
        workers.forSlots(d, (slot, z0, z1) -> {
            short[] pos = new short[plane];
            short[] neg = new short[plane];
            for (int z = z0; z < z1; z++) {
                if (noise == null) {
                    scoreSlice(image.data(), z * plane, w, h, k, med[slot], res[slot], pos, neg);
                } else {
                    median3x3(image.data(), z * plane, w, h, med[slot], res[slot]);
                    count(image.data(), z * plane, w, h, k, med[slot], noise[z], pos, neg);
                }
            }
            synchronized (lock) {
                for (int p = 0; p < plane; p++) {
                    positive[p] += pos[p];
                    negative[p] += neg[p];
                }
            }
        });
        int need = Math.max(1, (int) Math.ceil(fraction * d - 1e-9));
        byte[] codes = new byte[plane];
        boolean[] flagged = new boolean[plane];
        for (int p = 0; p < plane; p++) {
            flagged[p] = positive[p] >= need || negative[p] >= need;
        }
        double[] spread = d >= 3 ? temporalSpread(image) : null;
        float[] v = image.data();
        float[] minimum = new float[plane];
        float[] good = new float[plane];
        for (int p = 0; p < plane; p++) {
            minimum[p] = minOverSlices(v, p, plane, d);
            float m = Float.NEGATIVE_INFINITY;
            if (!flagged[p]) {
                for (int z = 0; z < d; z++) {
                    m = Math.max(m, v[z * plane + p]);
                }
            }
            good[p] = m;
        }
        double[] nb = new double[8];
        for (int p = 0; p < plane; p++) {
            if (!flagged[p]) {
                continue;
            }
            if (negative[p] > positive[p]) {
                codes[p] = 2;
                continue;
            }
            codes[p] = 1;
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
                if (spread[p] <= 0.1 * typical) {
                    codes[p] = 3;
                }
            }
        }
        return new Candidates(w, h, d, codes, minimum, good);
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

    /** Scores one slice: counts slices with a high outlier in pos and a low outlier in neg. */
    static void scoreSlice(float[] v, int off, int w, int h, double k, float[] med, float[] res, short[] pos,
            short[] neg) {
        NoiseLevel noise = sliceNoise(v, off, w, h, med, res);
        count(v, off, w, h, k, med, noise, pos, neg);
    }

    /**
     * The 3x3 median (edges clamped) and the residual of one slice, and the noise level fitted to them.
     *
     * @param med receives the median per pixel
     * @param res receives pixel minus median
     */
    static NoiseLevel sliceNoise(float[] v, int off, int w, int h, float[] med, float[] res) {
        int plane = w * h;
        median3x3(v, off, w, h, med, res);
        return NoiseLevel.fit(med, res, plane, SAMPLES, LEVEL_CLASSES);
    }

    /** Writes the 3x3 median (coordinates clamped at the edges) and pixel minus median of one slice. */
    static void median3x3(float[] v, int off, int w, int h, float[] med, float[] res) {
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
    }

    /** Counts a high outlier in pos and a low outlier in neg for each pixel of one slice, at a given noise level. */
    static void count(float[] v, int off, int w, int h, double k, float[] med, NoiseLevel noise, short[] pos,
            short[] neg) {
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                int p = y * w + x;
                float c = v[off + p];
                float hi = Float.NEGATIVE_INFINITY;
                float lo = Float.POSITIVE_INFINITY;
                for (int dy = -1; dy <= 1; dy++) {
                    int yy = y + dy;
                    if (yy < 0 || yy >= h) {
                        continue;
                    }
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = x + dx;
                        if ((dx | dy) == 0 || xx < 0 || xx >= w) {
                            continue;
                        }
                        float q = v[off + yy * w + xx];
                        hi = Math.max(hi, q);
                        lo = Math.min(lo, q);
                    }
                }
                double limit = k * noise.sigma(med[p]);
                double above = c - hi;
                double below = lo - c;
                if (above > limit && above > SHARPNESS * (hi - noise.floor())) {
                    pos[p]++;
                } else if (below > limit && below > SHARPNESS * (lo - noise.floor())) {
                    neg[p]++;
                }
            }
        }
    }

    private static int levelClass(float level, float[] limits) {
        int lo = 0;
        int hi = limits.length;
        while (lo < hi) {
            int mid = (lo + hi) >>> 1;
            if (level >= limits[mid]) {
                lo = mid + 1;
            } else {
                hi = mid;
            }
        }
        return lo;
    }
}
