package org.stackwright.repair;

import java.util.Arrays;

/**
 * Local median fill: each masked pixel next to known pixels takes the median of the known pixels among its 8 (2D)
 * or 26 (3D) neighbours; then the next layer inwards uses the pixels filled so far, until the hole is closed
 * ("onion peeling"). In 3D the median is weighted by 1 / distance^2 with calibrated distances, so that a coarse z
 * step counts less. Fast and robust for isolated dead or hot pixels (a median ignores a single outlier in its
 * window; common practice for defect correction); flat and blocky in large holes.
 */
final class MedianFill {

    private MedianFill() {
    }

    /**
     * @param f the image (w x h x d), read at known pixels, not modified
     * @param fill true at pixels to fill, not modified
     * @param spacing calibrated spacing (x, y, z)
     * @param out receives the filled values at filled pixels (others untouched)
     * @return number of layers needed to close the largest hole
     */
    static int fill(float[] f, boolean[] fill, int w, int h, int d, double[] spacing, float[] out) {
        int nz = d > 1 ? 1 : 0;
        int plane = w * h;
        int count = 0;
        for (boolean b : fill) {
            if (b) {
                count++;
            }
        }
        int[] frontier = new int[count];
        int[] waiting = new int[count];
        for (int i = 0, j = 0; i < fill.length; i++) {
            if (fill[i]) {
                frontier[j++] = i;
            }
        }
        boolean[] known = new boolean[fill.length];
        for (int i = 0; i < fill.length; i++) {
            known[i] = !fill[i];
        }
        float[] layerValue = new float[count];
        int[] layerIndex = new int[count];
        double[] vals = new double[27];
        double[] wts = new double[27];
        Integer[] order = new Integer[27];
        int remaining = count;
        int layers = 0;
        while (remaining > 0) {
            int nDone = 0;
            int nWait = 0;
            for (int t = 0; t < remaining; t++) {
                int i = frontier[t];
                int x = i % w;
                int y = (i / w) % h;
                int z = i / plane;
                int m = 0;
                for (int dz = -nz; dz <= nz; dz++) {
                    for (int dy = -1; dy <= 1; dy++) {
                        for (int dx = -1; dx <= 1; dx++) {
                            int xx = x + dx;
                            int yy = y + dy;
                            int zz = z + dz;
                            if ((dx | dy | dz) == 0 || xx < 0 || yy < 0 || zz < 0 || xx >= w || yy >= h || zz >= d) {
                                continue;
                            }
                            int q = (zz * h + yy) * w + xx;
                            if (!known[q]) {
                                continue;
                            }
                            vals[m] = fill[q] ? out[q] : f[q];
                            double r2 = sq(dx * spacing[0]) + sq(dy * spacing[1]) + sq(dz * spacing[2]);
                            wts[m] = nz == 0 ? 1 : 1 / r2;
                            m++;
                        }
                    }
                }
                if (m == 0) {
                    waiting[nWait++] = i;
                } else {
                    layerIndex[nDone] = i;
                    layerValue[nDone++] = (float) weightedMedian(vals, wts, m, order);
                }
            }
            for (int t = 0; t < nDone; t++) {
                out[layerIndex[t]] = layerValue[t];
                known[layerIndex[t]] = true;
            }
            layers++;
            if (nDone == 0) {
                throw new IllegalStateException("median fill made no progress: the mask covers a whole region");
            }
            System.arraycopy(waiting, 0, frontier, 0, nWait);
            remaining = nWait;
        }
        return layers;
    }

    private static double sq(double v) {
        return v * v;
    }

    /**
     * The weighted median: the smallest value whose cumulative weight reaches half the total; with equal weights
     * and an even count, the mean of the two middle values (the usual median).
     */
    static double weightedMedian(double[] v, double[] wt, int m, Integer[] order) {
        for (int k = 0; k < m; k++) {
            order[k] = k;
        }
        Arrays.sort(order, 0, m, (a, b) -> Double.compare(v[a], v[b]));
        double total = 0;
        for (int k = 0; k < m; k++) {
            total += wt[k];
        }
        double c = 0;
        for (int k = 0; k < m; k++) {
            c += wt[order[k]];
            if (c == total / 2 && k + 1 < m) {
                return 0.5 * (v[order[k]] + v[order[k + 1]]);
            }
            if (c > total / 2) {
                return v[order[k]];
            }
        }
        return v[order[m - 1]];
    }
}
