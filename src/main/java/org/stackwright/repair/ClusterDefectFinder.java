package org.stackwright.repair;

import java.util.Arrays;

/**
 * Finds single defective pixels and small clusters of them (up to {@link #MAX_CLUSTER} touching pixels) in one
 * plane, so that two or three bad neighbours do not hide each other as they hide a pixel from a 3x3 median.
 *
 * <p>Seeds are pixels that stand out by k noise sigmas from the 4th largest (hot) or 4th smallest (dead) of their
 * 8 neighbours: up to three bad neighbours are passed over. Touching seeds of one sign form a candidate group G.
 * The group is a defect when every member stands out from every pixel of its ring (the 8-neighbours of G outside
 * G) by more than k sigmas and by more than {@link ImageDefectFinder#SHARPNESS} of the ring's signal above the
 * local background: the test of a single pixel against its 8 neighbours, applied to the group as a whole. An optical
 * image cannot pass it: the PSF falls off gradually, so some ring pixel is close to the group's faintest member.
 * When the group fails, its faintest member is moved to the ring and the rest is tested again (iterating with the
 * found part as the reference, so a hot pixel next to a slightly warm one is still found). Pixels already known to
 * belong to a line defect are left out of rings and seeds' references.
 *
 * <p>The threshold is a robust z-score: sigma from the Poisson-Gaussian fit of {@link NoiseLevel} (robust class
 * sigmas 1.4826 MAD, Hampel 1974).
 */
final class ClusterDefectFinder {

    /** largest group of touching pixels tested as one cluster; larger groups are structure */
    static final int MAX_CLUSTER = 6;
    /** the seed test passes over this many neighbours (3 bad neighbours: the 4th largest is the reference) */
    static final int PASS_OVER = 3;

    private ClusterDefectFinder() {
    }

