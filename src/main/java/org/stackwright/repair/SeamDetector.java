package org.stackwright.repair;

import java.util.ArrayList;
import java.util.List;

import org.stackwright.volume.Volume;

/**
 * Finds tile seams in a stitched image: straight lines along which the intensity changes abruptly in (nearly)
 * every row (for vertical seams) or column (for horizontal ones), through all slices.
 *
 * <p>For each position x between columns x and x+1 and each row, the step d(x) = I(x+1) - I(x) minus the median
 * of the steps d(x-6) .. d(x-2) and d(x+2) .. d(x+6), e = d(x) - median, removes smooth slopes (vignetting, large
 * structures). Over all rows and slices the signs of e are counted, and the sign test statistic
 * z = (n+ - n-) / sqrt(N), N all lines (ties, e.g. flat regions of noise-free data, count for neither side; Dixon & Mood, "The statistical sign test", J. Am. Stat. Assoc.
 * 41:557-566, 1946) measures how consistently the line steps one way. A seam, a dimmed or brightened band or a
 * change of gain between tiles, steps the same way in nearly every row; structure and noise do not. Positions with
 * |z| > threshold are edges; edges closer than {@link #MAX_BAND} pixels form one band from the first to the last,
 * a lone edge is a step seam and gets a band of the requested width centred on it. A weak edge of opposite
 * sign right next to a strong one is dropped as its echo ({@link #ECHO}). The spacing of the seams found
 * is reported, and whether it is regular (a tile grid gives equal spacing).
 */
public final class SeamDetector {

    /** edges closer than this (pixels) belong to one seam band */
    public static final int MAX_BAND = 24;
    /** steps d(x-REACH .. x-2) and d(x+2 .. x+REACH) give the local slope */
    static final int REACH = 6;
    /**
     * An edge weaker than this share of an opposite edge within REACH pixels is taken for its echo: removing the
     * median of the nearby steps biases the lines next to a strong edge slightly the other way.
     */
    static final double ECHO = 0.5;

    /**
     * A seam band [start, end) along one axis.
     *
     * @param start first pixel of the band
     * @param end one past the last pixel
     * @param strength largest |z| of the sign test over the band's edges
     */
    public record Band(int start, int end, double strength) {
        /** @return the centre position (start + end) / 2, a tile border for a band centred on it */
        public int centre() {
            return (start + end) / 2;
        }
    }

    /**
     * What was found.
     *
     * @param columns vertical seams (x bands)
     * @param rows horizontal seams (y bands)
     * @param regular true when the spacings of the seams (and of the image borders) along each axis agree within
     *     2 pixels
     */
    public record Found(List<Band> columns, List<Band> rows, boolean regular) {
        /** @return one plane, 255 on every band (full lines) */
        public byte[] mask(int w, int h) {
            byte[] m = new byte[w * h];
            for (Band b : columns) {
                for (int y = 0; y < h; y++) {
                    for (int x = Math.max(0, b.start()); x < Math.min(w, b.end()); x++) {
                        m[y * w + x] = (byte) 255;
                    }
                }
            }
            for (Band b : rows) {
                for (int y = Math.max(0, b.start()); y < Math.min(h, b.end()); y++) {
                    for (int x = 0; x < w; x++) {
                        m[y * w + x] = (byte) 255;
                    }
                }
            }
            return m;
        }
    }

    private SeamDetector() {
    }

    /**
     * @param image the image or stack, not modified
     * @param threshold sign-test z above which a line is an edge (e.g. 8)
     * @param stepWidth band width given to a lone step edge, pixels
     */
    public static Found detect(Volume image, double threshold, int stepWidth) {
        double[] zx = signTest(image, true);
        double[] zy = signTest(image, false);
        List<Band> cols = bands(zx, threshold, stepWidth, image.width());
        List<Band> rows = bands(zy, threshold, stepWidth, image.height());
        boolean regular = regular(cols, image.width()) && regular(rows, image.height());
        return new Found(cols, rows, regular);
    }

    /** Sign-test z for each position between pixel i and i+1 along x (alongX) or y. */
    static double[] signTest(Volume v, boolean alongX) {
        int w = v.width();
        int h = v.height();
        int n = alongX ? w : h;
        int lines = alongX ? h : w;
        long[] plus = new long[n];
        long[] minus = new long[n];
        float[] f = v.data();
        double[] window = new double[2 * REACH];
        int step = alongX ? 1 : w;
        int lineStep = alongX ? w : 1;
        for (int z = 0; z < v.depth(); z++) {
            int base = z * w * h;
            for (int l = 0; l < lines; l++) {
                int o = base + l * lineStep;
                for (int i = REACH; i < n - REACH - 1; i++) {
                    int p = o + i * step;
                    double d = f[p + step] - f[p];
                    int m = 0;
                    for (int k = 2; k <= REACH; k++) {
                        window[m++] = f[p - (k - 1) * step] - f[p - k * step];
                        window[m++] = f[p + (k + 1) * step] - f[p + k * step];
                    }
                    double e = d - RobustStats.medianInPlace(window, m);
                    if (e > 0) {
                        plus[i]++;
                    } else if (e < 0) {
                        minus[i]++;
                    }
                }
            }
        }
        double[] z = new double[n];
        double all = Math.sqrt((double) lines * v.depth());
        for (int i = 0; i < n; i++) {
            z[i] = (plus[i] - minus[i]) / all;
        }
        return z;
    }

    static List<Band> bands(double[] zIn, double threshold, int stepWidth, int n) {
        double[] z = zIn.clone();
        for (int i = 0; i < z.length; i++) {
            for (int j = Math.max(0, i - REACH); j <= Math.min(z.length - 1, i + REACH); j++) {
                if (zIn[i] * zIn[j] < 0 && Math.abs(zIn[i]) < ECHO * Math.abs(zIn[j])) {
                    z[i] = 0;
                }
            }
        }
        List<Band> out = new ArrayList<>();
        int i = 0;
        while (i < z.length) {
            if (Math.abs(z[i]) <= threshold) {
                i++;
                continue;
            }
            int first = i;
            int last = i;
            double strength = Math.abs(z[i]);
            int j = i + 1;
            while (j < z.length && j - last <= MAX_BAND) {
                if (Math.abs(z[j]) > threshold) {
                    last = j;
                    strength = Math.max(strength, Math.abs(z[j]));
                }
                j++;
            }
            if (last > first) {
                out.add(new Band(first + 1, last + 1, strength));
            } else {
                int border = first + 1;
                int start = Math.max(0, border - stepWidth / 2);
                out.add(new Band(start, Math.min(n, border - stepWidth / 2 + stepWidth), strength));
            }
            i = last + 1;
        }
        return out;
    }

    /** True when the gaps between image edges and band centres along an axis are equal within 2 pixels. */
    static boolean regular(List<Band> bands, int n) {
        if (bands.isEmpty()) {
            return true;
        }
        int prev = 0;
        int min = Integer.MAX_VALUE;
        int max = 0;
        for (Band b : bands) {
            int gap = b.centre() - prev;
            min = Math.min(min, gap);
            max = Math.max(max, gap);
            prev = b.centre();
        }
        int last = n - prev;
        min = Math.min(min, last);
        max = Math.max(max, last);
        return max - min <= 2;
    }
}
