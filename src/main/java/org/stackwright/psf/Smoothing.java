package org.stackwright.psf;

import org.stackwright.volume.Volume;

/** Separable Gaussian smoothing with edge values repeated outside, for detection (not for the PSF itself). */
final class Smoothing {

    private Smoothing() {
    }

    /**
     * @param v input, not modified
     * @param sigma standard deviation in voxels along every axis (an axis of length 1 is left alone)
     * @return a new smoothed volume
     */
    static Volume gaussian(Volume v, double sigma) {
        int r = (int) Math.ceil(3 * sigma);
        double[] k = new double[2 * r + 1];
        double sum = 0;
        for (int i = -r; i <= r; i++) {
            k[i + r] = Math.exp(-0.5 * i * i / (sigma * sigma));
            sum += k[i + r];
        }
        for (int i = 0; i < k.length; i++) {
            k[i] /= sum;
        }
        float[] a = v.data().clone();
        float[] b = new float[a.length];
        int nx = v.width();
        int ny = v.height();
        int nz = v.depth();
        for (int axis = 0; axis < 3; axis++) {
            int n = axis == 0 ? nx : axis == 1 ? ny : nz;
            if (n == 1) {
                continue;
            }
            int stride = axis == 0 ? 1 : axis == 1 ? nx : nx * ny;
            for (int start = 0; start < a.length; start++) {
                if ((start / stride) % n != 0) {
                    continue;
                }
                for (int i = 0; i < n; i++) {
                    double s = 0;
                    for (int t = -r; t <= r; t++) {
                        int j = Math.min(n - 1, Math.max(0, i + t));
                        s += k[t + r] * a[start + j * stride];
                    }
                    b[start + i * stride] = (float) s;
                }
            }
            float[] tmp = a;
            a = b;
            b = tmp;
        }
        return v.withData(a);
    }
}