    /**
     * @param v the plane at offset off (w x h); not modified
     * @param noise the plane's noise model
     * @param level the local level of each pixel (3x3 median), for sigma; not modified
     * @param k threshold in sigmas
     * @param excluded pixels left out of every reference (line defects); not modified
     * @param noData pixels that carry no data (gaps of zeros in a mosaic): never defects, never references; not
     *     modified
     * @param hot set true at hot pixels found (only set)
     * @param dead set true at dead pixels found (only set)
     */
    static void scan(float[] v, int off, int w, int h, NoiseLevel noise, float[] level, double k, boolean[] excluded,
            boolean[] noData, boolean[] hot, boolean[] dead) {
        boolean[] skip = new boolean[excluded.length];
        for (int p = 0; p < skip.length; p++) {
            skip[p] = excluded[p] || noData[p];
        }
        int n = w * h;
        boolean[] seedHi = new boolean[n];
        boolean[] seedLo = new boolean[n];
        float[] nb = new float[8];
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                int p = y * w + x;
                if (skip[p]) {
                    continue;
                }
                int m = 0;
                for (int dy = -1; dy <= 1; dy++) {
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = x + dx;
                        int yy = y + dy;
                        if ((dx | dy) != 0 && xx >= 0 && yy >= 0 && xx < w && yy < h && !skip[yy * w + xx]) {
                            nb[m++] = v[off + yy * w + xx];
                        }
                    }
                }
                if (m == 0) {
                    continue;
                }
                Arrays.sort(nb, 0, m);
                int r = Math.min(PASS_OVER, m - 1);
                double limit = k * noise.sigma(level[p]);
                float c = v[off + p];
                seedHi[p] = c - nb[m - 1 - r] > limit;
                seedLo[p] = nb[r] - c > limit;
            }
        }
        int[] queue = new int[n];
        int[] members = new int[MAX_CLUSTER + 1];
        boolean[] seen = new boolean[n];
        for (int sign = 1; sign >= -1; sign -= 2) {
            boolean[] seed = sign > 0 ? seedHi : seedLo;
            boolean[] out = sign > 0 ? hot : dead;
            Arrays.fill(seen, false);
            for (int p0 = 0; p0 < n; p0++) {
                if (!seed[p0] || seen[p0]) {
                    continue;
                }
                // the 8-connected group of seeds containing p0
                int head = 0;
                int tail = 0;
                queue[tail++] = p0;
                seen[p0] = true;
                while (head < tail) {
                    int p = queue[head++];
                    int x = p % w;
                    int y = p / w;
                    for (int dy = -1; dy <= 1; dy++) {
                        for (int dx = -1; dx <= 1; dx++) {
                            int xx = x + dx;
                            int yy = y + dy;
                            if (xx >= 0 && yy >= 0 && xx < w && yy < h && seed[yy * w + xx] && !seen[yy * w + xx]) {
                                seen[yy * w + xx] = true;
                                queue[tail++] = yy * w + xx;
                            }
                        }
                    }
                }
                if (tail > MAX_CLUSTER) {
                    continue;
                }
                System.arraycopy(queue, 0, members, 0, tail);
                testGroup(v, off, w, h, noise, k, sign, skip, noData, members, tail, out);
            }
        }
    }

    /**
     * Tests a group, dropping its faintest member until it passes or is empty; marks the passing members. The
     * sharpness is judged against the local background (median of the 7x7 box around the group's first member,
     * members and skipped pixels left out), so that a defect on a bright flat region is not held to the signal
     * of the region: the fine-structure idea of van Dokkum, "Cosmic-ray rejection by Laplacian edge detection",
     * PASP 113:1420-1427, 2001. A group whose ring has no data on one side (the edge of a gap) is not judged.
     */
    private static void testGroup(float[] v, int off, int w, int h, NoiseLevel noise, double k, int sign,
            boolean[] skip, boolean[] noData, int[] members, int count, boolean[] out) {
        double[] ring = new double[8 * MAX_CLUSTER + 8];
        double[] box = new double[49];
        while (count > 0) {
            int faintest = 0;
            double faint = Double.POSITIVE_INFINITY;
            for (int i = 0; i < count; i++) {
                double s = sign * v[off + members[i]];
                if (s < faint) {
                    faint = s;
                    faintest = i;
                }
            }
            int m = 0;
            double edge = Double.NEGATIVE_INFINITY;
            // sides of the ring that hold data: left, right, above, below
            boolean[] side = new boolean[4];
            for (int i = 0; i < count; i++) {
                int x = members[i] % w;
                int y = members[i] / w;
                for (int dy = -1; dy <= 1; dy++) {
                    for (int dx = -1; dx <= 1; dx++) {
                        int xx = x + dx;
                        int yy = y + dy;
                        if (xx < 0 || yy < 0 || xx >= w || yy >= h) {
                            continue;
                        }
                        int q = yy * w + xx;
                        if (skip[q] || contains(members, count, q)) {
                            continue;
                        }
                        side[dx < 0 ? 0 : dx > 0 ? 1 : dy < 0 ? 2 : 3] = true;
                        // a ring pixel next to two members is counted twice: harmless for the max and the median
                        ring[m++] = v[off + q];
                        edge = Math.max(edge, sign * v[off + q]);
                    }
                }
            }
            if (m == 0) {
                return;
            }
            if (nextToNoData(members, count, w, h, noData) && !(side[0] && side[1] && side[2] && side[3])) {
                return;
            }
            double ringLevel = RobustStats.median(ring, m);
            double background = background(v, off, w, h, members, count, skip, box);
            double margin = faint - edge;
            double above = edge - sign * background;
            if (margin > k * noise.sigma(ringLevel) && margin > ImageDefectFinder.SHARPNESS * Math.max(0, above)) {
                for (int i = 0; i < count; i++) {
                    out[members[i]] = true;
                }
                return;
            }
            members[faintest] = members[count - 1];
            count--;
        }
    }

    private static boolean nextToNoData(int[] members, int count, int w, int h, boolean[] noData) {
        for (int i = 0; i < count; i++) {
            int x = members[i] % w;
            int y = members[i] / w;
            for (int dy = -1; dy <= 1; dy++) {
                for (int dx = -1; dx <= 1; dx++) {
                    int xx = x + dx;
                    int yy = y + dy;
                    if (xx >= 0 && yy >= 0 && xx < w && yy < h && noData[yy * w + xx]) {
                        return true;
                    }
                }
            }
        }
        return false;
    }

    /** Median of the 7x7 box around the first member, members and skipped pixels left out. */
    private static double background(float[] v, int off, int w, int h, int[] members, int count, boolean[] skip,
            double[] box) {
        int x0 = members[0] % w;
        int y0 = members[0] / w;
        int m = 0;
        for (int y = Math.max(0, y0 - 3); y <= Math.min(h - 1, y0 + 3); y++) {
            for (int x = Math.max(0, x0 - 3); x <= Math.min(w - 1, x0 + 3); x++) {
                int q = y * w + x;
                if (!skip[q] && !contains(members, count, q)) {
                    box[m++] = v[off + q];
                }
            }
        }
        return m == 0 ? 0 : RobustStats.median(box, m);
    }

    private static boolean contains(int[] a, int n, int q) {
        for (int i = 0; i < n; i++) {
            if (a[i] == q) {
                return true;
            }
        }
        return false;
    }
}
