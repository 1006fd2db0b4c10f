package org.stackwright.inspect;

import org.stackwright.volume.Volume;

/**
 * Mean structural similarity (SSIM) of Wang, Bovik, Sheikh & Simoncelli, "Image quality assessment: from error
 * visibility to structural similarity", IEEE TIP 13(4):600-612, 2004 (eq. 13 with the Gaussian window of sec.
 * III-C): local means, variances and covariance under a Gaussian window of sigma {@value #SIGMA}, K1 = {@value #K1},
 * K2 = {@value #K2}, C1 = (K1 L)^2, C2 = (K2 L)^2, L the data range; population (not sample) covariances.
 *
 * <p>Layout matches scikit-image 0.19 structural_similarity(gaussian_weights=True, sigma=1.5,
 * use_sample_covariance=False, data_range=L): the window is a separable Gaussian truncated at 3.5 sigma (radius 5,
 * 11 taps), the image is extended by half-sample mirroring at the faces (scipy's "reflect"), and the mean is taken
 * over the voxels at least 5 from every face. A 2D image is filtered in 2D; a stack of at least 11 slices in 3D; a
 * thinner stack slice by slice in 2D, averaging the slices' SSIM (scikit-image with channel_axis = 0).
 */
public final class Ssim {

    public static final double SIGMA = 1.5;
    public static final double K1 = 0.01;
    public static final double K2 = 0.03;
    /** Window radius: int(3.5 sigma + 0.5), as scipy.ndimage computes it. */
    public static final int RADIUS = (int) (3.5 * SIGMA + 0.5);

    private Ssim() {
    }

    /**
     * @param a first image (reference), not modified
     * @param b second image, same shape, not modified
     * @param range data range L, positive
     * @throws IllegalArgumentException when width or height is below the window size (11)
     */
    public static double mean(Volume a, Volume b, double range) {
        int win = 2 * RADIUS + 1;
        if (a.width() < win || a.height() < win) {
            throw new IllegalArgumentException("SSIM needs images at least " + win + "x" + win + " (given "
                    + a.shape() + ")");
        }
        if (a.depth() == 1 || a.depth() >= win) {
            return mean(a.data(), b.data(), a.width(), a.height(), a.depth(), range);
        }
        int plane = a.width() * a.height();
        double s = 0;
        for (int z = 0; z < a.depth(); z++) {
            float[] pa = java.util.Arrays.copyOfRange(a.data(), z * plane, (z + 1) * plane);
            float[] pb = java.util.Arrays.copyOfRange(b.data(), z * plane, (z + 1) * plane);
            s += mean(pa, pb, a.width(), a.height(), 1, range);
        }
        return s / a.depth();
    }

    private static double mean(float[] fa, float[] fb, int w, int h, int d, double range) {
        int n = fa.length;
        double[] x = new double[n];
        double[] y = new double[n];
        double[] xx = new double[n];
        double[] yy = new double[n];
        double[] xy = new double[n];
        for (int i = 0; i < n; i++) {
            x[i] = fa[i];
            y[i] = fb[i];
            xx[i] = x[i] * x[i];
            yy[i] = y[i] * y[i];
            xy[i] = x[i] * y[i];
        }
        double[] k = kernel();
        double[] line = new double[Math.max(w, Math.max(h, d)) + 2 * RADIUS];
        for (double[] v : new double[][] {x, y, xx, yy, xy}) {
            filter(v, w, h, d, k, line);
        }
        double c1 = (K1 * range) * (K1 * range);
        double c2 = (K2 * range) * (K2 * range);
        int r = RADIUS;
        int z0 = d == 1 ? 0 : r;
        int z1 = d == 1 ? 1 : d - r;
        double sum = 0;
        long count = 0;
        for (int z = z0; z < z1; z++) {
            for (int yy0 = r; yy0 < h - r; yy0++) {
                for (int xx0 = r; xx0 < w - r; xx0++) {
                    int i = (z * h + yy0) * w + xx0;
                    double ux = x[i];
                    double uy = y[i];
                    double vx = xx[i] - ux * ux;
                    double vy = yy[i] - uy * uy;
                    double vxy = xy[i] - ux * uy;
                    sum += ((2 * ux * uy + c1) * (2 * vxy + c2)) / ((ux * ux + uy * uy + c1) * (vx + vy + c2));
                    count++;
                }
            }
        }
        return sum / count;
    }

    /** @return the normalised Gaussian taps exp(-t^2 / (2 sigma^2)), t = -RADIUS..RADIUS */
    static double[] kernel() {
        double[] k = new double[2 * RADIUS + 1];
        double s = 0;
        for (int t = -RADIUS; t <= RADIUS; t++) {
            k[t + RADIUS] = Math.exp(-0.5 * t * t / (SIGMA * SIGMA));
            s += k[t + RADIUS];
        }
        for (int i = 0; i < k.length; i++) {
            k[i] /= s;
        }
        return k;
    }

    /** Separable filtering in place along x, y and (when d > 1) z, half-sample mirror at the faces. */
    private static void filter(double[] v, int w, int h, int d, double[] k, double[] line) {
        int[] sizes = {w, h, d};
        int[] strides = {1, w, w * h};
        for (int axis = 0; axis < 3; axis++) {
            int len = sizes[axis];
            if (len == 1) {
                continue;
            }
            int stride = strides[axis];
            int lines = v.length / len;
            for (int l = 0; l < lines; l++) {
                int start = lineStart(l, axis, w, h);
                for (int t = -RADIUS; t < len + RADIUS; t++) {
                    line[t + RADIUS] = v[start + mirror(t, len) * stride];
                }
                for (int t = 0; t < len; t++) {
                    double s = 0;
                    for (int j = 0; j < k.length; j++) {
                        s += k[j] * line[t + j];
                    }
                    v[start + t * stride] = s;
                }
            }
        }
    }

    /** @return index of the first voxel of line number l along the axis */
    private static int lineStart(int l, int axis, int w, int h) {
        if (axis == 0) {
            return l * w;
        }
        if (axis == 1) {
            int z = l / w;
            int x = l % w;
            return z * w * h + x;
        }
        return l; // axis 2: l runs over the w*h positions of a plane
    }

    /** Half-sample symmetric extension (... c b a | a b c ...), periodic with period 2n. */
    static int mirror(int i, int n) {
        int m = Math.floorMod(i, 2 * n);
        return m < n ? m : 2 * n - 1 - m;
    }
}
