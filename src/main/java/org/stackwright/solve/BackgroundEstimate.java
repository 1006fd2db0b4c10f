package org.stackwright.solve;

import java.io.UncheckedIOException;
import java.util.Arrays;

import org.stackwright.blocks.Box;
import org.stackwright.blocks.PlaneSource;
import org.stackwright.model.Camera;
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
 *
 * <p>Two forms give the same number: {@link #estimate(Volume, byte[], double)} on a volume in memory, and
 * {@link #estimate(PlaneSource, PlaneSource, double, PlaneVisitor)} on a stack read three planes at a time, which
 * finds the percentile exactly in two passes with 65536-bin histograms of the values' bit patterns (high 16 bits,
 * then low 16 bits within the chosen bin), so memory stays at a few planes.
 */
public final class BackgroundEstimate {

    /** Sees each plane of the first streaming pass (so a caller can gather its own statistics in the same read). */
    @FunctionalInterface
    public interface PlaneVisitor {
        /**
         * @param z the plane
         * @param data its pixels, not to be modified
         * @param mask 1 = untrusted, or null when there is no mask; not to be modified
         */
        void visit(int z, float[] data, byte[] mask);
    }

    private BackgroundEstimate() {
    }

    /**
     * @param data camera data (ADU), not modified
     * @param mask untrusted pixels (nonzero), or null
     * @param offset camera offset (ADU)
     * @return background above the offset, ADU
     */
    public static double estimate(Volume data, byte[] mask, double offset) {
        return estimate(data, mask, offset, (Camera) null);
    }

    /** The 1% point of the standard normal distribution (its magnitude). */
    private static final double Z_ONE_PERCENT = 2.326;

    /**
     * @param camera the camera, to correct the noise left after the mean filter; null for no correction
     * @return background above the offset, ADU
     */
    public static double estimate(Volume data, byte[] mask, double offset, Camera camera) {
        int w = data.width();
        int h = data.height();
        int d = data.depth();
        int plane = w * h;
        float[] src = data.data();
        float[] vals = new float[src.length];
        float[] out = new float[plane];
        float[][] planes = new float[3][];
        byte[][] masks = new byte[3][];
        int n = 0;
        for (int z = 0; z < d; z++) {
            for (int k = -1; k <= 1; k++) {
                int zz = z + k;
                planes[k + 1] = zz >= 0 && zz < d ? Arrays.copyOfRange(src, zz * plane, (zz + 1) * plane) : null;
                masks[k + 1] = mask != null && zz >= 0 && zz < d ? Arrays.copyOfRange(mask, zz * plane, (zz + 1) * plane) : null;
            }
            filterPlane(planes, masks, w, h, d > 1, out);
            for (float v : out) {
                if (!Float.isNaN(v)) {
                    vals[n++] = v;
                }
            }
        }
        if (n == 0) {
            return 0;
        }
        float[] v = Arrays.copyOf(vals, n);
        Arrays.sort(v);
        return corrected(v[rank(n)] - offset, camera, w, h, d);
    }

    /** @return the 1st percentile above the offset with the noise bias added back (camera known), at least 0 */
    private static double corrected(double p1, Camera camera, int w, int h, int d) {
        int full = (d > 1 ? 3 : 1) * Math.min(5, h) * Math.min(5, w);
        if (camera != null && p1 > 0) {
            p1 += Z_ONE_PERCENT * Math.sqrt(camera.variance(p1) / full);
        }
        return Math.max(0, p1);
    }

    /** @return the 0-based rank of the 1st percentile among n values */
    private static int rank(long n) {
        return (int) Math.floor(0.01 * (n - 1));
    }

    /**
     * The same estimate on a stack read plane by plane.
     *
     * @param data camera data, not modified
     * @param mask untrusted pixels (nonzero), same width and height, its depth or 1 plane for all; or null
     * @param offset camera offset (ADU)
     * @param visitor sees each plane in the first pass, or null
     * @return background above the offset, ADU
     * @throws UncheckedIOException when the stack cannot be read
     */
    public static double estimate(PlaneSource data, PlaneSource mask, double offset, PlaneVisitor visitor) {
        return estimate(data, mask, offset, null, visitor);
    }

    /**
     * As above, with the camera to correct the noise left after the mean filter (null for no correction), as
     * {@link #estimate(Volume, byte[], double, Camera)}.
     */
    public static double estimate(PlaneSource data, PlaneSource mask, double offset, Camera camera,
            PlaneVisitor visitor) {
        int w = data.width();
        int h = data.height();
        int d = data.depth();
        long[] high = new long[65536];
        long n = pass(data, mask, visitor, (v) -> high[key(v) >>> 16]++);
        if (n == 0) {
            return 0;
        }
        long want = rank(n);
        int bin = 0;
        long below = 0;
        while (below + high[bin] <= want) {
            below += high[bin++];
        }
        final int top = bin;
        long[] low = new long[65536];
        pass(data, mask, null, (v) -> {
            int k = key(v);
            if (k >>> 16 == top) {
                low[k & 0xffff]++;
            }
        });
        int b = 0;
        long seen = below;
        while (seen + low[b] <= want) {
            seen += low[b++];
        }
        float value = fromKey((top << 16) | b);
        return corrected(value - offset, camera, w, h, d);
    }

    private interface ValueSink {
        void take(float v);
    }

    /** One pass over the filtered values, three planes in memory at a time. @return values seen */
    private static long pass(PlaneSource data, PlaneSource mask, PlaneVisitor visitor, ValueSink sink) {
        int w = data.width();
        int h = data.height();
        int d = data.depth();
        float[][] planes = new float[3][];
        byte[][] masks = new byte[3][];
        float[] out = new float[w * h];
        long n = 0;
        for (int z = 0; z < d; z++) {
            if (z == 0) {
                planes[1] = readPlane(data, 0);
                masks[1] = mask == null ? null : maskPlane(mask, 0);
            } else {
                planes[0] = planes[1];
                masks[0] = masks[1];
                planes[1] = planes[2];
                masks[1] = masks[2];
            }
            planes[2] = z + 1 < d ? readPlane(data, z + 1) : null;
            masks[2] = mask != null && z + 1 < d ? maskPlane(mask, z + 1) : null;
            if (z == 0) {
                planes[0] = null;
                masks[0] = null;
            }
            if (visitor != null) {
                visitor.visit(z, planes[1], masks[1]);
            }
            filterPlane(planes, masks, w, h, d > 1, out);
            for (float v : out) {
                if (!Float.isNaN(v)) {
                    sink.take(v);
                    n++;
                }
            }
        }
        return n;
    }

    private static float[] readPlane(PlaneSource s, int z) {
        return s.read(new Box(0, 0, z, s.width(), s.height(), 1)).data();
    }

    private static byte[] maskPlane(PlaneSource s, int z) {
        float[] m = s.read(new Box(0, 0, s.depth() == 1 ? 0 : z, s.width(), s.height(), 1)).data();
        byte[] b = new byte[m.length];
        for (int i = 0; i < m.length; i++) {
            b[i] = (byte) (m[i] != 0 ? 1 : 0);
        }
        return b;
    }

    /**
     * The mean over the 5 x 5 (x 3) neighbourhood of each pixel of the middle plane, over trusted finite pixels;
     * NaN where there is none. The sum runs plane by plane, row by row, so the in-memory and streaming forms add in
     * the same order and agree bit for bit.
     *
     * @param planes the planes z-1, z, z+1 (null outside the stack), not modified
     * @param masks their masks (nonzero = untrusted; null for none), not modified
     * @param out one value per pixel of plane z, overwritten
     */
    static void filterPlane(float[][] planes, byte[][] masks, int w, int h, boolean threeD, float[] out) {
        int k0 = threeD ? 0 : 1;
        int k1 = threeD ? 2 : 1;
        for (int y = 0; y < h; y++) {
            for (int x = 0; x < w; x++) {
                double s = 0;
                int c = 0;
                for (int k = k0; k <= k1; k++) {
                    float[] src = planes[k];
                    if (src == null) {
                        continue;
                    }
                    byte[] m = masks[k];
                    for (int j = Math.max(0, y - 2); j <= Math.min(h - 1, y + 2); j++) {
                        for (int i = Math.max(0, x - 2); i <= Math.min(w - 1, x + 2); i++) {
                            int idx = j * w + i;
                            if ((m == null || m[idx] == 0) && Float.isFinite(src[idx])) {
                                s += src[idx];
                                c++;
                            }
                        }
                    }
                }
                out[y * w + x] = c > 0 ? (float) (s / c) : Float.NaN;
            }
        }
    }

    /** @return an int whose unsigned order is the order of the floats (as {@link Arrays#sort(float[])}) */
    static int key(float v) {
        int bits = Float.floatToIntBits(v);
        return (bits ^ ((bits >> 31) & 0x7fffffff)) ^ 0x80000000;
    }

    static float fromKey(int key) {
        int k = key ^ 0x80000000;
        return Float.intBitsToFloat(k ^ ((k >> 31) & 0x7fffffff));
    }
}
