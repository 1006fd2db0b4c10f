package org.stackwright.solve;

import org.stackwright.volume.Volume;

/**
 * An estimate of the uniform background above the camera offset: the 1st percentile of the data after a 5 x 5
 * (x 3 in z) mean filter, minus the offset, at least 0. The mean filter removes most of the noise, so the
 * percentile finds the darkest regions rather than the darkest noise samples (common practice; a rough estimate:
 * give --background when it is known). What noise is left still pulls the 1st percentile of a flat region
 * 2.326 standard deviations of the window mean below its level (the 1% point of the normal distribution); when the
 * camera is known that is added back, with the standard deviation of a whole window's mean from the camera's noise
 * at that level (windows cut by the image border are a little noisier; the correction is then slightly low, the safe
 * side: a background set too high leaves the model unable to explain the darkest regions).
 */
public final class BackgroundEstimate {

    private BackgroundEstimate() {
    }

    /**
     * @param data camera data (ADU), not modified
     * @param mask untrusted pixels (nonzero), or null
     * @param offset camera offset (ADU)
     * @return background above the offset, ADU
     */
    public static double estimate(Volume data, byte[] mask, double offset) {
        return estimate(data, mask, offset, null);
    }

    /** The 1% point of the standard normal distribution (its magnitude). */
    private static final double Z_ONE_PERCENT = 2.326;

    /**
     * @param camera the camera, to correct the noise left after the mean filter; null for no correction
     * @return background above the offset, ADU
     */
    public static double estimate(Volume data, byte[] mask, double offset, org.stackwright.model.Camera camera) {
        int w = data.width();
        int h = data.height();
        int d = data.depth();
        int rz = d > 1 ? 1 : 0;
        float[] src = data.data();
        float[] vals = new float[src.length];
        int full = (2 * rz + 1) * Math.min(5, h) * Math.min(5, w);
        int n = 0;
        for (int z = 0; z < d; z++) {
            for (int y = 0; y < h; y++) {
                for (int x = 0; x < w; x++) {
                    double s = 0;
                    int c = 0;
                    for (int k = Math.max(0, z - rz); k <= Math.min(d - 1, z + rz); k++) {
                        for (int j = Math.max(0, y - 2); j <= Math.min(h - 1, y + 2); j++) {
                            for (int i = Math.max(0, x - 2); i <= Math.min(w - 1, x + 2); i++) {
                                int idx = (k * h + j) * w + i;
                                if ((mask == null || mask[idx] == 0) && Float.isFinite(src[idx])) {
                                    s += src[idx];
                                    c++;
                                }
                            }
                        }
                    }
                    if (c > 0) {
                        vals[n++] = (float) (s / c);
                    }
                }
            }
        }
        if (n == 0) {
            return 0;
        }
        float[] v = java.util.Arrays.copyOf(vals, n);
        java.util.Arrays.sort(v);
        double p1 = v[(int) Math.floor(0.01 * (n - 1))] - offset;
        if (camera != null && p1 > 0) {
            p1 += Z_ONE_PERCENT * Math.sqrt(camera.variance(p1) / full);
        }
        return Math.max(0, p1);
    }
}
