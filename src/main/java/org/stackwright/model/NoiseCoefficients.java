package org.stackwright.model;

import org.stackwright.volume.Volume;

/**
 * The noise coefficients of an image for {@link ImageNoiseFit}: at every position of a grid with step {@link #stride}
 * the 3 x 3 x 3 block (3 x 3 for images of fewer than 3 planes) starting there gives
 * d = sum k_i y_i / |k| with k the tensor product of second differences [1 -2 1] along every axis, and the level
 * sum k_i^2 y_i / |k|^2. The kernel annihilates every polynomial of degree at most 1 in any one coordinate (smooth
 * light, a gradient, a straight edge, a broad blob leave almost nothing); for pixel-independent noise
 * Var(d) = slope * level + intercept exactly (the k^2-weighted mean of the pixel variances). Neighbouring blocks
 * overlap, so their coefficients are correlated; {@link #correlationFactor} says by how much that widens the
 * standard error of a mean of d^2 (for Gaussian noise: Cov(d_i^2, d_j^2) = 2 rho_ij^2 Var(d)^2).
 */
final class NoiseCoefficients {

    /** Largest number of coefficients kept (float pairs): a larger image is sampled with a larger stride. */
    private static final long MAX_COEFFICIENTS = 8_000_000L;
    /** Correlation of two [1 -2 1] differences 0, 1 and 2 voxels apart. */
    private static final double[] RHO = {1, -2.0 / 3, 1.0 / 6};

    final int nx;
    final int ny;
    final int nz;
    final int stride;
    final boolean threeD;
    final float[] d;
    final float[] level;
    final boolean[] ok;
    int valid;

    private NoiseCoefficients(int nx, int ny, int nz, int stride, boolean threeD) {
        this.nx = nx;
        this.ny = ny;
        this.nz = nz;
        this.stride = stride;
        this.threeD = threeD;
        int n = nx * ny * nz;
        this.d = new float[n];
        this.level = new float[n];
        this.ok = new boolean[n];
    }

    /**
     * @param v camera data, not modified
     * @param mask pixels to leave out (nonzero), or null
     */
    static NoiseCoefficients of(Volume v, byte[] mask) {
        int w = v.width();
        int h = v.height();
        int dep = v.depth();
        boolean threeD = dep >= 3;
        long positions = (long) Math.max(0, w - 2) * Math.max(0, h - 2) * (threeD ? dep - 2 : dep);
        int stride = 1;
        while (positions / ((long) stride * stride * (threeD ? stride : 1)) > MAX_COEFFICIENTS) {
            stride++;
        }
        int nx = w >= 3 ? (w - 3) / stride + 1 : 0;
        int ny = h >= 3 ? (h - 3) / stride + 1 : 0;
        int nz = threeD ? (dep - 3) / stride + 1 : dep;
        NoiseCoefficients c = new NoiseCoefficients(nx, ny, nz, stride, threeD);
        float[] src = v.data();
        float[] clip = clippedLevels(src);
        boolean[] bad = new boolean[src.length];
        for (int i = 0; i < src.length; i++) {
            float f = src[i];
            bad[i] = !Float.isFinite(f) || (mask != null && mask[i] != 0) || f >= clip[1] || f <= clip[0];
        }
        int[] k1 = {1, -2, 1};
        double norm = threeD ? Math.sqrt(216) : 6;
        double wsum = threeD ? 216 : 36;
        int sz = threeD ? 3 : 1;
        for (int z = 0; z < nz; z++) {
            for (int y = 0; y < ny; y++) {
                for (int x = 0; x < nx; x++) {
                    int ci = (z * ny + y) * nx + x;
                    int x0 = x * stride;
                    int y0 = y * stride;
                    int z0 = threeD ? z * stride : z;
                    double dd = 0;
                    double lw = 0;
                    boolean good = true;
                    for (int k = 0; k < sz && good; k++) {
                        int kz = threeD ? k1[k] : 1;
                        for (int j = 0; j < 3 && good; j++) {
                            int row = ((z0 + k) * h + y0 + j) * w + x0;
                            for (int i = 0; i < 3; i++) {
                                if (bad[row + i]) {
                                    good = false;
                                    break;
                                }
                                int kk = kz * k1[j] * k1[i];
                                float val = src[row + i];
                                dd += kk * val;
                                lw += kk * kk * val;
                            }
                        }
                    }
                    if (good) {
                        c.d[ci] = (float) (dd / norm);
                        c.level[ci] = (float) (lw / wsum);
                        c.ok[ci] = true;
                        c.valid++;
                    }
                }
            }
        }
        return c;
    }

    /**
     * @return by how much the variance of a mean of d^2 over many neighbouring positions exceeds that of as many
     *     independent coefficients: the sum of rho^2 over the lags of the grid, per axis, multiplied over axes
     */
    double correlationFactor() {
        double axis = 0;
        for (int lag = -2; lag <= 2; lag++) {
            if (lag % stride == 0) {
                double r = RHO[Math.abs(lag)];
                axis += r * r;
            }
        }
        return threeD ? axis * axis * axis : axis * axis;
    }

    /**
     * Smooth positions under the noise model variance = a level + b: no coefficient within 3 voxels exceeds the
     * given number of its standard deviations. Sharp objects (points, thin lines, corners) give large coefficients
     * over a few neighbouring blocks; smooth light gives none.
     */
    boolean[] smooth(double a, double b, double sigmas) {
        int n = d.length;
        boolean[] rough = new boolean[n];
        for (int i = 0; i < n; i++) {
            rough[i] = ok[i] && (double) d[i] * d[i] > sigmas * sigmas * Math.max(a * level[i] + b, 1e-12);
        }
        int r = (3 + stride - 1) / stride;
        rough = dilate(rough, r, 1, nx);
        rough = dilate(rough, r, nx, ny);
        if (threeD) {
            rough = dilate(rough, r, nx * ny, nz);
        }
        boolean[] s = new boolean[n];
        for (int i = 0; i < n; i++) {
            s[i] = ok[i] && !rough[i];
        }
        return s;
    }

    /** Maximum filter of width 2r + 1 along one axis (step between neighbours, length of the axis). */
    private boolean[] dilate(boolean[] in, int r, int step, int len) {
        boolean[] out = new boolean[in.length];
        for (int i = 0; i < in.length; i++) {
            if (!in[i]) {
                continue;
            }
            int pos = (i / step) % len;
            for (int o = -r; o <= r; o++) {
                int q = pos + o;
                if (q >= 0 && q < len) {
                    out[i + o * step] = true;
                }
            }
        }
        return out;
    }

    /**
     * @return {low, high}: values at or below low, or at or above high, are clipped by the camera (the lowest or
     *     highest value when many pixels share it); -inf / +inf when there is no sign of clipping
     */
    private static float[] clippedLevels(float[] src) {
        float lo = Float.POSITIVE_INFINITY;
        float hi = Float.NEGATIVE_INFINITY;
        for (float f : src) {
            if (Float.isFinite(f)) {
                lo = Math.min(lo, f);
                hi = Math.max(hi, f);
            }
        }
        int nLo = 0;
        int nHi = 0;
        for (float f : src) {
            if (f == lo) {
                nLo++;
            }
            if (f == hi) {
                nHi++;
            }
        }
        // a camera clips many pixels to one value; the natural tail of the noise leaves only a few at the extremes
        int many = Math.max(5, src.length / 1000);
        return new float[] {nLo >= many && lo < hi ? lo : Float.NEGATIVE_INFINITY,
            nHi >= many && hi > lo ? hi : Float.POSITIVE_INFINITY};
    }
}
